import { describe, expect, it } from 'vitest';
import {
  FOCUSING_RANGE_CRITERION,
  focusingRange,
  planFocusedGrid,
  primaryLossFraction,
  primaryLossProfile,
  upsideDownTotalCutoffCm,
} from '../../../shared/physics/focused-grid.ts';
import { DomainError } from '../../../shared/errors.ts';

describe('primaryLossFraction', () => {
  it('gives r·b/f0 for a lateral offset alone', () => {
    // PHYSICS.md §5 derived check value: r 12, b 2 cm, f0 100 → L 0.24.
    const geometry = {
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 100,
      lateralOffsetCm: 2,
    };

    expect(primaryLossFraction(geometry, 0)).toBeCloseTo(0.24, 10);
    expect(primaryLossFraction(geometry, -15)).toBeCloseTo(0.24, 10);
    expect(primaryLossFraction(geometry, 15)).toBeCloseTo(0.24, 10);
  });

  it.each([
    // PHYSICS.md §5 derived check values, distance decentring only.
    [80, 0.5],
    [150, 2 / 3],
  ])('gives r·c·|1/f0 − 1/f1| at f1 = %d cm', (sourceGridDistanceCm, loss) => {
    const geometry = { ratio: 10, focusDistanceCm: 100, sourceGridDistanceCm };

    expect(primaryLossFraction(geometry, 20)).toBeCloseTo(loss, 10);
    expect(primaryLossFraction(geometry, -20)).toBeCloseTo(loss, 10);
  });

  it('adds offset and distance terms with their signs', () => {
    // PHYSICS.md §5 combined form: L(c) = r·|c·(1/f0 − 1/f1) + b/f1|.
    const geometry = {
      ratio: 10,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 80,
      lateralOffsetCm: 2,
    };

    expect(primaryLossFraction(geometry, 0)).toBeCloseTo(0.25, 12);
    expect(primaryLossFraction(geometry, 10)).toBeCloseTo(0, 12);
    expect(primaryLossFraction(geometry, -10)).toBeCloseTo(0.5, 12);
  });

  it('treats a tilt like an offset of α·f1', () => {
    const tilted = {
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 100,
      tiltDeg: 1,
    };
    const offset = {
      ...tilted,
      tiltDeg: 0,
      lateralOffsetCm: (Math.PI / 180) * 100,
    };

    expect(primaryLossFraction(tilted, 7)).toBeCloseTo(
      primaryLossFraction(offset, 7),
      12,
    );
  });

  it('gives 2·r·c/f0 upside down and caps the loss at 1', () => {
    // PHYSICS.md §5: upside-down L(c) ≈ 2·r·c/f0.
    const geometry = {
      ratio: 10,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 100,
      isUpsideDown: true,
    };

    expect(primaryLossFraction(geometry, 2)).toBeCloseTo(0.4, 12);
    expect(primaryLossFraction(geometry, -4)).toBeCloseTo(0.8, 12);
    expect(primaryLossFraction(geometry, 6)).toBe(1);
  });

  it('refuses a zero ratio or distance', () => {
    expect(() =>
      primaryLossFraction(
        { ratio: 0, focusDistanceCm: 100, sourceGridDistanceCm: 100 },
        0,
      ),
    ).toThrow(DomainError);
    expect(() =>
      primaryLossFraction(
        { ratio: 10, focusDistanceCm: 100, sourceGridDistanceCm: 0 },
        0,
      ),
    ).toThrow(DomainError);
  });
});

describe('focusingRange', () => {
  it.each([
    // PHYSICS.md §5 derived check values at c = 20 cm, 60 % criterion.
    [8, 100, 80.0, 133.3],
    [10, 100, 83.3, 125.0],
    [12, 100, 85.7, 120.0],
    [12, 180, 138.5, 257.1],
  ])('r %d, f0 %d cm → %d–%d cm', (ratio, focusDistanceCm, nearCm, farCm) => {
    const range = focusingRange(ratio, focusDistanceCm, 20);

    expect(range.nearCm).toBeCloseTo(nearCm, 1);
    expect(range.farCm).toBeCloseTo(farCm, 1);
    expect(range.criterion).toBe(FOCUSING_RANGE_CRITERION);
    expect(range.criterionSource).toBe('from memory of IEC 60627');
  });

  it('puts the field edge at exactly the criterion at either limit', () => {
    const range = focusingRange(12, 100, 20, 0.7);

    for (const sourceGridDistanceCm of [range.nearCm, range.farCm!]) {
      const loss = primaryLossFraction(
        { ratio: 12, focusDistanceCm: 100, sourceGridDistanceCm },
        20,
      );
      expect(1 - loss).toBeCloseTo(0.7, 12);
    }
    expect(range.criterionSource).toBe('chosen by the user');
  });

  it('has no far limit when k/(r·c) reaches 1/f0', () => {
    const range = focusingRange(4, 100, 10);

    expect(range.farCm).toBeNull();
    expect(range.nearCm).toBeCloseTo(50, 10);
  });

  it('refuses a criterion outside (0, 1)', () => {
    expect(() => focusingRange(12, 100, 20, 1)).toThrow(DomainError);
    expect(() => focusingRange(12, 100, 20, 0)).toThrow(DomainError);
  });
});

