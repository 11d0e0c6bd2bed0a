import {
  calibrationForward,
  type CalibrationFit,
  type CalibrationModel,
  type CalibrationPoint,
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
      meanPixelValue: calibrationForward(fit, airKermaUgy),
    };
  }).filter((p) => Number.isFinite(p.meanPixelValue));
}
