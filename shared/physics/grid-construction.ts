import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';

/**
 * Construction of a linear anti-scatter grid: strip height h, interspace
 * width D, strip thickness t, ratio r = h/D and strip frequency
 * N = 1/(D + t). Lengths are in µm, so N = 10 000 / (D + t) lines/cm.
 *
 * @see IAEA, Diagnostic Radiology Physics: A Handbook for Teachers and
 *   Students (2014), §6.3.4; PHYSICS.md §1.
 */

/** µm per cm, for N = 10 000 / (D + t). */
const UM_PER_CM = 10_000;

/** The five construction quantities, any of which may be known. */
export interface GridConstructionInput {
  /** Grid ratio r = h / D (dimensionless). */
  ratio?: number;
  /** Strip frequency N, lines per cm. */
  stripFrequencyPerCm?: number;
  /** Strip (lamella) height h, µm. */
  stripHeightUm?: number;
  /** Interspace width D, µm. */
  interspaceWidthUm?: number;
  /** Strip thickness t, µm. */
  stripThicknessUm?: number;
}

/** The name of one construction quantity. */
export type GridQuantity = keyof GridConstructionInput;

/** A fully known construction. */
export interface GridConstruction extends Required<GridConstructionInput> {
  /** Period P = D + t, µm. */
  periodUm: number;
  /** Open fraction D / P. */
  openFraction: number;
}

/** What {@link deriveGridConstruction} could work out. */
export interface GridConstructionDerivation {
  /** Known and derived quantities. */
  values: GridConstructionInput;
  /** Quantities the input was not enough to derive. */
  missing: GridQuantity[];
  /** The complete construction, when nothing is missing. */
  construction?: GridConstruction;
}

const QUANTITY_LABELS: Record<GridQuantity, string> = {
  ratio: 'grid ratio',
  stripFrequencyPerCm: 'strip frequency (lines/cm)',
  stripHeightUm: 'strip height (µm)',
  interspaceWidthUm: 'interspace width (µm)',
  stripThicknessUm: 'strip thickness (µm)',
};

/**
 * Relative disagreement allowed between given values before they count as
 * inconsistent: makers round the ratio and frequency they state (a "12:1,
 * 40 lines/cm" grid is rarely exactly that).
 */
export const CONSISTENCY_TOLERANCE = 0.02;

function requirePositiveInputs(input: GridConstructionInput): void {
  for (const [key, value] of Object.entries(input)) {
    if (value === undefined) continue;
    if (!(value > 0) || !Number.isFinite(value)) {
      throw new DomainError(
        'validation_failed',
        `The ${QUANTITY_LABELS[key as GridQuantity]} must be a positive number, got ${value}.`,
      );
    }
  }
}

/**
 * One pass of P = D + t = 10 000/N, then r = h/D, filling unknowns only. The
 * period goes first because a stated pitch and strip thickness are usually
 * exact while a stated ratio is rounded.
 */
function propagate(values: GridConstructionInput): boolean {
  const before = JSON.stringify(values);
  const n = values.stripFrequencyPerCm;
  const t = values.stripThicknessUm;
  const d = values.interspaceWidthUm;
  const period =
    n !== undefined
      ? UM_PER_CM / n
      : d !== undefined && t !== undefined
        ? d + t
        : undefined;
  if (period !== undefined) {
    if (n === undefined) values.stripFrequencyPerCm = UM_PER_CM / period;
    if (t === undefined && d !== undefined) {
      values.stripThicknessUm = period - d;
    }
    if (d === undefined && t !== undefined) {
      values.interspaceWidthUm = period - t;
    }
  }
  const { ratio: r, stripHeightUm: h, interspaceWidthUm: dNow } = values;
  if (r === undefined && h !== undefined && dNow !== undefined) {
    values.ratio = h / dNow;
  } else if (h === undefined && r !== undefined && dNow !== undefined) {
    values.stripHeightUm = r * dNow;
  } else if (dNow === undefined && r !== undefined && h !== undefined) {
    values.interspaceWidthUm = h / r;
  }
  return JSON.stringify(values) !== before;
}

