import type {
  CalibrationFit,
  CalibrationModel,
  CalibrationPoint,
} from '../../../../shared/analysis/detector-calibration.ts';
import { formatNumber } from './format.ts';

/** How each model reads, for labels. */
export const MODEL_LABELS: Record<CalibrationModel, string> = {
  linear: 'Linear',
  logarithmic: 'Logarithmic',
  power: 'Power',
};

/** The fitted function written out with its parameters. */
export function modelEquation(
  fit: Pick<CalibrationFit, 'model' | 'a' | 'b'>,
): string {
  const a = formatNumber(fit.a, 5);
  const b = formatNumber(fit.b, 5);
  switch (fit.model) {
    case 'linear':
      return `PV = ${a} + ${b}·K`;
    case 'logarithmic':
      return `PV = ${a} + ${b}·ln K`;
    case 'power':
      return `PV = ${a}·K^${b}`;
  }
}

// The forward forms of shared/analysis/detector-calibration.ts, evaluated
// only to draw the fitted curve.
const FORWARD: Record<
  CalibrationModel,
  (a: number, b: number, k: number) => number
> = {
  linear: (a, b, k) => a + b * k,
  logarithmic: (a, b, k) => a + b * Math.log(k),
  power: (a, b, k) => a * k ** b,
};

/** Points along the fitted curve across the measured air kerma range (µGy). */
export function fittedCurve(
  fit: Pick<CalibrationFit, 'model' | 'a' | 'b'>,
  points: readonly CalibrationPoint[],
  samples = 60,
): CalibrationPoint[] {
  const kermas = points.map((p) => p.airKermaUgy);
  const low = Math.min(...kermas);
  const high = Math.max(...kermas);
  return Array.from({ length: samples }, (_, i) => {
    const airKermaUgy = low + ((high - low) * i) / (samples - 1);
    return {
      airKermaUgy,
      meanPixelValue: FORWARD[fit.model](fit.a, fit.b, airKermaUgy),
    };
  }).filter((p) => Number.isFinite(p.meanPixelValue));
}
