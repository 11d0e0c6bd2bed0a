import type { Estimate } from './estimate.ts';
import { intervalRelativeTo } from './estimate.ts';
import type { WelchTestResult } from './welch-test.ts';

/** What the SNR improvement factor at equal dose says about the grid. */
export type GridVerdictOutcome = 'benefit' | 'no-measurable-benefit' | 'cost';

/** A verdict with the sentence shown to the user. */
export interface GridVerdict {
  outcome: GridVerdictOutcome;
  sentence: string;
  /** (SIF − 1) in %, and the half-width of its 95 % interval in %. */
  changePercent: number;
  changeHalfWidthPercent: number;
  /** Welch's test on dose-normalised CNR, when both sides had replicates. */
  welch: WelchTestResult | null;
}

function formatPercent(value: number): string {
  return Math.abs(value) >= 10 ? value.toFixed(0) : value.toFixed(1);
}

/**
 * Turns the SNR improvement factor at equal dose into a verdict: an interval
 * that includes 1 means "no measurable benefit", one below 1 "the grid costs
 * SNR at equal dose", one above 1 "at equal dose the grid improves CNR by
 * X % ± Y %" (Y is the 95 % half-width).
 * @param snrImprovementFactor SIF with its 95 % interval.
 * @param welch Welch's test of grid vs no-grid CNR/√D, or null.
 * @see PHYSICS.md §3 (SIF at equal dose).
 */
export function gridVerdict(
  snrImprovementFactor: Estimate,
  welch: WelchTestResult | null,
): GridVerdict {
  const changePercent = (snrImprovementFactor.value - 1) * 100;
  const changeHalfWidthPercent =
    ((snrImprovementFactor.ci95.high - snrImprovementFactor.ci95.low) / 2) *
    100;
  const interval = `SIF ${snrImprovementFactor.value.toFixed(3)}, 95 % CI ${snrImprovementFactor.ci95.low.toFixed(3)}–${snrImprovementFactor.ci95.high.toFixed(3)}`;
  const test = welch
    ? `; Welch's t-test on CNR/√dose p = ${welch.pTwoSided.toPrecision(2)}`
    : '';
  const position = intervalRelativeTo(snrImprovementFactor, 1);
  const outcome: GridVerdictOutcome =
    position === 'above'
      ? 'benefit'
      : position === 'below'
        ? 'cost'
        : 'no-measurable-benefit';
  const lead =
    outcome === 'benefit'
      ? `At equal dose the grid improves CNR by ${formatPercent(changePercent)} % ± ${formatPercent(changeHalfWidthPercent)} %`
      : outcome === 'cost'
        ? `The grid costs SNR at equal dose: CNR changes by ${formatPercent(changePercent)} % ± ${formatPercent(changeHalfWidthPercent)} %`
        : 'No measurable benefit: the interval of the SNR improvement factor at equal dose includes 1';
  return {
    outcome,
    sentence: `${lead} (${interval}${test}).`,
    changePercent,
    changeHalfWidthPercent,
    welch,
  };
}
