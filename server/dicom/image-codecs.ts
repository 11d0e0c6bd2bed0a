import { execFile } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { Decoder as JpegLosslessDecoder } from 'jpeg-lossless-decoder-js';
import { DicomError } from './dicom-error.ts';

/** Samples of one decoded frame, as the codec gave them (bit patterns). */
export interface CodecFrame {
  samples: Uint8Array | Uint16Array;
  width: number;
  height: number;
  components: number;
  /** JPEG-LS NEAR parameter (0 = lossless), when the codec reports it. */
  nearLossless?: number;
  /** Whether a JPEG 2000 codestream used the reversible wavelet. */
  reversible?: boolean;
}

interface WasmFrameInfo {
  width: number;
  height: number;
  bitsPerSample: number;
  componentCount: number;
}

interface WasmDecoder {
  getEncodedBuffer(length: number): Uint8Array;
  decode(): void;
  getFrameInfo(): WasmFrameInfo;
  getDecodedBuffer(): Uint8Array;
  delete(): void;
  getNearLossless?(): number;
  getIsReversible?(): boolean;
}

interface CharlsModule {
  JpegLSDecoder: new () => WasmDecoder;
}

interface OpenJpegModule {
  J2KDecoder: new () => WasmDecoder;
}

type WasmFactory<T> = (options?: Record<string, unknown>) => Promise<T>;

const require = createRequire(import.meta.url);
let charls: Promise<CharlsModule> | undefined;
let openjpeg: Promise<OpenJpegModule> | undefined;

function loadCharls(): Promise<CharlsModule> {
  charls ??= (
    require('@cornerstonejs/codec-charls/decode') as WasmFactory<CharlsModule>
  )();
  return charls;
}

function loadOpenJpeg(): Promise<OpenJpegModule> {
  // The WASM build prints [INFO] lines on every decode unless told not to.
  openjpeg ??= (
    require('@cornerstonejs/codec-openjpeg/decode') as WasmFactory<OpenJpegModule>
  )({ print() {}, printErr() {} });
  return openjpeg;
}

function codecFailure(what: string, error: unknown): DicomError {
  const reason = error instanceof Error ? error.message : String(error);
  return new DicomError(
    'malformed_dicom',
    `The ${what} pixel data could not be decoded (${reason}).`,
  );
}

function runWasm(
  decoder: WasmDecoder,
  encoded: Uint8Array,
  what: string,
): CodecFrame {
  try {
    decoder.getEncodedBuffer(encoded.length).set(encoded);
    decoder.decode();
    const info = decoder.getFrameInfo();
    // The decoded buffer lives in WASM memory, freed by delete(): copy it out.
    const bytes = decoder.getDecodedBuffer().slice();
    const samples =
      info.bitsPerSample > 8
        ? new Uint16Array(bytes.buffer, 0, bytes.length >> 1)
        : bytes;
    return {
      samples,
      width: info.width,
      height: info.height,
      components: info.componentCount,
      nearLossless: decoder.getNearLossless?.(),
      reversible: decoder.getIsReversible?.(),
    };
  } catch (error) {
    throw codecFailure(what, error);
  } finally {
    decoder.delete();
  }
}

/** JPEG-LS (.80/.81) with CharLS (WASM). */
export async function decodeJpegLs(encoded: Uint8Array): Promise<CodecFrame> {
  const module = await loadCharls();
  return runWasm(new module.JpegLSDecoder(), encoded, 'JPEG-LS');
}

/** JPEG 2000 (.90/.91) with OpenJPEG (WASM); its signedness flag is ignored by the caller. */
export async function decodeJpeg2000(encoded: Uint8Array): Promise<CodecFrame> {
  const module = await loadOpenJpeg();
  return runWasm(new module.J2KDecoder(), encoded, 'JPEG 2000');
}

/** JPEG lossless process 14 (.57/.70) with jpeg-lossless-decoder-js. */
export function decodeJpegLossless(
  encoded: Uint8Array,
  width: number,
  height: number,
): CodecFrame {
  try {
    const decoder = new JpegLosslessDecoder();
    const copy = encoded.slice();
    const output = decoder.decompress(copy.buffer, 0, copy.length);
    const components = decoder.numComp || 1;
    const samples =
      (decoder.precision ?? 8) > 8
        ? new Uint16Array(output, 0, output.byteLength >> 1)
        : new Uint8Array(output);
    return { samples, width, height, components };
  } catch (error) {
    throw codecFailure('JPEG lossless', error);
  }
}

/** JPEG baseline (.50), 8-bit, with sharp (libjpeg-turbo). */
export async function decodeJpegBaseline(
  encoded: Uint8Array,
): Promise<CodecFrame> {
  const { default: sharp } = await import('sharp');
  try {
    // Without toColourspace, sharp turns a one-channel JPEG into three-channel sRGB.
    const { data, info } = await sharp(encoded)
      .toColourspace('b-w')
      .raw()
      .toBuffer({ resolveWithObject: true });
    return {
      samples: new Uint8Array(data.buffer, data.byteOffset, data.length),
      width: info.width,
      height: info.height,
      components: info.channels,
    };
  } catch (error) {
    throw codecFailure('JPEG baseline', error);
  }
}

const execFileAsync = promisify(execFile);

/**
 * Decompresses a whole JPEG Extended (12-bit, .51) file with dcmtk's
 * `dcmdjpeg`: no npm decoder handles 12-bit lossy JPEG. The file goes to a
 * private temporary folder, and the result comes back as explicit VR
 * little endian Part 10 bytes.
 *
 * @throws DicomError('unsupported_transfer_syntax') when dcmdjpeg is not
 *   installed; 'malformed_dicom' when it cannot decode the file.
 */
export async function decompressWithDcmdjpeg(
  file: Uint8Array,
): Promise<Uint8Array> {
  const dir = await mkdtemp(path.join(tmpdir(), 'lamella-dcmdjpeg-'));
  try {
    const input = path.join(dir, 'in.dcm');
    const output = path.join(dir, 'out.dcm');
    await writeFile(input, file);
    try {
      await execFileAsync('dcmdjpeg', ['+te', input, output], {
        timeout: 60_000,
      });
    } catch (error) {
      const failure = error as NodeJS.ErrnoException & { stderr?: string };
      if (failure.code === 'ENOENT') {
        throw new DicomError(
          'unsupported_transfer_syntax',
          "JPEG Extended (12-bit) needs dcmtk's dcmdjpeg, which is not installed (apt-get install -y dcmtk).",
        );
      }
      throw new DicomError(
        'malformed_dicom',
        `dcmtk's dcmdjpeg could not decode the JPEG Extended pixel data (${(failure.stderr ?? failure.message).trim().split('\n')[0]}).`,
      );
    }
    return new Uint8Array(await readFile(output));
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
