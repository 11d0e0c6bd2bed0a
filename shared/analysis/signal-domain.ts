import { invertedSignalLut } from '../dicom/signal-polarity.ts';
import { DomainError } from '../errors.ts';
import type {
  PixelArray,
  SignalLookupTable,
} from '../roi/region-statistics.ts';
import type { CalibrationFit } from './detector-calibration.ts';
import {
  airKermaFromPixelValue,
  calibrationLookupTable,
} from './detector-calibration.ts';

/** How stored values were turned into the signal the figures use. */
export type SignalMethod =
  | 'stored-values'
  | 'inverted-stored-values'
  | 'calibrated-linear'
  | 'calibrated-logarithmic'
  | 'calibrated-power';

/** The facts of an image that decide its signal domain. */
export interface SignalSource {
  pixels: PixelArray;
  bitsStored: number;
  photometricInterpretation: string;
  /** LIN or LOG (0028,1040), null when absent. */
  pixelIntensityRelationship: string | null;
  /**
   * Stored values fall as intensity rises (Sign −1, or MONOCHROME1 without a
   * sign), as the decoder decides it (`DecodedImage.signalInverted`).
   */
  signalInverted: boolean;
}

/**
 * Ingest warnings that a detector calibration answers: once the calibration
 * is applied they no longer hold, so analyses drop them.
 */
export const WARNINGS_RESOLVED_BY_CALIBRATION: readonly string[] = [
  'log_relationship_uncalibrated',
  'inverted_sign',
  'monochrome1',
];

/**
 * The signal of an image: its pixels (the same buffer unless float data had
 * to be transformed) and, for integer data, a lookup table
 * signal = table[value + offset], or null when stored values are used as
 * they are.
 */
export interface SignalDomain {
  pixels: PixelArray;
  lut: SignalLookupTable | null;
  method: SignalMethod;
  description: string;
}

function integerRange(pixels: PixelArray): [number, number] | null {
  if (pixels instanceof Uint8Array) return [0, 255];
  if (pixels instanceof Int8Array) return [-128, 127];
  if (pixels instanceof Uint16Array) return [0, 65535];
  if (pixels instanceof Int16Array) return [-32768, 32767];
  if (pixels instanceof Int32Array || pixels instanceof Uint32Array) {
    let min = Infinity;
    let max = -Infinity;
    for (let i = 0; i < pixels.length; i += 1) {
      const v = pixels[i]!;
      if (v < min) min = v;
      if (v > max) max = v;
    }
    return [min, max];
  }
  return null;
}

function mapped(
  source: SignalSource,
  inverse: (value: number) => number,
): Pick<SignalDomain, 'pixels' | 'lut'> {
  const range = integerRange(source.pixels);
  if (range) {
    const [min, max] = range;
    if (max - min + 1 > 1 << 24) {
      throw new DomainError(
        'analysis_failed',
        `Stored values span ${min}..${max}, too wide for a linearisation table.`,
      );
    }
    const table = new Float64Array(max - min + 1);
    for (let i = 0; i < table.length; i += 1) table[i] = inverse(min + i);
    return { pixels: source.pixels, lut: { table, offset: -min } };
  }
  // Float data cannot be tabled; it is transformed once into a new buffer.
  const out = new Float64Array(source.pixels.length);
  for (let i = 0; i < out.length; i += 1) out[i] = inverse(source.pixels[i]!);
  return { pixels: out, lut: null };
}

/**
 * Decides the signal domain of an image so that figures are computed on a
 * signal proportional to detector air kerma where possible:
 * - with a detector calibration: its inverse (air kerma in µGy), which also
 *   answers LOG data and inverted sign (the calibration was fitted on the
 *   stored values as they are);
 * - otherwise inverted data: (2^BitsStored − 1) − value, the rule of the
 *   ingest warnings `inverted_sign` / `monochrome1`;
 * - otherwise stored values as they are (for LOG data the ingest warning
 *   `log_relationship_uncalibrated` says they are not linear).
 * The ingest warnings travel with the image, so none is repeated here.
 * @param source the image facts.
 * @param calibration the detector's fitted conversion function, if any.
 * @throws DomainError('analysis_failed') when no table can cover the data.
 * @see DICOM PS3.3 C.7.6.1.1 and C.8.11.3 (Pixel Intensity Relationship);
 *   IEC 62220-1-1:2015 (linearisation); PHYSICS.md §4.
 */
export function signalDomain(
  source: SignalSource,
  calibration?: CalibrationFit | null,
): SignalDomain {
  if (calibration) {
    const range = integerRange(source.pixels);
    const result = range
      ? {
          pixels: source.pixels,
          lut: calibrationLookupTable(calibration, range[0], range[1]),
        }
      : mapped(source, (v) => airKermaFromPixelValue(calibration, v));
    return {
      ...result,
      method: `calibrated-${calibration.model}`,
      description: `air kerma (µGy) by the inverse of the ${calibration.model} detector calibration (R² ${calibration.rSquared.toFixed(5)})`,
    };
  }
  const logarithmic =
    source.pixelIntensityRelationship?.toUpperCase() === 'LOG';
  if (source.signalInverted) {
    const top = 2 ** source.bitsStored - 1;
    const integer8or16 =
      source.pixels instanceof Uint8Array ||
      source.pixels instanceof Int8Array ||
      source.pixels instanceof Uint16Array ||
      source.pixels instanceof Int16Array;
    return {
      ...(integer8or16
        ? {
            pixels: source.pixels,
            lut: invertedSignalLut(source.pixels, source.bitsStored),
          }
        : mapped(source, (v) => top - v)),
      method: 'inverted-stored-values',
      description: `${top} − stored value (2^BitsStored − 1 − value)${logarithmic ? ', logarithmic, not linearised' : ''}`,
    };
  }
  return {
    pixels: source.pixels,
    lut: null,
    method: 'stored-values',
    description: logarithmic
      ? 'stored values (logarithmic, not linearised)'
      : 'stored values (linear detector assumed)',
  };
}
