import { describe, expect, it } from 'vitest';
import {
  conditionVerdict,
  formatPercentChange,
  summariseVerdicts,
  verdictCautions,
  verdictOutcome,
} from '../../../shared/compare/verdict-wording.ts';

describe('conditionVerdict', () => {
  it('says how much the grid improves CNR at equal dose, with the interval', () => {
    // (SIF − 1)·100 by hand: 1.34 → 34 %, 1.28 → 28 %, 1.40 → 40 %.
    const verdict = conditionVerdict({ value: 1.34, ciLow: 1.28, ciHigh: 1.4 });
    expect(verdict.outcome).toBe('benefit');
    expect(verdict.sentence).toBe(
      'The grid improves CNR at equal dose by 34 % (95 % CI 28 % to 40 %).',
    );
  });

  it('says no measurable benefit when the interval includes 1', () => {
    const verdict = conditionVerdict({ value: 1.03, ciLow: 0.96, ciHigh: 1.1 });
    expect(verdict.outcome).toBe('no-measurable-benefit');
    expect(verdict.sentence).toMatch(
      /^No measurable benefit: .*3\.0 % \(95 % CI -4\.0 % to 10 %\)/,
    );
  });

  it('says the grid costs SNR when the interval lies below 1', () => {
    const verdict = conditionVerdict({ value: 0.9, ciLow: 0.85, ciHigh: 0.95 });
    expect(verdict.outcome).toBe('cost');
    expect(verdict.sentence).toMatch(/^The grid costs SNR at equal dose/);
    expect(verdict.sentence).toContain('-10 %');
  });

  it('gives no verdict without a SIF', () => {
    expect(conditionVerdict(null).outcome).toBeNull();
  });

  it('follows the same strict rule as the analysis engine at the edges', () => {
    // An interval touching 1 includes it (shared/analysis/estimate.ts).
    expect(verdictOutcome({ value: 1.1, ciLow: 1, ciHigh: 1.2 })).toBe(
      'no-measurable-benefit',
    );
    expect(verdictOutcome({ value: 0.9, ciLow: 0.8, ciHigh: 1 })).toBe(
      'no-measurable-benefit',
    );
  });
});

describe('formatPercentChange', () => {
  it.each([
    [34.4, '34'],
    [9.96, '10'],
    [-9.999999999999998, '-10'],
    [-0.04, '0.0'],
    [-12.6, '-13'],
    [5.25, '5.3'],
  ])('formats %s as %s', (percent, text) => {
    expect(formatPercentChange(percent)).toBe(text);
  });
});

describe('verdictCautions', () => {
  it('always carries the phantom caution and adds the thin-part one at 12 cm or less', () => {
    expect(verdictCautions(20)).toHaveLength(1);
    expect(verdictCautions(20)[0]).toMatch(/not patient outcomes/);
    expect(verdictCautions(10)).toHaveLength(2);
    expect(verdictCautions(10)[1]).toMatch(/5–12 cm/);
  });
});

describe('summariseVerdicts', () => {
  it('counts every outcome in one sentence', () => {
    expect(
      summariseVerdicts({
        benefit: 8,
        noMeasurableBenefit: 3,
        cost: 1,
        none: 0,
      }),
    ).toBe(
      'Of 12 conditions, the grid improves CNR at equal dose in 8, gives no measurable benefit in 3 and costs SNR at equal dose in 1.',
    );
  });

  it('mentions conditions without a verdict, and an empty selection', () => {
    expect(
      summariseVerdicts({
        benefit: 1,
        noMeasurableBenefit: 0,
        cost: 0,
        none: 1,
      }),
    ).toMatch(/1 condition has no verdict/);
    expect(
      summariseVerdicts({
        benefit: 0,
        noMeasurableBenefit: 0,
        cost: 0,
        none: 0,
      }),
    ).toBe('No condition matches this selection.');
  });
});
