import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DomainError } from '../../../shared/errors.ts';
import { decodeDicom } from '../../../server/dicom/decode-dicom.ts';
import {
  dcmtk,
  phantomPixels,
  writePhantom,
} from '../../helpers/dicom-phantom.ts';

let dir: string;
const seeds: Uint8Array[] = [];

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'lamella-fuzz-'));
  const pixels = phantomPixels({
    rows: 24,
    columns: 32,
    bitsStored: 12,
    seed: 9,
  });
  const base = writePhantom(dir, 'base.dcm', pixels, 24, 32, {
    KVP: 70,
    BitsStored: 12,
  });
  seeds.push(new Uint8Array(readFileSync(base)));
  // Encapsulated variants so the codecs see broken input too.
  for (const [tool, args, name] of [
    ['dcmcrle', [], 'rle'],
    ['dcmcjpls', [], 'jls'],
    ['dcmcjpeg', ['+e1'], 'jpll'],
    ['dcmconv', ['+tb'], 'be'],
    ['dcmconv', ['+td'], 'deflate'],
    ['dcmconv', ['-F', '+ti'], 'bare'],
  ] as Array<[string, string[], string]>) {
    const out = path.join(dir, `${name}.dcm`);
    dcmtk(tool, [...args, base, out]);
    seeds.push(new Uint8Array(readFileSync(out)));
  }
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Decoding either succeeds with a consistent image or fails with a DomainError. */
async function decodesOrRejectsCleanly(bytes: Uint8Array): Promise<void> {
  try {
    const image = await decodeDicom(bytes);
    expect(image.pixels.length).toBe(image.rows * image.columns);
  } catch (error) {
    expect(error).toBeInstanceOf(DomainError);
  }
}

const mutation = fc.oneof(
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({
    kind: fc.constant('flip' as const),
    at: fc.nat(),
    xor: fc.integer({ min: 1, max: 255 }),
  }),
  fc.record({
    kind: fc.constant('overwrite' as const),
    at: fc.nat(),
    bytes: fc.uint8Array({ minLength: 1, maxLength: 8 }),
  }),
  fc.record({
    kind: fc.constant('insert' as const),
    at: fc.nat(),
    bytes: fc.uint8Array({ minLength: 1, maxLength: 8 }),
  }),
);
type Mutation = typeof mutation extends fc.Arbitrary<infer T> ? T : never;

function mutate(source: Uint8Array, mutations: Mutation[]): Uint8Array {
  let bytes = source.slice();
  for (const m of mutations) {
    const at = m.at % Math.max(1, bytes.length);
    if (m.kind === 'truncate') bytes = bytes.slice(0, at);
    else if (m.kind === 'flip') bytes[at] = bytes[at]! ^ m.xor;
    else if (m.kind === 'overwrite')
      bytes.set(m.bytes.subarray(0, bytes.length - at), at);
    else
      bytes = Uint8Array.from([
        ...bytes.subarray(0, at),
        ...m.bytes,
        ...bytes.subarray(at),
      ]);
  }
  return bytes;
}

describe('decodeDicom on mutated and truncated files (fast-check)', () => {
  it('only ever returns an image or throws a DomainError', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.nat(),
        fc.array(mutation, { minLength: 1, maxLength: 4 }),
        async (which, mutations) => {
          await decodesOrRejectsCleanly(
            mutate(seeds[which % seeds.length]!, mutations),
          );
        },
      ),
      { numRuns: 400, seed: 20261201 },
    );
  });

  it('handles every truncation point of the header and the first pixels', async () => {
    const base = seeds[0]!;
    for (let length = 0; length < 600; length += 1) {
      await decodesOrRejectsCleanly(base.subarray(0, length));
    }
  });

  it('handles arbitrary bytes', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.uint8Array({ maxLength: 2048 }),
        decodesOrRejectsCleanly,
      ),
      { numRuns: 200, seed: 7 },
    );
  });
});
