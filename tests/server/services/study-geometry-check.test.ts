import { afterAll, describe, expect, it } from 'vitest';
import { sequelize } from '../../../server/db/sequelize.ts';
import { ImageAssignment } from '../../../server/models/image-assignment.model.ts';
import { StudyCondition } from '../../../server/models/study-condition.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import {
  loadGeometryCheckImages,
  studyGeometryWarnings,
  type GeometryCheckGrid,
  type GeometryCheckImage,
} from '../../../server/services/study-geometry-check.service.ts';
import {
  studyPlanSchema,
  type StudyPlan,
} from '../../../shared/schemas/study.schema.ts';
import { buildUser } from '../../helpers/factories.ts';
import {
  buildGrid,
  buildImageRow,
  buildRoom,
  SMALL_PLAN,
} from '../../helpers/study-factories.ts';

afterAll(async () => {
  await sequelize.close();
});

function planWith(sidCm: number, fieldWidthCm: number): { plan: StudyPlan } {
  return {
    plan: studyPlanSchema.parse({
      ...SMALL_PLAN,
      geometry: { sidCm, fieldWidthCm, fieldHeightCm: 30 },
    }),
  };
}

const G10: GeometryCheckGrid = {
  id: 1,
  label: 'G10',
  ratio: 10,
  focusDistanceCm: 100,
};
const PARALLEL: GeometryCheckGrid = {
  id: 2,
  label: 'P6',
  ratio: 6,
  focusDistanceCm: null,
};

function image(
  overrides: Partial<GeometryCheckImage> & { id: number },
): GeometryCheckImage {
  return {
    originalName: `IMG-${overrides.id}.dcm`,
    sidMm: 1000,
    gridFocalDistanceMm: null,
    gridAspectRatio: null,
    gridId: G10.id,
    arm: 'grid',
    ...overrides,
  };
}

describe('studyGeometryWarnings from the plan', () => {
  it('warns when the planned SID is outside the focusing range, with the numbers', () => {
    const warnings = studyGeometryWarnings(planWith(80, 40), [G10]);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]!.code).toBe('sid_outside_focusing_range');
    // PHYSICS.md §5 check values: limits at c = 20 cm, r 10 f0 100 → 83.3–125.0 cm.
    expect(warnings[0]!.message).toContain('83.3–125.0 cm');
    expect(warnings[0]!.message).toContain('the planned SID is 80 cm, outside');
    expect(warnings[0]!.message).toContain(
      'Grid G10 (10:1, focused at 100 cm)',
    );
    expect(warnings[0]!.message).toContain('40 cm field');
    expect(warnings[0]!.message).toContain('from memory of IEC 60627');
  });

  it('gives the r 12, f0 180 range 138.5–257.1 cm at a 40 cm field', () => {
    const grid = { id: 3, label: 'G12 chest', ratio: 12, focusDistanceCm: 180 };
    const [warning] = studyGeometryWarnings(planWith(130, 40), [grid]);
    // PHYSICS.md §5 check values: r 12 f0 180 at c = 20 cm → 138.5–257.1 cm.
    expect(warning!.message).toContain('138.5–257.1 cm');
    expect(studyGeometryWarnings(planWith(140, 40), [grid])).toEqual([]);
    expect(studyGeometryWarnings(planWith(255, 40), [grid])).toEqual([]);
    expect(studyGeometryWarnings(planWith(260, 40), [grid])).toHaveLength(1);
  });

  it('is silent inside the range, for a small field, and for a grid without a focusing distance', () => {
    expect(studyGeometryWarnings(planWith(100, 40), [G10])).toEqual([]);
    // PHYSICS.md §5 formula: c = 5 cm widens the r 10 range to 1/(0.01 ± 0.008) → 55.6–500 cm.
    expect(studyGeometryWarnings(planWith(80, 10), [G10])).toEqual([]);
    expect(studyGeometryWarnings(planWith(80, 40), [PARALLEL])).toEqual([]);
  });
});

