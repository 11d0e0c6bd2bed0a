import { DomainError } from '../errors.ts';
import type { FigureKey } from '../figures.ts';
import type { FilterLayer } from '../schemas/study.schema.ts';

/**
 * Baseline tolerances: a later study's figure is flagged when it lies
 * outside baseline value ± tolerance. The tolerance is a percentage of the
 * baseline's magnitude, set per figure by the physicist; ±10 % is Lamella's
 * default and a matter of local policy, not of any standard.
 */

/** Default tolerance, % of the baseline value (local policy). */
export const DEFAULT_TOLERANCE_PERCENT = 10;

/** Largest tolerance accepted, % (beyond it a flag says nothing). */
export const MAX_TOLERANCE_PERCENT = 100;

/** Shown wherever tolerances are: they are policy, not physics. */
export const TOLERANCE_POLICY_NOTE =
  'Tolerances are local policy, not a standard: each figure is flagged when it lies outside the baseline value ± its tolerance (±10 % unless the physicist set another).';

// A measured value exactly on the band's edge counts as within; the relative
// slack absorbs the rounding of value × percent / 100 in binary floating point.
const EDGE_SLACK = 1e-12;

/** The band a figure may move in: [low, high]. */
export interface ToleranceBand {
  low: number;
  high: number;
}

/** Whether a figure stayed inside its baseline's band. */
export type ToleranceStatus = 'within' | 'outside';

/** One figure checked against its baseline. */
export interface ToleranceFlag {
  figure: FigureKey;
  status: ToleranceStatus;
  measured: number;
  baselineValue: number;
  tolerancePercent: number;
  band: ToleranceBand;
  /** (measured − baseline)/|baseline| in %, null for a zero baseline. */
  deviationPercent: number | null;
}

function requireFinite(what: string, value: number): void {
  if (!Number.isFinite(value)) {
    throw new DomainError(
      'validation_failed',
      `${what} must be a finite number, got ${value}.`,
    );
  }
}

/**
 * The tolerance band baseline ± |baseline| · tolerance/100.
 * @param baselineValue the baseline figure (any sign).
 * @param tolerancePercent 0 … MAX_TOLERANCE_PERCENT.
 * @throws DomainError('validation_failed') for a non-finite value or a
 *   tolerance outside 0 … 100 %.
 */
export function toleranceBand(
  baselineValue: number,
  tolerancePercent: number,
): ToleranceBand {
  requireFinite('A baseline value', baselineValue);
  requireFinite('A tolerance', tolerancePercent);
  if (tolerancePercent < 0 || tolerancePercent > MAX_TOLERANCE_PERCENT) {
    throw new DomainError(
      'validation_failed',
      `A tolerance is 0–${MAX_TOLERANCE_PERCENT} %, got ${tolerancePercent} %.`,
    );
  }
  const halfWidth = (Math.abs(baselineValue) * tolerancePercent) / 100;
  return { low: baselineValue - halfWidth, high: baselineValue + halfWidth };
}

/**
 * Checks one measured figure against its baseline: outside when
 * |measured − baseline| > |baseline| · tolerance/100 (a value on the edge is
 * within).
 * @throws DomainError('validation_failed') as {@link toleranceBand}, or for
 *   a non-finite measured value.
 */
export function toleranceFlag(
  figure: FigureKey,
  measured: number,
  baselineValue: number,
  tolerancePercent: number,
): ToleranceFlag {
  requireFinite('A measured value', measured);
  const band = toleranceBand(baselineValue, tolerancePercent);
  const allowed = (Math.abs(baselineValue) * tolerancePercent) / 100;
  const slack = EDGE_SLACK * Math.max(Math.abs(baselineValue), 1);
  const outside = Math.abs(measured - baselineValue) > allowed + slack;
  return {
    figure,
    status: outside ? 'outside' : 'within',
    measured,
    baselineValue,
    tolerancePercent,
    band,
    deviationPercent:
      baselineValue === 0
        ? null
        : ((measured - baselineValue) / Math.abs(baselineValue)) * 100,
  };
}

/** The part of a baseline the flags need. */
export interface BaselineValues {
  figures: Partial<Record<FigureKey, { value: number }>>;
  /** % per figure; figures without one use DEFAULT_TOLERANCE_PERCENT. */
  tolerances: Partial<Record<FigureKey, number>>;
}

/**
 * Flags every figure present both in a later condition and in its baseline,
 * in the baseline's key order.
 * @returns one flag per shared figure; figures only one side has are skipped.
 */
export function flagAgainstBaseline(
  measured: Partial<Record<FigureKey, { value: number }>>,
  baseline: BaselineValues,
): ToleranceFlag[] {
  const flags: ToleranceFlag[] = [];
  for (const key of Object.keys(baseline.figures) as FigureKey[]) {
    const reference = baseline.figures[key];
    const value = measured[key];
    if (!reference || !value) continue;
    flags.push(
      toleranceFlag(
        key,
        value.value,
        reference.value,
        baseline.tolerances[key] ?? DEFAULT_TOLERANCE_PERCENT,
      ),
    );
  }
  return flags;
}

/**
 * Canonical text of an added filtration, independent of the order the
 * layers were listed in: "none" or e.g. "Al1+Cu0.1".
 */
export function filtrationKey(layers: readonly FilterLayer[]): string {
  if (layers.length === 0) return 'none';
  return layers
    .map((layer) => `${layer.material}${layer.thicknessMm}`)
    .sort()
    .join('+');
}

/** What makes a later condition comparable with a baseline. */
export interface ConditionMatch {
  roomId: number;
  gridId: number;
  kvp: number;
  phantomThicknessCm: number;
  addedFiltration: readonly FilterLayer[];
}

/** One key per room + grid + kV + filtration + phantom thickness. */
export function conditionMatchKey(match: ConditionMatch): string {
  return `r${match.roomId}|g${match.gridId}|kv${match.kvp}|f${filtrationKey(match.addedFiltration)}|t${match.phantomThicknessCm}`;
}
