import { describe, expect, it } from 'vitest';
import {
  studyPlanSchema,
  type StudyPlanInput,
} from '../../../shared/schemas/study.schema.ts';
import {
  conditionKey,
  conditionsFromPlan,
  describeFiltration,
  expectedAcquisitionCount,
  expectedAcquisitions,
} from '../../../shared/studies/expected-acquisitions.ts';

const planInput: StudyPlanInput = {
  phantom: { material: 'pmma', thicknessesCm: [10, 20], contrastObjects: [] },
  beamQualities: [
    { kvp: 70, addedFiltration: [] },
    { kvp: 90, addedFiltration: [{ material: 'Cu', thicknessMm: 0.1 }] },
  ],
  geometry: { sidCm: 115, fieldWidthCm: 30, fieldHeightCm: 30 },
  exposure: { mode: 'manual', gridExposureMas: 16, noGridExposureMas: 5 },
  replicates: 3,
};
const plan = studyPlanSchema.parse(planInput);

describe('conditionsFromPlan', () => {
  it('makes one condition per thickness × grid × beam quality, thickness outermost', () => {
    const conditions = conditionsFromPlan(plan, [7, 8]);

    expect(conditions).toHaveLength(2 * 2 * 2);
    expect(
      conditions.map((c) => [c.phantomThicknessCm, c.gridId, c.kvp]),
    ).toEqual([
      [10, 7, 70],
      [10, 7, 90],
      [10, 8, 70],
      [10, 8, 90],
      [20, 7, 70],
      [20, 7, 90],
      [20, 8, 70],
      [20, 8, 90],
    ]);
    expect(conditions.map((c) => c.position)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
  });

  it('gives each condition a distinct key that includes the filtration', () => {
    const keys = conditionsFromPlan(plan, [7]).map((c) => c.key);

    expect(new Set(keys).size).toBe(keys.length);
    expect(keys[1]).toBe('kv90|fCu0.1|t10|g7');
    expect(
      conditionKey(
        { kvp: 90, addedFiltration: [{ material: 'Cu', thicknessMm: 0.2 }] },
        10,
        7,
      ),
    ).not.toBe(keys[1]);
  });
});

describe('expectedAcquisitions', () => {
  it('lists conditions × 2 arms × replicates exposures, numbered in order', () => {
    const list = expectedAcquisitions(plan, [7]);

    expect(list).toHaveLength(2 * 2 * 2 * 3);
    expect(expectedAcquisitionCount(plan, 1)).toBe(24);
    expect(list.map((a) => a.step)).toEqual(
      Array.from({ length: 24 }, (_, i) => i + 1),
    );
  });

  it('does every kV with the grid in before taking the grid out, per thickness', () => {
    const arms = expectedAcquisitions(plan, [7])
      .filter((a) => a.phantomThicknessCm === 10)
      .map((a) => `${a.arm}@${a.kvp}#${a.replicate}`);

    expect(arms).toEqual([
      'grid@70#1',
      'grid@70#2',
      'grid@70#3',
      'grid@90#1',
      'grid@90#2',
      'grid@90#3',
      'no_grid@70#1',
      'no_grid@70#2',
      'no_grid@70#3',
      'no_grid@90#1',
      'no_grid@90#2',
      'no_grid@90#3',
    ]);
  });

  it('uses the planned mAs of each arm under manual exposure and the chamber under AEC', () => {
    const manual = expectedAcquisitions(plan, [7]);
    const aec = expectedAcquisitions(
      { ...plan, exposure: { mode: 'aec', chamber: 'centre' } },
      [7],
    );

    expect(manual.find((a) => a.arm === 'grid')?.exposure).toEqual({
      mode: 'manual',
      exposureMas: 16,
    });
    expect(manual.find((a) => a.arm === 'no_grid')?.exposure).toEqual({
      mode: 'manual',
      exposureMas: 5,
    });
    expect(aec[0]?.exposure).toEqual({ mode: 'aec', chamber: 'centre' });
  });

  it('carries the geometry onto every exposure', () => {
    const list = expectedAcquisitions(plan, [7]);

    expect(
      list.every(
        (a) =>
          a.sidCm === 115 && a.fieldWidthCm === 30 && a.fieldHeightCm === 30,
      ),
    ).toBe(true);
  });

  it('counts a single replicate of a single condition as two exposures', () => {
    const one = studyPlanSchema.parse({
      ...planInput,
      phantom: { material: 'water', thicknessesCm: [15] },
      beamQualities: [{ kvp: 81 }],
      replicates: 1,
    });

    expect(expectedAcquisitions(one, [1]).map((a) => a.arm)).toEqual([
      'grid',
      'no_grid',
    ]);
  });
});

describe('describeFiltration', () => {
  it('writes layers in order and says none for an empty list', () => {
    expect(describeFiltration([])).toBe('none');
    expect(
      describeFiltration([
        { material: 'Cu', thicknessMm: 0.1 },
        { material: 'Al', thicknessMm: 1 },
      ]),
    ).toBe('0.1 mm Cu + 1 mm Al');
  });
});

describe('studyPlanSchema', () => {
  it('refuses repeated thicknesses, repeated beam qualities and impossible values', () => {
    const result = studyPlanSchema.safeParse({
      ...planInput,
      phantom: { material: 'pmma', thicknessesCm: [10, 10] },
      beamQualities: [{ kvp: 70 }, { kvp: 70 }],
      geometry: { sidCm: 20, fieldWidthCm: 30, fieldHeightCm: 30 },
      replicates: 0,
    });

    expect(result.success).toBe(false);
    const paths = result.error!.issues.map((i) => i.path.join('.')).sort();
    expect(paths).toEqual([
      'beamQualities',
      'geometry.sidCm',
      'phantom.thicknessesCm',
      'replicates',
    ]);
  });

  it('accepts the same kV twice when the filtration differs', () => {
    const result = studyPlanSchema.safeParse({
      ...planInput,
      beamQualities: [
        { kvp: 70 },
        { kvp: 70, addedFiltration: [{ material: 'Cu', thicknessMm: 0.1 }] },
      ],
    });

    expect(result.success).toBe(true);
  });
});
