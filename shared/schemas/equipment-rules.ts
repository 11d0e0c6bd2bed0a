import {
  fitDetectorCalibration,
  type CalibrationFit,
  type CalibrationModel,
  type CalibrationPoint,
} from '../analysis/detector-calibration.ts';
import { DomainError, type ErrorDetail } from '../errors.ts';
import {
  deriveGridConstruction,
  type GridConstructionInput,
  type GridQuantity,
} from '../physics/grid-construction.ts';
import type { Warning } from '../warnings.ts';
import {
  GRID_FIELD_LIMITS,
  GRID_QUANTITIES,
  limitMessage,
  type CalibrationFitCheck,
  type GridConstructionCheck,
  type GridRuleInput,
  type StatedGridFigures,
} from './equipment.schema.ts';

/**
 * Cross-field rules of the equipment register, pure so the server and the
 * browser forms apply the same ones: grid construction consistency and
 * ranges, focusing range, stated-figure identities, calibration fits.
 */

function definedConstruction(
  input: Partial<Record<GridQuantity, number | null>>,
): GridConstructionInput {
  const known: GridConstructionInput = {};
  for (const key of GRID_QUANTITIES) {
    const value = input[key];
    if (typeof value === 'number') known[key] = value;
  }
  return known;
}

function derivesCleanly(input: GridConstructionInput): boolean {
  try {
    deriveGridConstruction(input);
    return true;
  } catch (error) {
    if (error instanceof DomainError) return false;
    throw error;
  }
}

/**
 * Derives what the given construction values determine (r = h/D,
 * N = 10 000/(D + t), lengths in µm) and says, per field, what is wrong: a
 * disagreement between given values is put on each value whose removal
 * would resolve it, and a derived value outside {@link GRID_FIELD_LIMITS} on
 * that value.
 * @param input any subset of r, N (lines/cm), h, D, t (µm); null = unknown.
 * @returns values, derived and missing names, and field problems (empty
 *   when the set is consistent).
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4; PHYSICS.md §1.
 */
export function checkGridConstruction(
  input: Partial<Record<GridQuantity, number | null>>,
): GridConstructionCheck {
  const known = definedConstruction(input);
  const givenKeys = Object.keys(known) as GridQuantity[];
  try {
    const derivation = deriveGridConstruction(known);
    const derivedFields = GRID_QUANTITIES.filter(
      (key) => derivation.values[key] !== undefined && !givenKeys.includes(key),
    );
    const problems = derivedFields.flatMap((key) => {
      const value = derivation.values[key]!;
      const limit = GRID_FIELD_LIMITS[key];
      return value < limit.min || value > limit.max
        ? [
            {
              path: key,
              message: `Derived ${limit.label.toLowerCase()} ${Number(value.toPrecision(4))}: ${limitMessage(limit)}`,
            },
          ]
        : [];
    });
    return {
      values: derivation.values,
      derivedFields,
      missing: derivation.missing,
      problems,
    };
  } catch (error) {
    if (!(error instanceof DomainError)) throw error;
    const { message } = error;
    const culprits = givenKeys.filter((key) => {
      const rest = { ...known };
      delete rest[key];
      return derivesCleanly(rest);
    });
    return {
      values: known,
      derivedFields: [],
      missing: GRID_QUANTITIES.filter((key) => known[key] === undefined),
      problems: (culprits.length > 0 ? culprits : givenKeys).map((path) => ({
        path,
        message,
      })),
    };
  }
}

/**
 * Every cross-field rule of a grid: the construction must be consistent and
 * give the ratio, and a focusing range must enclose its focusing distance.
 * @returns the construction check and the field problems (empty = valid).
 */