function relativeDifference(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b));
}

function checkConsistency(
  values: GridConstructionInput,
  tolerance: number,
): void {
  const { ratio, stripHeightUm, interspaceWidthUm, stripThicknessUm } = values;
  const n = values.stripFrequencyPerCm;
  if (interspaceWidthUm !== undefined && !(interspaceWidthUm > 0)) {
    throw new DomainError(
      'validation_failed',
      'These values leave no room for the interspace: the strip thickness is at least the period 1/N.',
    );
  }
  if (stripThicknessUm !== undefined && !(stripThicknessUm > 0)) {
    throw new DomainError(
      'validation_failed',
      'These values leave no room for the strips: the interspace width is at least the period 1/N.',
    );
  }
  if (
    ratio !== undefined &&
    stripHeightUm !== undefined &&
    interspaceWidthUm !== undefined &&
    relativeDifference(ratio, stripHeightUm / interspaceWidthUm) > tolerance
  ) {
    throw new DomainError(
      'validation_failed',
      `Inconsistent construction: ratio ${ratio} but h/D = ${stripHeightUm} / ${interspaceWidthUm} = ${(stripHeightUm / interspaceWidthUm).toFixed(3)}.`,
    );
  }
  if (
    n !== undefined &&
    interspaceWidthUm !== undefined &&
    stripThicknessUm !== undefined &&
    relativeDifference(n, UM_PER_CM / (interspaceWidthUm + stripThicknessUm)) >
      tolerance
  ) {
    throw new DomainError(
      'validation_failed',
      `Inconsistent construction: ${n} lines/cm but 1/(D + t) = 10 000 / (${interspaceWidthUm} + ${stripThicknessUm}) = ${(UM_PER_CM / (interspaceWidthUm + stripThicknessUm)).toFixed(2)} lines/cm.`,
    );
  }
}

/**
 * Derives every construction quantity the given ones determine, from
 * r = h/D and N = 1/(D + t). Three independent values fix the grid; fewer
 * leave some quantities in `missing`. Given values are kept as given; when
 * more than three are given they must agree within the tolerance.
 * @param input any subset of r, N, h, D, t (lengths in µm, N in lines/cm).
 * @param tolerance relative disagreement allowed between over-determined
 *   values (default {@link CONSISTENCY_TOLERANCE}).
 * @returns known and derived values, what is missing, and the complete
 *   construction when nothing is.
 * @throws DomainError('validation_failed') for a non-positive value, for
 *   values that disagree by more than the tolerance, or for a strip thickness
 *   or interspace that would come out zero or negative.
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4; PHYSICS.md §1.
 */
export function deriveGridConstruction(
  input: GridConstructionInput,
  tolerance: number = CONSISTENCY_TOLERANCE,
): GridConstructionDerivation {
  requirePositiveInputs(input);
  const values: GridConstructionInput = Object.fromEntries(
    Object.entries(input).filter(([, value]) => value !== undefined),
  );
  while (propagate(values));
  checkConsistency(values, tolerance);
  const missing = (Object.keys(QUANTITY_LABELS) as GridQuantity[]).filter(
    (key) => values[key] === undefined,
  );
  if (missing.length > 0) return { values, missing };
  const complete = values as Required<GridConstructionInput>;
  const periodUm = complete.interspaceWidthUm + complete.stripThicknessUm;
  return {
    values,
    missing,
    construction: {
      ...complete,
      periodUm,
      openFraction: complete.interspaceWidthUm / periodUm,
    },
  };
}

/**
 * Like {@link deriveGridConstruction} but insists on a complete result.
 * @throws DomainError('validation_failed') naming the missing quantities when
 *   the input does not fix the grid, and for any error the derivation throws.
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4.
 */
export function completeGridConstruction(
  input: GridConstructionInput,
  tolerance: number = CONSISTENCY_TOLERANCE,
): GridConstruction {
  const derivation = deriveGridConstruction(input, tolerance);
  if (!derivation.construction) {
    throw new DomainError(
      'validation_failed',
      `Not enough to fix the grid: give three of ratio, strip frequency, strip height, interspace width and strip thickness (missing ${derivation.missing.map((key) => QUANTITY_LABELS[key]).join(', ')}).`,
    );
  }
  return derivation.construction;
}

