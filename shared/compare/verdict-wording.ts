import type { GridVerdictOutcome } from '../analysis/verdict.ts';

/**
 * Plain verdicts on the comparison board and in reports, from the SNR
 * improvement factor at equal dose (SIF) and its 95 % interval: above 1 the
 * grid improves CNR at equal dose, below 1 it costs SNR, an interval that
 * includes 1 is no measurable benefit. The same rule as the analysis
 * engine's `gridVerdict` (shared/analysis/verdict.ts).
 * @see PHYSICS.md §3 (SIF at equal dose); Bor et al., J Med Phys
 *   2016;41:21–28.
 */

/** A figure's value with its 95 % interval. */
export interface IntervalValue {
  value: number;
  ciLow: number;
  ciHigh: number;
}

/** The verdict of one condition. */
export interface ConditionVerdict {
  outcome: GridVerdictOutcome | null;
  sentence: string;
}

/** Shown beside every verdict: what a phantom verdict can and cannot say. */
export const VERDICT_CAUTION =
  'Phantom results are not patient outcomes; decide grid use by part thickness and field size (Fritz & Jones, Pediatr Radiol 2014;44:313).';

/**
 * Thickness at or below which a grid may give no benefit at equal dose:
 * Fritz & Jones (Pediatr Radiol 2014;44:313) found the limit between 5 and
 * 12 cm depending on field size and detector (PHYSICS.md §3).
 */
export const THIN_PART_LIMIT_CM = 12;

/** Verdict outcome from an interval, by the rule above. */
export function verdictOutcome(sif: IntervalValue): GridVerdictOutcome {
  if (sif.ciLow > 1) return 'benefit';
  if (sif.ciHigh < 1) return 'cost';
  return 'no-measurable-benefit';
}

/**
 * A signed percentage: one decimal below 10 %, whole numbers from 10 %
 * (decided on the value rounded to one decimal, so 9.96 prints as 10).
 */
export function formatPercentChange(percent: number): string {
  const magnitude = Math.abs(percent);
  const oneDecimal = Math.round(magnitude * 10) / 10;
  const text = oneDecimal >= 10 ? magnitude.toFixed(0) : oneDecimal.toFixed(1);
  if (Number(text) === 0) return text;
  return percent < 0 ? `-${text}` : text;
}

/**
 * The verdict sentence of one condition, e.g. "The grid improves CNR at
 * equal dose by 34 % (95 % CI 28 % to 40 %)." Percentages are (SIF − 1)·100.
 * @param sif the condition's SIF, or null when it could not be computed.
 */
export function conditionVerdict(sif: IntervalValue | null): ConditionVerdict {
  if (!sif) {
    return {
      outcome: null,
      sentence:
        'No verdict: the SNR improvement factor at equal dose could not be computed (a dose or exposure is missing).',
    };
  }
  const change = formatPercentChange((sif.value - 1) * 100);
  const interval = `95 % CI ${formatPercentChange((sif.ciLow - 1) * 100)} % to ${formatPercentChange((sif.ciHigh - 1) * 100)} %`;
  const outcome = verdictOutcome(sif);
  const sentence =
    outcome === 'benefit'
      ? `The grid improves CNR at equal dose by ${change} % (${interval}).`
      : outcome === 'cost'
        ? `The grid costs SNR at equal dose: CNR at equal dose changes by ${change} % (${interval}).`
        : `No measurable benefit: CNR at equal dose changes by ${change} % (${interval}), an interval that includes no change.`;
  return { outcome, sentence };
}

/**
 * The cautions that go with one condition's verdict: always the phantom
 * caution, and for a thin part the reminder that the grid may be removable.
 * @param phantomThicknessCm the condition's phantom thickness, cm.
 */
export function verdictCautions(phantomThicknessCm: number): string[] {
  const cautions = [VERDICT_CAUTION];
  if (phantomThicknessCm <= THIN_PART_LIMIT_CM) {
    cautions.push(
      `At ${phantomThicknessCm} cm the part is thin: a grid can give no benefit at equal dose below 5–12 cm, depending on field size and detector (Fritz & Jones 2014).`,
    );
  }
  return cautions;
}

/** How many conditions had each verdict. */
export interface VerdictCounts {
  benefit: number;
  noMeasurableBenefit: number;
  cost: number;
  /** Conditions without a SIF, so without a verdict. */
  none: number;
}

const plural = (n: number, one: string, many: string): string =>
  `${n} ${n === 1 ? one : many}`;

/**
 * One sentence over a selection, e.g. "Of 12 conditions, the grid improves
 * CNR at equal dose in 8, gives no measurable benefit in 3 and costs SNR at
 * equal dose in 1."; conditions without a verdict are added when present.
 */
export function summariseVerdicts(counts: VerdictCounts): string {
  const total =
    counts.benefit + counts.noMeasurableBenefit + counts.cost + counts.none;
  if (total === 0) return 'No condition matches this selection.';
  const lead = `Of ${plural(total, 'condition', 'conditions')}, the grid improves CNR at equal dose in ${counts.benefit}, gives no measurable benefit in ${counts.noMeasurableBenefit} and costs SNR at equal dose in ${counts.cost}`;
  const tail =
    counts.none > 0
      ? `; ${plural(counts.none, 'condition has', 'conditions have')} no verdict (no SIF).`
      : '.';
  return lead + tail;
}
