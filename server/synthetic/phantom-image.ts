import { DomainError } from '../../shared/errors.ts';
import { createSeededRandom } from './seeded-random.ts';

/**
 * Synthetic phantom radiographs with known physics, for tests, the benchmark
 * and the demo: a uniform slab (primary P and scatter S = SPR·P at the
 * detector), a thin contrast disc that removes a known fraction of the
 * primary only, optional lead discs whose shadows hold scatter only, an
 * optional heel-effect ramp and grid-line pattern, quantum noise and a
 * detector response.
 */

/** Detector response: stored pixel value PV as a function of air kerma K (µGy). */
export type DetectorResponse =
  | { model: 'linear'; offset: number; gainPerUgy: number }
  | { model: 'logarithmic'; a: number; b: number }
  | { model: 'power'; a: number; b: number };

/** A lead disc on the phantom's entrance surface (beam stop). */
export interface LeadDisc {
  /** Centre in pixels (pixel-centre coordinates). */
  cx: number;
  cy: number;
  diameterMm: number;
}

/** Everything that determines one synthetic image. */
export interface PhantomSpec {
  columns: number;
  rows: number;
  /** PRNG seed: equal specs give identical images. */
  seed: number;
  /** Square pixel spacing at the detector, mm. */
  pixelSpacingMm: number;
  exposureMas: number;
  /** Primary air kerma at the detector without grid, µGy per mAs. */
  primaryKermaUgyPerMas: number;
  /** Scatter-to-primary ratio without grid, S/P. */
  scatterToPrimaryRatio: number;
  /** Grid transmissions, or null for an exposure without grid. */
  grid: { primaryTransmission: number; scatterTransmission: number } | null;
  /**
   * Air kerma per detected quantum, µGy: the noise variance is K times this
   * (Poisson statistics); 0 gives a noise-free image.
   */
  kermaPerQuantumUgy: number;
  /** Thin disc removing primaryContrast (0–1) of the primary inside it. */
  object: {
    cx: number;
    cy: number;
    radiusPx: number;
    primaryContrast: number;
  } | null;
  /** Fractional change of P and S per pixel along x, about the image centre. */
  heelGradientPerPx?: number;
  /**
   * Fixed grid-line pattern: the signal is multiplied by
   * 1 + amplitude·sin(2π·x/periodPx), the same in every replicate.
   */
  gridLinePattern?: { periodPx: number; amplitude: number };
  leadDiscs?: LeadDisc[];
  /** Fraction of the local scatter lost per mm of lead-disc diameter. */
  scatterLossPerMm?: number;
  response: DetectorResponse;
  /** Bits Stored; values are clipped to 0 … 2^bits − 1. Default 16. */
  bitsStored?: number;
}

/** Air kerma components at the image centre (no heel ramp), µGy. */
export interface PhantomTruth {
  primaryUgy: number;
  scatterUgy: number;
  totalUgy: number;
  /** Total behind the contrast disc. */
  objectTotalUgy: number;
  /** Scatter behind a lead disc of the given diameter. */
  scatterBehindDiscUgy: (diameterMm: number) => number;
}

/** Default loss of local scatter per mm of lead-disc diameter (invented). */
export const DEFAULT_SCATTER_LOSS_PER_MM = 0.004;

/**
 * The exact air kerma components the spec describes, at the image centre:
 * P = P₀·mAs·Tp, S = SPR·P₀·mAs·Ts (Tp = Ts = 1 without grid).
 */
export function phantomTruth(spec: PhantomSpec): PhantomTruth {
  const primaryOpen = spec.primaryKermaUgyPerMas * spec.exposureMas;
  const tp = spec.grid?.primaryTransmission ?? 1;
  const ts = spec.grid?.scatterTransmission ?? 1;
  const primaryUgy = primaryOpen * tp;
  const scatterUgy = primaryOpen * spec.scatterToPrimaryRatio * ts;
  const contrast = spec.object?.primaryContrast ?? 0;
  const loss = spec.scatterLossPerMm ?? DEFAULT_SCATTER_LOSS_PER_MM;
  return {
    primaryUgy,
    scatterUgy,
    totalUgy: primaryUgy + scatterUgy,
    objectTotalUgy: primaryUgy * (1 - contrast) + scatterUgy,
    scatterBehindDiscUgy: (d) => scatterUgy * Math.max(0, 1 - loss * d),
  };
}