export function gridRuleProblems(grid: GridRuleInput): {
  check: GridConstructionCheck;
  problems: ErrorDetail[];
} {
  const check = checkGridConstruction(grid);
  const problems = [...check.problems];
  if (
    check.values.ratio === undefined &&
    !problems.some((p) => p.path === 'ratio')
  ) {
    problems.push({
      path: 'ratio',
      message:
        'Enter the grid ratio, or the strip height and interspace width it follows from.',
    });
  }
  const {
    focusDistanceCm: f0,
    focusRangeMinCm: near,
    focusRangeMaxCm: far,
  } = grid;
  if (
    (typeof near === 'number' || typeof far === 'number') &&
    typeof f0 !== 'number'
  ) {
    problems.push({
      path: 'focusDistanceCm',
      message: 'Enter the focusing distance this focusing range belongs to.',
    });
  }
  if (typeof near === 'number' && typeof f0 === 'number' && near >= f0) {
    problems.push({
      path: 'focusRangeMinCm',
      message:
        'The near end of the focusing range must be shorter than the focusing distance.',
    });
  }
  if (typeof far === 'number' && typeof f0 === 'number' && far <= f0) {
    problems.push({
      path: 'focusRangeMaxCm',
      message:
        'The far end of the focusing range must be longer than the focusing distance.',
    });
  }
  return { check, problems };
}

/** Relative disagreement tolerated between stated figures (makers round). */
const STATED_TOLERANCE = 0.05;

const disagrees = (a: number, b: number): boolean =>
  Math.abs(a - b) / Math.max(a, b) > STATED_TOLERANCE;

/**
 * Warnings for a grid's stated figures that contradict the identities
 * Σ = Tp/Ts and K = Tp·B (from K = Tp/Tt and B = 1/Tt) by more than 5 %.
 * @see IEC 60627:2013 definitions as summarised in PHYSICS.md §2.
 */
export function gridWarnings(grid: StatedGridFigures): Warning[] {
  const warnings: Warning[] = [];
  const { statedTp: tp, statedTs: ts, statedSelectivity: sigma } = grid;
  const { statedContrastImprovementFactor: k, statedBuckyFactor: b } = grid;
  if (
    tp !== null &&
    ts !== null &&
    sigma !== null &&
    disagrees(sigma, tp / ts)
  ) {
    warnings.push({
      code: 'stated_figures_inconsistent',
      message: `The stated selectivity ${sigma} differs from Tp/Ts = ${(tp / ts).toFixed(2)}; check the data sheet.`,
    });
  }
  if (tp !== null && k !== null && b !== null && disagrees(k, tp * b)) {
    warnings.push({
      code: 'stated_figures_inconsistent',
      message: `The stated contrast improvement factor ${k} differs from Tp·B = ${(tp * b).toFixed(2)}; check the data sheet.`,
    });
  }
  return warnings;
}

const isFiniteFit = (fit: CalibrationFit): boolean =>
  [fit.a, fit.b, fit.rSquared, fit.residualSd, ...fit.residuals].every(
    Number.isFinite,
  );

/**
 * Fits the three conversion functions and keeps only fits with finite
 * parameters, R² and residuals (identical pixel values give R² = 0/0), so no
 * NaN reaches a form or the database. A problem is put on `model` when the
 * requested model alone is impossible, else on `points`.
 * @param points flat-field points (air kerma µGy, mean pixel value).
 * @param model the model to choose; omitted → best R².
 * @see fitDetectorCalibration (IEC 62220-1-1:2015 conversion function).
 */
export function checkCalibrationFit(
  points: readonly CalibrationPoint[],
  model?: CalibrationModel,
): CalibrationFitCheck {
  const attempt = (requested?: CalibrationModel) => {
    try {
      const result = fitDetectorCalibration(points, requested);
      const fits = result.fits.filter(isFiniteFit);
      if (!isFiniteFit(result.chosen)) {
        return new DomainError(
          'validation_failed',
          'The pixel values do not vary with air kerma, so no conversion function can be fitted.',
        );
      }
      return { ...result, fits };
    } catch (error) {
      if (error instanceof DomainError) return error;
      throw error;
    }
  };
  const outcome = attempt(model);
  if (!(outcome instanceof DomainError))
    return { result: outcome, problems: [] };
  const path =
    model && !(attempt() instanceof DomainError) ? 'model' : 'points';
  return { result: null, problems: [{ path, message: outcome.message }] };
}
