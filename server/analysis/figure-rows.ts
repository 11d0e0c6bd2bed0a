import type {
  ConditionFigures,
  SideFigures,
} from '../../shared/analysis/condition-figures.ts';
import type { Estimate } from '../../shared/analysis/estimate.ts';
import type { ConditionAnalysis } from './condition-analysis.service.ts';

/** One figure of one object in one condition, flat for tables and CSV. */
export interface FigureRow {
  station: string;
  kvp: number | null;
  thicknessMm: number | null;
  grid: string;
  gridExposureMas: number | null;
  noGridExposureMas: number | null;
  object: string;
  figure: string;
  value: number;
  standardError: number;
  ciLow: number;
  ciHigh: number;
  degreesOfFreedom: number | null;
  basis: string;
  images: number;
}

/** Condition-level figures in the order they are printed. */
export const CONDITION_FIGURES: ReadonlyArray<
  [keyof ConditionFigures, string]
> = [
  ['contrastImprovementFactor', 'contrast improvement factor (measured CIF)'],
  ['totalTransmission', 'total transmission Tt'],
  ['primaryTransmission', 'primary transmission Tp'],
  ['buckyFactor', 'Bucky factor B'],
  ['snrImprovementFactor', 'SNR improvement factor at equal dose'],
  ['doseSaving', 'dose saving at equal SNR'],
  ['imageImprovementFactor', 'image improvement factor Q'],
  ['scatterTransmission', 'scatter transmission Ts'],
  ['selectivity', 'selectivity Σ'],
  ['scatterToPrimaryRatio', 'SPR without grid (beam stop)'],
  ['scatterFraction', 'scatter fraction without grid'],
  ['predictedContrastImprovementFactor', 'predicted K from SPR, Tp, Ts'],
];

/** Per-side figures in the order they are printed. */
export const SIDE_FIGURES: ReadonlyArray<[keyof SideFigures, string]> = [
  ['contrast', 'contrast C'],
  ['cnr', 'CNR'],
  ['cnrPooled', 'CNR (pooled SD)'],
  ['snr', 'SNR'],
  ['cnrPerRootDose', 'CNR/√D'],
  ['figureOfMerit', 'FOM CNR²/D'],
];

function isEstimate(value: unknown): value is Estimate {
  return (
    typeof value === 'object' &&
    value !== null &&
    'ci95' in value &&
    'standardError' in value
  );
}

/**
 * Flattens a condition analysis into one row per figure with its interval:
 * per-side figures as "grid: CNR" / "no grid: CNR", then the condition
 * figures; figures that could not be computed are left out.
 */
export function figureRows(analysis: ConditionAnalysis): FigureRow[] {
  const c = analysis.condition;
  const base = {
    station: c.stationName ?? '',
    kvp: c.kvp,
    thicknessMm: c.bodyPartThicknessMm,
    grid: c.grid?.join('\\') ?? '',
    gridExposureMas: c.gridExposureMas,
    noGridExposureMas: c.noGridExposureMas,
  };
  const rows: FigureRow[] = [];
  const push = (object: string, figure: string, e: Estimate) =>
    rows.push({
      ...base,
      object,
      figure,
      value: e.value,
      standardError: e.standardError,
      ciLow: e.ci95.low,
      ciHigh: e.ci95.high,
      degreesOfFreedom: e.degreesOfFreedom,
      basis: e.basis,
      images: e.n,
    });
  for (const o of analysis.objects) {
    for (const [side, label] of [
      ['grid', 'grid'],
      ['noGrid', 'no grid'],
    ] as const) {
      for (const [key, name] of SIDE_FIGURES) {
        const e = o.figures[side][key];
        if (isEstimate(e)) push(o.name, `${label}: ${name}`, e);
      }
    }
    for (const [key, name] of CONDITION_FIGURES) {
      const e = o.figures[key];
      if (isEstimate(e)) push(o.name, name, e);
    }
  }
  return rows;
}