describe('upsideDownTotalCutoffCm', () => {
  it('gives f0/(2r) at the focusing distance', () => {
    // PHYSICS.md §5 derived check value: r 10, f0 100 → total beyond 5.0 cm.
    expect(upsideDownTotalCutoffCm(10, 100)).toBeCloseTo(5, 12);
  });
});

describe('primaryLossProfile', () => {
  it('spans the field evenly from edge to edge', () => {
    const profile = primaryLossProfile(
      { ratio: 10, focusDistanceCm: 100, sourceGridDistanceCm: 80 },
      40,
      5,
    );

    expect(profile.map((point) => point.positionCm)).toEqual([
      -20, -10, 0, 10, 20,
    ]);
    expect(profile[4]!.lossFraction).toBeCloseTo(0.5, 12);
    expect(profile[4]!.relativePrimary).toBeCloseTo(0.5, 12);
  });

  it('refuses a profile of one point', () => {
    expect(() =>
      primaryLossProfile(
        { ratio: 10, focusDistanceCm: 100, sourceGridDistanceCm: 100 },
        40,
        1,
      ),
    ).toThrow(DomainError);
  });
});

describe('planFocusedGrid', () => {
  it('warns when the distance is outside the focusing range', () => {
    // PHYSICS.md §5: r 12, f0 100, 40 cm field → range 85.7–120.0 cm.
    const plan = planFocusedGrid({
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 80,
      fieldWidthCm: 40,
    });

    expect(plan.isWithinFocusingRange).toBe(false);
    expect(plan.edgeLossFraction).toBeCloseTo(0.6, 12);
    expect(plan.warnings.map((warning) => warning.code)).toEqual([
      'outside_focusing_range',
    ]);
    expect(plan.upsideDownTotalCutoffCm).toBeUndefined();
  });

  it('passes a centred grid inside its range without warnings', () => {
    const plan = planFocusedGrid({
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 110,
      fieldWidthCm: 40,
    });

    expect(plan.isWithinFocusingRange).toBe(true);
    expect(plan.warnings).toEqual([]);
    expect(plan.centreLossFraction).toBe(0);
  });

  it('reports total cut-off inside the field of an upside-down grid', () => {
    // PHYSICS.md §5: r 10, f0 100 upside down → total beyond 5.0 cm.
    const plan = planFocusedGrid({
      ratio: 10,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 100,
      fieldWidthCm: 30,
      isUpsideDown: true,
    });

    expect(plan.upsideDownTotalCutoffCm).toBeCloseTo(5, 12);
    expect(plan.edgeLossFraction).toBe(1);
    expect(plan.warnings.map((warning) => warning.code)).toEqual([
      'grid_upside_down',
      'total_cutoff_in_field',
    ]);
  });

  it('warns when an offset costs the edge more than the criterion allows', () => {
    const plan = planFocusedGrid({
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 100,
      lateralOffsetCm: 4,
      fieldWidthCm: 40,
    });

    expect(plan.centreLossFraction).toBeCloseTo(0.48, 12);
    expect(plan.warnings.map((warning) => warning.code)).toEqual([
      'edge_loss_high',
    ]);
  });

  it('uses an edited criterion for the range', () => {
    const plan = planFocusedGrid({
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 90,
      fieldWidthCm: 40,
      focusingCriterion: 0.8,
    });

    expect(plan.focusingRange.nearCm).toBeCloseTo(1 / (0.01 + 0.2 / 240), 10);
    expect(plan.isWithinFocusingRange).toBe(false);
  });
});
