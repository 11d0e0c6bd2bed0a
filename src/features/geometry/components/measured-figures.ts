import type { FigureKey } from '../../../../shared/figures.ts';
import type { MeasuredFigures } from './predicted-figures-panel.tsx';

/** The stored figure keys that have a predicted counterpart. */
const PREDICTED_COUNTERPART: Partial<Record<FigureKey, keyof MeasuredFigures>> =
  {
    primary_transmission: 'primaryTransmission',
    scatter_transmission: 'scatterTransmission',
    total_transmission: 'totalTransmission',
    contrast_improvement_factor: 'contrastImprovementFactor',
    bucky_factor: 'buckyFactor',
    selectivity: 'selectivity',
    snr_improvement_factor: 'snrImprovementFactor',
    image_improvement_factor: 'imageImprovementFactor',
  };

/**
 * Measured figures of one condition, as stored rows (key and value), in the
 * shape {@link PredictedFiguresPanel} sets beside the prediction.
 */
export function measuredFromFigures(
  figures: readonly { key: FigureKey; value: number }[],
): MeasuredFigures {
  const measured: MeasuredFigures = {};
  for (const figure of figures) {
    const key = PREDICTED_COUNTERPART[figure.key];
    if (key) measured[key] = figure.value;
  }
  return measured;
}
