import type { FigureKey } from '../figures.ts';
import type { FilterLayer } from '../schemas/study.schema.ts';
import {
  conditionMatchKey,
  flagAgainstBaseline,
  type ConditionMatch,
  type ToleranceFlag,
} from './tolerance.ts';

/**
 * Which baseline holds a condition, and its flags: a condition is checked
 * against the active baseline of its room + grid + kV + filtration +
 * phantom thickness when its study is not older than the baseline's source
 * study; the source condition itself is marked, not flagged.
 */

/** An active baseline as the check needs it. */
export interface BaselineForCheck extends ConditionMatch {
  id: number;
  sourceConditionId: number | null;
  /** When the source study was signed (ISO string or Date), if known. */
  sourceSignedAt: Date | string | null;
  figures: Partial<Record<FigureKey, { value: number }>>;
  tolerances: Partial<Record<FigureKey, number>>;
}

/** A measured condition as the check needs it. */
export interface ConditionForCheck extends ConditionMatch {
  conditionId: number;
  addedFiltration: readonly FilterLayer[];
  /** The study's date (signed date). */
  studyDate: Date | string;
  figures: Partial<Record<FigureKey, { value: number }>>;
}

/** The outcome of checking one condition. */
export interface BaselineCheck {
  baselineId: number;
  isSource: boolean;
  flags: ToleranceFlag[];
  /** Figures outside their tolerance. */
  outside: number;
}

/** Active baselines keyed by their condition match. */
export function baselinesByMatch<T extends BaselineForCheck>(
  baselines: readonly T[],
): Map<string, T> {
  return new Map(baselines.map((b) => [conditionMatchKey(b), b]));
}

/**
 * Checks a condition against the active baseline of its match.
 * @returns null when no baseline applies (none for the match, or the study
 *   is older than the baseline's source).
 */
export function checkAgainstBaseline(
  condition: ConditionForCheck,
  baselines: ReadonlyMap<string, BaselineForCheck>,
): BaselineCheck | null {
  const baseline = baselines.get(conditionMatchKey(condition));
  if (!baseline) return null;
  if (baseline.sourceConditionId === condition.conditionId) {
    return { baselineId: baseline.id, isSource: true, flags: [], outside: 0 };
  }
  if (
    baseline.sourceSignedAt !== null &&
    new Date(condition.studyDate).getTime() <
      new Date(baseline.sourceSignedAt).getTime()
  ) {
    return null;
  }
  const flags = flagAgainstBaseline(condition.figures, baseline);
  return {
    baselineId: baseline.id,
    isSource: false,
    flags,
    outside: flags.filter((flag) => flag.status === 'outside').length,
  };
}