/** Stored value of an air kerma under a detector response (unrounded). */
export function pixelValueForKerma(
  response: DetectorResponse,
  kermaUgy: number,
): number {
  switch (response.model) {
    case 'linear':
      return response.offset + response.gainPerUgy * kermaUgy;
    case 'logarithmic':
      return response.a + response.b * Math.log(kermaUgy);
    case 'power':
      return response.a * kermaUgy ** response.b;
  }
}

function checkSpec(spec: PhantomSpec): void {
  const positive = {
    columns: spec.columns,
    rows: spec.rows,
    pixelSpacingMm: spec.pixelSpacingMm,
    exposureMas: spec.exposureMas,
    primaryKermaUgyPerMas: spec.primaryKermaUgyPerMas,
  };
  for (const [name, value] of Object.entries(positive)) {
    if (!(value > 0) || !Number.isFinite(value)) {
      throw new DomainError(
        'validation_failed',
        `Phantom ${name} must be positive.`,
      );
    }
  }
  if (!Number.isInteger(spec.columns) || !Number.isInteger(spec.rows)) {
    throw new DomainError(
      'validation_failed',
      'Phantom size must be whole pixels.',
    );
  }
  if (!(spec.scatterToPrimaryRatio >= 0) || !(spec.kermaPerQuantumUgy >= 0)) {
    throw new DomainError(
      'validation_failed',
      'Phantom SPR and kerma per quantum must not be negative.',
    );
  }
}

/**
 * Renders the image row by row: for each pixel the primary and scatter air
 * kerma (with heel ramp, grid-line pattern, contrast disc and lead-disc
 * shadows), Gaussian
 * quantum noise of variance K·kermaPerQuantum, then the detector response,
 * rounded and clipped to Bits Stored.
 * @returns row-major stored values, columns × rows.
 * @throws DomainError('validation_failed') for an impossible spec.
 */
export function renderPhantomImage(spec: PhantomSpec): Uint16Array {
  checkSpec(spec);
  const { columns, rows } = spec;
  const random = createSeededRandom(spec.seed);
  const truth = phantomTruth(spec);
  const maxValue = 2 ** (spec.bitsStored ?? 16) - 1;
  const gradient = spec.heelGradientPerPx ?? 0;
  const loss = spec.scatterLossPerMm ?? DEFAULT_SCATTER_LOSS_PER_MM;
  const discs = (spec.leadDiscs ?? []).map((d) => ({
    cx: d.cx,
    cy: d.cy,
    r2: (d.diameterMm / 2 / spec.pixelSpacingMm) ** 2,
    scatterFactor: Math.max(0, 1 - loss * d.diameterMm),
  }));
  const object = spec.object;
  const objectR2 = object ? object.radiusPx ** 2 : 0;
  const q = spec.kermaPerQuantumUgy;
  // The smallest kerma kept positive so a logarithmic response stays finite.
  const floorUgy = truth.totalUgy * 1e-6;
  const pixels = new Uint16Array(columns * rows);
  const centreX = columns / 2;
  const pattern = new Float64Array(columns);
  for (let x = 0; x < columns; x += 1) {
    const lines = spec.gridLinePattern;
    pattern[x] =
      (1 + gradient * (x + 0.5 - centreX)) *
      (lines
        ? 1 +
          lines.amplitude * Math.sin((2 * Math.PI * (x + 0.5)) / lines.periodPx)
        : 1);
  }
  for (let y = 0; y < rows; y += 1) {
    const yc = y + 0.5;
    for (let x = 0; x < columns; x += 1) {
      const xc = x + 0.5;
      const heel = pattern[x]!;
      let primary = truth.primaryUgy * heel;
      let scatter = truth.scatterUgy * heel;
      if (object) {
        const dx = xc - object.cx;
        const dy = yc - object.cy;
        if (dx * dx + dy * dy <= objectR2)
          primary *= 1 - object.primaryContrast;
      }
      for (const disc of discs) {
        const dx = xc - disc.cx;
        const dy = yc - disc.cy;
        if (dx * dx + dy * dy <= disc.r2) {
          primary = 0;
          scatter *= disc.scatterFactor;
        }
      }
      const mean = primary + scatter;
      const kerma = q > 0 ? mean + Math.sqrt(q * mean) * random.normal() : mean;
      const value = Math.round(
        pixelValueForKerma(spec.response, Math.max(kerma, floorUgy)),
      );
      pixels[y * columns + x] =
        value < 0 ? 0 : value > maxValue ? maxValue : value;
    }
  }
  return pixels;
}
