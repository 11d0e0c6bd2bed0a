import type { ConditionFigures } from './analysis/condition-figures.ts';
import type { Estimate } from './analysis/estimate.ts';

/** A condition figure stored, compared, charted and exported. */
export interface FigureDefinition {
  key: FigureKey;
  label: string;
  symbol: string;
  /** Unit for CSV and tables; '1' for a dimensionless ratio. */
  unit: string;
  pick: (f: ConditionFigures) => Estimate | null;
}

export const FIGURE_KEYS = [
  'contrast_improvement_factor',
  'snr_improvement_factor',
  'bucky_factor',
  'total_transmission',
  'primary_transmission',
  'dose_saving',
  'image_improvement_factor',
  'scatter_transmission',
  'selectivity',
  'scatter_to_primary_ratio',
  'scatter_fraction',
  'predicted_contrast_improvement_factor',
  'contrast_grid',
  'contrast_no_grid',
  'cnr_grid',
  'cnr_no_grid',
  'snr_grid',
  'snr_no_grid',
] as const;
export type FigureKey = (typeof FIGURE_KEYS)[number];

/** Every stored figure, in the order tables and exports show them. */
export const FIGURES: readonly FigureDefinition[] = [
  {
    key: 'contrast_improvement_factor',
    label: 'Contrast improvement factor (measured)',
    symbol: 'CIF',
    unit: '1',
    pick: (f) => f.contrastImprovementFactor,
  },
  {
    key: 'snr_improvement_factor',
    label: 'SNR improvement factor at equal dose',
    symbol: 'SIF',
    unit: '1',
    pick: (f) => f.snrImprovementFactor,
  },
  {
    key: 'bucky_factor',
    label: 'Bucky factor',
    symbol: 'B',
    unit: '1',
    pick: (f) => f.buckyFactor,
  },
  {
    key: 'total_transmission',
    label: 'Total transmission',
    symbol: 'Tt',
    unit: '1',
    pick: (f) => f.totalTransmission,
  },
  {
    key: 'primary_transmission',
    label: 'Primary transmission',
    symbol: 'Tp',
    unit: '1',
    pick: (f) => f.primaryTransmission,
  },
  {
    key: 'dose_saving',
    label: 'Dose saving at equal SNR',
    symbol: '1−1/SIF²',
    unit: '1',
    pick: (f) => f.doseSaving,
  },
  {
    key: 'image_improvement_factor',
    label: 'Image improvement factor',
    symbol: 'Q',
    unit: '1',
    pick: (f) => f.imageImprovementFactor,
  },
  {
    key: 'scatter_transmission',
    label: 'Scatter transmission',
    symbol: 'Ts',
    unit: '1',
    pick: (f) => f.scatterTransmission,
  },
  {
    key: 'selectivity',
    label: 'Selectivity',
    symbol: 'Σ',
    unit: '1',
    pick: (f) => f.selectivity,
  },
  {
    key: 'scatter_to_primary_ratio',
    label: 'Scatter-to-primary ratio (no grid)',
    symbol: 'SPR',
    unit: '1',
    pick: (f) => f.scatterToPrimaryRatio,
  },
  {
    key: 'scatter_fraction',
    label: 'Scatter fraction (no grid)',
    symbol: 'SF',
    unit: '1',
    pick: (f) => f.scatterFraction,
  },
  {
    key: 'predicted_contrast_improvement_factor',
    label: 'Contrast improvement factor predicted from SPR, Tp, Ts',
    symbol: 'K(pred)',
    unit: '1',
    pick: (f) => f.predictedContrastImprovementFactor,
  },
  {
    key: 'contrast_grid',
    label: 'Contrast with grid',
    symbol: 'C grid',
    unit: '1',
    pick: (f) => f.grid.contrast,
  },
  {
    key: 'contrast_no_grid',
    label: 'Contrast without grid',
    symbol: 'C no grid',
    unit: '1',
    pick: (f) => f.noGrid.contrast,
  },
  {
    key: 'cnr_grid',
    label: 'CNR with grid',
    symbol: 'CNR grid',
    unit: '1',
    pick: (f) => f.grid.cnr,
  },
  {
    key: 'cnr_no_grid',
    label: 'CNR without grid',
    symbol: 'CNR no grid',
    unit: '1',
    pick: (f) => f.noGrid.cnr,
  },
  {
    key: 'snr_grid',
    label: 'SNR with grid',
    symbol: 'SNR grid',
    unit: '1',
    pick: (f) => f.grid.snr,
  },
  {
    key: 'snr_no_grid',
    label: 'SNR without grid',
    symbol: 'SNR no grid',
    unit: '1',
    pick: (f) => f.noGrid.snr,
  },
];

/** Looks up a figure's definition. */
export const figureDefinition = (key: FigureKey): FigureDefinition =>
  FIGURES.find((f) => f.key === key)!;

/**
 * The stored figures of a condition analysis: one entry per figure that
 * could be computed (figures needing absent inputs are left out, not zero).
 */
export function flattenConditionFigures(
  figures: ConditionFigures,
): Array<{ key: FigureKey; estimate: Estimate }> {
  return FIGURES.flatMap((d) => {
    const estimate = d.pick(figures);
    return estimate ? [{ key: d.key, estimate }] : [];
  });
}