describe('studyGeometryWarnings from the image headers', () => {
  it('warns for grid images whose header SID is outside while the plan is inside', () => {
    const warnings = studyGeometryWarnings(
      planWith(100, 40),
      [G10],
      [image({ id: 1, sidMm: 1500 }), image({ id: 2, sidMm: 1000 })],
    );
    expect(warnings).toHaveLength(1);
    expect(warnings[0]!.message).toContain(
      'the SID in the header of IMG-1.dcm is 150 cm, outside',
    );
    // PHYSICS.md §5 check values: r 10 f0 100 c 20 → 83.3–125.0 cm.
    expect(warnings[0]!.message).toContain('83.3–125.0 cm');
  });

  it('skips no-grid images and images with nothing to check against', () => {
    const warnings = studyGeometryWarnings(
      planWith(100, 40),
      [G10],
      [
        image({ id: 1, sidMm: 1500, arm: 'no_grid' }),
        image({ id: 2, sidMm: null }),
        image({ id: 3, sidMm: 1500, gridId: null, arm: null }),
      ],
    );
    expect(warnings).toEqual([]);
  });

  it("uses the header's Grid Focal Distance and Grid Aspect Ratio for an image not tied to a register grid", () => {
    const warnings = studyGeometryWarnings(
      planWith(100, 40),
      [],
      [
        image({
          id: 4,
          sidMm: 800,
          gridId: null,
          arm: null,
          gridFocalDistanceMm: 1000,
          gridAspectRatio: [10, 1],
        }),
      ],
    );
    expect(warnings).toHaveLength(1);
    expect(warnings[0]!.message).toContain(
      'The grid named in the header (10:1, focused at 100 cm)',
    );
    expect(warnings[0]!.message).toContain('83.3–125.0 cm');
  });

  it('prefers the register grid to the header when the image is assigned', () => {
    const warnings = studyGeometryWarnings(
      planWith(100, 40),
      [G10],
      [image({ id: 5, sidMm: 1150, gridFocalDistanceMm: 1800 })],
    );
    expect(warnings).toEqual([]);
  });

  it('groups images at the same distance into one warning and names a few', () => {
    const images = [1, 2, 3, 4, 5].map((id) => image({ id, sidMm: 1400 }));
    const warnings = studyGeometryWarnings(planWith(100, 40), [G10], images);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]!.message).toContain(
      'IMG-1.dcm, IMG-2.dcm, IMG-3.dcm and 2 more',
    );
  });

  it('does not repeat the plan warning for images at the planned SID', () => {
    const warnings = studyGeometryWarnings(
      planWith(80, 40),
      [G10],
      [image({ id: 1, sidMm: 800 })],
    );
    expect(warnings).toHaveLength(1);
    expect(warnings[0]!.message).toContain('planned SID');
  });
});

describe('loadGeometryCheckImages', () => {
  it("reads SID with the user's correction, and the grid and arm of each assignment", async () => {
    const user = await buildUser({ role: 'physicist' });
    const room = await buildRoom();
    const grid = await buildGrid(10, room.id);
    const study = await Study.create({
      roomId: room.id,
      detectorId: null,
      title: 'Geometry check loader',
      purpose: 'Read header facts for the focusing-range check.',
      plan: planWith(100, 40).plan,
      createdBy: user.id,
    });
    const condition = await StudyCondition.create({
      studyId: study.id,
      conditionKey: `k-${study.id}`,
      position: 1,
      kvp: 70,
      addedFiltration: [],
      hvlMmAl: null,
      phantomThicknessCm: 20,
      gridId: grid.id,
    });
    const assigned = await buildImageRow({
      uploadedBy: user.id,
      studyId: study.id,
    });
    await assigned.update({
      gridFocalDistanceMm: 1150,
      gridAspectRatio: [10, 1],
      corrections: {
        sidMm: {
          value: 1500,
          reason: 'The stand was at 150 cm.',
          correctedBy: user.id,
          correctedAt: new Date().toISOString(),
        },
      },
    });
    await ImageAssignment.create({
      imageId: assigned.id,
      studyId: study.id,
      conditionId: condition.id,
      arm: 'grid',
      replicate: 1,
      proposedBy: 'user',
      reason: '',
      assignedBy: user.id,
    });
    const loose = await buildImageRow({
      uploadedBy: user.id,
      studyId: study.id,
    });

    const loaded = await loadGeometryCheckImages(study.id);

    expect(loaded).toEqual([
      {
        id: assigned.id,
        originalName: assigned.originalName,
        sidMm: 1500,
        gridFocalDistanceMm: 1150,
        gridAspectRatio: [10, 1],
        gridId: grid.id,
        arm: 'grid',
      },
      {
        id: loose.id,
        originalName: loose.originalName,
        sidMm: 1150,
        gridFocalDistanceMm: null,
        gridAspectRatio: null,
        gridId: null,
        arm: null,
      },
    ]);
  });
});