/** The X-Ray Grid attributes that bear on construction, as read. */
export interface DicomGridAttributes {
  /** Grid Pitch (0018,7044), mm: the period D + t. */
  gridPitchMm?: number;
  /** Grid Aspect Ratio (0018,7046): vertical and horizontal size. */
  gridAspectRatio?: readonly [number, number];
  /** Grid Focal Distance (0018,704C), mm. */
  gridFocalDistanceMm?: number;
}

/** Construction input and focusing distance taken from DICOM attributes. */
export interface DicomGridConstruction {
  input: GridConstructionInput;
  focusDistanceCm?: number;
}

/**
 * Turns DICOM X-Ray Grid attributes into construction input:
 * N = 10 / pitch (pitch in mm), r = first / second value of Grid Aspect
 * Ratio, focusing distance in cm = Grid Focal Distance / 10. Grid Thickness
 * (0018,7042) is the whole grid's thickness, not the strip height, and Grid
 * Period (0018,7048) is a reciprocation time, so neither is used.
 * @throws DomainError('validation_failed') for a non-positive value.
 * @see DICOM PS3.3, X-Ray Grid Description Macro; PHYSICS.md §1 and §9.
 */
export function constructionFromDicomGrid(
  attributes: DicomGridAttributes,
): DicomGridConstruction {
  const { gridPitchMm, gridAspectRatio, gridFocalDistanceMm } = attributes;
  const positive = [
    gridPitchMm,
    gridAspectRatio?.[0],
    gridAspectRatio?.[1],
    gridFocalDistanceMm,
  ];
  if (
    positive.some(
      (value) =>
        value !== undefined && (!(value > 0) || !Number.isFinite(value)),
    )
  ) {
    throw new DomainError(
      'validation_failed',
      'Grid Pitch, Grid Aspect Ratio and Grid Focal Distance must be positive.',
    );
  }
  const input: GridConstructionInput = {};
  if (gridPitchMm !== undefined) input.stripFrequencyPerCm = 10 / gridPitchMm;
  if (gridAspectRatio) input.ratio = gridAspectRatio[0] / gridAspectRatio[1];
  return {
    input,
    ...(gridFocalDistanceMm !== undefined && {
      focusDistanceCm: gridFocalDistanceMm / 10,
    }),
  };
}

/**
 * Usual ranges of grid parameters, "common practice" (trade catalogues and
 * textbooks; no single source). Values outside give a warning, not an error.
 */
export const COMMON_GRID_RANGES = {
  ratio: { min: 2, max: 20 },
  stripFrequencyPerCm: { min: 15, max: 90 },
  focusDistanceCm: { min: 50, max: 400 },
} as const;

/**
 * Warnings for grid parameters outside {@link COMMON_GRID_RANGES}.
 * @param grid any of ratio, strip frequency (lines/cm), focusing distance (cm).
 * @returns one `unusual_grid_value` warning per value outside its range.
 * @see COMMON_GRID_RANGES ("common practice").
 */
export function gridRangeWarnings(grid: {
  ratio?: number;
  stripFrequencyPerCm?: number;
  focusDistanceCm?: number;
}): Warning[] {
  const labels = {
    ratio: 'Grid ratio',
    stripFrequencyPerCm: 'Strip frequency (lines/cm)',
    focusDistanceCm: 'Focusing distance (cm)',
  } as const;
  return (Object.keys(labels) as Array<keyof typeof labels>).flatMap((key) => {
    const value = grid[key];
    const range = COMMON_GRID_RANGES[key];
    if (value === undefined || (value >= range.min && value <= range.max)) {
      return [];
    }
    return [
      {
        code: 'unusual_grid_value',
        message: `${labels[key]} ${Number(value.toPrecision(4))} is outside the usual ${range.min}–${range.max} (common practice); check the value.`,
      },
    ];
  });
}
