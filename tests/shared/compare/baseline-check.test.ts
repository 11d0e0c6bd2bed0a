import { describe, expect, it } from 'vitest';
import {
  baselinesByMatch,
  checkAgainstBaseline,
  type BaselineForCheck,
} from '../../../shared/compare/baseline-check.ts';

const BASELINE: BaselineForCheck = {
  id: 7,
  roomId: 1,
  gridId: 2,
  kvp: 81,
  phantomThicknessCm: 20,
  addedFiltration: [],
  sourceConditionId: 100,
  sourceSignedAt: '2026-03-01T00:00:00Z',
  figures: { bucky_factor: { value: 4 } },
  tolerances: { bucky_factor: 10 },
};

const condition = (
  over: Partial<Parameters<typeof checkAgainstBaseline>[0]>,
) => ({
  conditionId: 200,
  roomId: 1,
  gridId: 2,
  kvp: 81,
  phantomThicknessCm: 20,
  addedFiltration: [],
  studyDate: '2026-06-01T00:00:00Z',
  figures: { bucky_factor: { value: 4.5 } },
  ...over,
});

describe('checkAgainstBaseline', () => {
  const byMatch = baselinesByMatch([BASELINE]);

  it('flags a later study of the same match outside the band', () => {
    const check = checkAgainstBaseline(condition({}), byMatch);
    expect(check?.outside).toBe(1);
    expect(check?.flags[0]?.status).toBe('outside');
  });

  it('marks the source condition instead of flagging it', () => {
    const check = checkAgainstBaseline(
      condition({ conditionId: 100 }),
      byMatch,
    );
    expect(check).toEqual({
      baselineId: 7,
      isSource: true,
      flags: [],
      outside: 0,
    });
  });

  it('does not hold an older study to a newer baseline', () => {
    expect(
      checkAgainstBaseline(
        condition({ studyDate: '2026-01-01T00:00:00Z' }),
        byMatch,
      ),
    ).toBeNull();
  });

  it('finds no baseline for another thickness or filtration', () => {
    expect(
      checkAgainstBaseline(condition({ phantomThicknessCm: 25 }), byMatch),
    ).toBeNull();
    expect(
      checkAgainstBaseline(
        condition({ addedFiltration: [{ material: 'Cu', thicknessMm: 0.1 }] }),
        byMatch,
      ),
    ).toBeNull();
  });
});
