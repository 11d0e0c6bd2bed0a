import { describe, expect, it } from 'vitest';
import {
  FIELD_VALUE_LABEL,
  FIELD_VS_STATED_NOTE,
  STATED_VALUE_LABEL,
  fieldVersusStated,
} from '../../../shared/compare/field-vs-stated.ts';

const NONE = {
  statedTp: null,
  statedTs: null,
  statedContrastImprovementFactor: null,
  statedBuckyFactor: null,
  statedSelectivity: null,
};

describe('fieldVersusStated', () => {
  it('sets each measured field value beside the stated value, labelled', () => {
    const rows = fieldVersusStated(
      { ...NONE, statedTp: 0.7, statedBuckyFactor: 4 },
      { bucky_factor: { value: 3.6, ciLow: 3.4, ciHigh: 3.8, n: 4 } },
    );
    expect(rows.map((r) => r.figure)).toEqual([
      'primary_transmission',
      'bucky_factor',
    ]);
    const bucky = rows[1]!;
    expect(bucky.fieldLabel).toBe(FIELD_VALUE_LABEL);
    expect(bucky.statedLabel).toBe(STATED_VALUE_LABEL);
    // (3.6 − 4)/4 = −10 %, by hand.
    expect(bucky.differencePercent).toBeCloseTo(-10, 10);
    expect(rows[0]!.field).toBeNull();
    expect(rows[0]!.differencePercent).toBeNull();
  });

  it('gives nothing for a grid without stated figures', () => {
    expect(
      fieldVersusStated(NONE, {
        bucky_factor: { value: 3, ciLow: 2, ciHigh: 4, n: 1 },
      }),
    ).toEqual([]);
  });

  it('explains that IEC 60627 conditions are laboratory conditions, not an acceptance test', () => {
    // PHYSICS.md §2: the standard says so of itself.
    expect(FIELD_VS_STATED_NOTE).toMatch(/laboratory conditions/);
    expect(FIELD_VS_STATED_NOTE).toMatch(/not an acceptance-test method/);
  });
});
