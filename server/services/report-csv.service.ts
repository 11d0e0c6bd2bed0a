import { stringify } from 'csv-stringify/sync';
import {
  FIELD_VALUE_LABEL,
  PREDICTED_VALUE_LABEL,
} from '../../shared/compare/field-vs-stated.ts';
import {
  FIGURES,
  figureDefinition,
  type FigureKey,
} from '../../shared/figures.ts';
import type { CompareConditionDto } from '../../shared/schemas/compare.schema.ts';

/**
 * CSV export of the figures of a study or of a board selection: one row per
 * condition and figure, with units, the 95 % interval and the method. UTF-8
 * with a byte-order mark so spreadsheet programs read µ, Σ and ± correctly;
 * numbers are written in full precision with a dot, so the file parses back
 * to the same values. Measured rows are field values; predicted rows (from
 * the grid's construction) have no interval.
 */

/** The header row, in order. */
export const CSV_COLUMNS = [
  'study_id',
  'study_title',
  'study_status',
  'study_revision',
  'study_date',
  'signed_by',
  'room',
  'detector',
  'grid',
  'grid_ratio',
  'condition_id',
  'condition',
  'kvp_kv',
  'added_filtration',
  'hvl_mm_al',
  'phantom_material',
  'phantom_thickness_cm',
  'figure_key',
  'figure',
  'symbol',
  'unit',
  'value_kind',
  'value',
  'standard_error',
  'ci95_low',
  'ci95_high',
  'degrees_of_freedom',
  'n_images',
  'uncertainty_basis',
  'cnr_definition',
  'dose_measure',
  'signal',
  'uncertainty_method',
  'verdict',
  'baseline_value',
  'tolerance_percent',
  'baseline_flag',
] as const;

type CsvRow = Record<(typeof CSV_COLUMNS)[number], string | number | null>;

function conditionColumns(c: CompareConditionDto) {
  return {
    study_id: c.study.id,
    study_title: c.study.title,
    study_status: c.study.status,
    study_revision: c.study.revision,
    study_date: c.study.date,
    signed_by: c.study.signedBy,
    room: c.room.name,
    detector: c.detector?.name ?? null,
    grid: c.grid.label,
    grid_ratio: c.grid.ratio,
    condition_id: c.conditionId,
    condition: c.label,
    kvp_kv: c.kvp,
    added_filtration: c.filtration,
    hvl_mm_al: c.hvlMmAl,
    phantom_material: c.phantomMaterial,
    phantom_thickness_cm: c.phantomThicknessCm,
    cnr_definition: c.method?.cnr ?? c.method?.cnrDefinition ?? null,
    dose_measure: c.method?.doseLabel ?? c.method?.doseMeasure ?? null,
    signal: c.method?.signal.join('; ') || null,
    uncertainty_method: c.method?.uncertainty ?? null,
    verdict: c.verdict.sentence,
  };
}

const PREDICTED_FIGURES: Array<
  [
    FigureKey,
    (p: NonNullable<CompareConditionDto['predicted']>) => number | null,
  ]
> = [
  ['primary_transmission', (p) => p.primaryTransmission],
  ['scatter_transmission', (p) => p.scatterTransmission],
  ['selectivity', (p) => p.selectivity],
  ['total_transmission', (p) => p.withMeasuredSpr?.totalTransmission ?? null],
  [
    'contrast_improvement_factor',
    (p) => p.withMeasuredSpr?.contrastImprovementFactor ?? null,
  ],
  ['bucky_factor', (p) => p.withMeasuredSpr?.buckyFactor ?? null],
  [
    'snr_improvement_factor',
    (p) => p.withMeasuredSpr?.snrImprovementFactor ?? null,
  ],
];

/** The rows of one condition: its measured figures, then predicted ones. */
export function conditionCsvRows(c: CompareConditionDto): CsvRow[] {
  const base = conditionColumns(c);
  const rows: CsvRow[] = [];
  for (const d of FIGURES) {
    const f = c.figures[d.key];
    if (!f) continue;
    const flag = c.baseline?.flags.find((x) => x.figure === d.key) ?? null;
    rows.push({
      ...base,
      figure_key: d.key,
      figure: d.label,
      symbol: d.symbol,
      unit: d.unit,
      value_kind: FIELD_VALUE_LABEL,
      value: f.value,
      standard_error: f.standardError,
      ci95_low: f.ciLow,
      ci95_high: f.ciHigh,
      degrees_of_freedom: f.degreesOfFreedom,
      n_images: f.n,
      uncertainty_basis: f.basis,
      baseline_value: flag?.baselineValue ?? null,
      tolerance_percent: flag?.tolerancePercent ?? null,
      baseline_flag: c.baseline?.isSource ? 'baseline' : (flag?.status ?? null),
    });
  }
  if (c.predicted) {
    for (const [key, pick] of PREDICTED_FIGURES) {
      const value = pick(c.predicted);
      if (value === null) continue;
      const d = figureDefinition(key);
      rows.push({
        ...base,
        figure_key: key,
        figure: d.label,
        symbol: d.symbol,
        unit: d.unit,
        value_kind: PREDICTED_VALUE_LABEL,
        value,
        standard_error: null,
        ci95_low: null,
        ci95_high: null,
        degrees_of_freedom: null,
        n_images: null,
        uncertainty_basis: null,
        cnr_definition: null,
        dose_measure: null,
        signal: null,
        uncertainty_method: c.predicted.assumptions,
        verdict: null,
        baseline_value: null,
        tolerance_percent: null,
        baseline_flag: null,
      });
    }
  }
  return rows;
}

/**
 * The CSV text (with BOM) of every figure of the conditions.
 * @returns UTF-8 text starting with U+FEFF, CRLF line ends, a header row.
 */
export function figuresCsv(conditions: readonly CompareConditionDto[]): string {
  return stringify(conditions.flatMap(conditionCsvRows), {
    bom: true,
    header: true,
    columns: [...CSV_COLUMNS],
    record_delimiter: 'windows',
    cast: { number: (value) => String(value) },
  });
}
