import { execFileSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { writeDicom } from '../../server/dicom/write-dicom.ts';

/** Deterministic uniform [0, 1) generator (mulberry32). */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Options of {@link phantomPixels}. */
export interface PhantomOptions {
  rows: number;
  columns: number;
  /** Largest stored value + 1 is 2^bitsStored. */
  bitsStored: number;
  signed?: boolean;
  seed?: number;
}

/**
 * A synthetic flat-field phantom: a background with a left-to-right heel
 * gradient, three discs of lower signal (contrast objects) and Gaussian-ish
 * noise (sum of uniforms), clipped to the stored range. Deterministic.
 */
export function phantomPixels(
  options: PhantomOptions,
): Uint16Array | Int16Array {
  const { rows, columns, bitsStored, signed = false, seed = 1 } = options;
  const random = seededRandom(seed);
  const out = signed
    ? new Int16Array(rows * columns)
    : new Uint16Array(rows * columns);
  const low = signed ? -(2 ** (bitsStored - 1)) : 0;
  const high = signed ? 2 ** (bitsStored - 1) - 1 : 2 ** bitsStored - 1;
  const span = high - low;
  const discs = [
    {
      cx: columns * 0.3,
      cy: rows * 0.5,
      r: Math.min(rows, columns) * 0.12,
      drop: 0.2,
    },
    {
      cx: columns * 0.6,
      cy: rows * 0.35,
      r: Math.min(rows, columns) * 0.08,
      drop: 0.1,
    },
    {
      cx: columns * 0.7,
      cy: rows * 0.7,
      r: Math.min(rows, columns) * 0.05,
      drop: 0.35,
    },
  ];
  for (let y = 0; y < rows; y += 1) {
    for (let x = 0; x < columns; x += 1) {
      let level = 0.55 + 0.1 * (x / columns);
      for (const d of discs) {
        if ((x + 0.5 - d.cx) ** 2 + (y + 0.5 - d.cy) ** 2 <= d.r * d.r)
          level -= d.drop;
      }
      const noise = (random() + random() + random() - 1.5) * 0.03;
      const value = Math.round(low + span * (level + noise));
      out[y * columns + x] = Math.max(low, Math.min(high, value));
    }
  }
  return out;
}

/** Writes a phantom with writeDicom into `dir` and returns its path. */
export function writePhantom(
  dir: string,
  name: string,
  pixels: Uint16Array | Int16Array,
  rows: number,
  columns: number,
  attributes: Record<string, string | number | number[] | string[]>,
): string {
  const file = path.join(dir, name);
  writeFileSync(file, writeDicom({ rows, columns, pixels, attributes }));
  return file;
}

/**
 * Runs a dcmtk tool (installed from Debian's dcmtk package); fails with a
 * clear message when it is missing rather than skipping.
 */
export function dcmtk(tool: string, args: string[]): void {
  try {
    execFileSync(tool, args, { stdio: ['ignore', 'ignore', 'pipe'] });
  } catch (error) {
    const failure = error as NodeJS.ErrnoException & { stderr?: Buffer };
    if (failure.code === 'ENOENT') {
      throw new Error(
        `${tool} is missing: install Debian's dcmtk (apt-get install -y dcmtk).`,
        { cause: error },
      );
    }
    throw new Error(
      `${tool} ${args.join(' ')} failed: ${failure.stderr?.toString() ?? failure.message}`,
      { cause: error },
    );
  }
}
