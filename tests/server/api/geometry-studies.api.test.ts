import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Grid } from '../../../server/models/grid.model.ts';
import type { Role } from '../../../shared/permissions.ts';
import { kramersSpectrum } from '../../../shared/physics/x-ray-spectrum.ts';
import type {
  PredictedFiguresDto,
  StudyPredictionsDto,
} from '../../../shared/schemas/geometry-api.schema.ts';
import type { StudyDto } from '../../../shared/studies/study-dto.ts';
import {
  buildGrid,
  buildGridWith,
  buildRoom,
  SMALL_PLAN,
} from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgentsByRole,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
let agents: Record<Role, ReturnType<typeof browserAgent>>;
let focused: Grid;
let bare: Grid;
let study: StudyDto;
beforeAll(async () => {
  t = await startTestApp();
  agents = await signedInAgentsByRole(t.app);
  const room = await buildRoom();
  // r 10 focused at 100 cm with an aluminium interspace, N 40, t 36 µm.
  focused = await buildGridWith({
    label: `G10 geometry ${randomUUID().slice(0, 8)}`,
    roomId: room.id,
    ratio: 10,
    stripFrequencyPerCm: 40,
    stripHeightUm: 2140,
    interspaceWidthUm: 214,
    stripThicknessUm: 36,
    derivedFields: ['stripHeightUm', 'interspaceWidthUm'],
    stripMaterial: 'lead',
    interspaceMaterial: 'aluminium',
    focusDistanceCm: 100,
  });
  // Ratio and frequency only, no interspace material: not predictable.
  bare = await buildGrid(12, room.id);
  const res = await agents.physicist.post('/api/studies').send({
    title: 'Bedside geometry at 80 cm',
    purpose: 'Does a 100 cm focused grid work at 80 cm over a 40 cm field?',
    roomId: room.id,
    detectorId: null,
    gridIds: [focused.id, bare.id],
    plan: {
      ...SMALL_PLAN,
      geometry: { sidCm: 80, fieldWidthCm: 40, fieldHeightCm: 30 },
    },
  });
  expect(res.status, res.text).toBe(201);
  study = res.body.data as StudyDto;
});
afterAll(async () => {
  await t.close();
});

describe('the geometry check on a study', () => {
  it('puts a focusing-range warning on the study when the planned SID is outside', async () => {
    const res = await agents.resident.get(`/api/studies/${study.id}`);
    expect(res.status).toBe(200);
    const warnings = (res.body.data as StudyDto).geometryWarnings;
    const codes = warnings.map((w) => w.code);
    // G10 (r 10, f0 100) at 80 cm is outside 83.3–125.0 cm (PHYSICS.md §5
    // check values); the bare G12 (f0 115 cm) range at c = 20 cm,
    // 1/(1/115 ± 0.4/240) → 96.5–142.3 cm (PHYSICS.md §5 formula), is missed too.
    expect(codes).toEqual([
      'sid_outside_focusing_range',
      'sid_outside_focusing_range',
    ]);
    expect(warnings[0]!.message).toContain(focused.label);
    expect(warnings[0]!.message).toContain('83.3–125.0 cm');
    expect(warnings[1]!.message).toContain('96.5–142.3 cm');
  });

  it('clears the warning when the plan moves inside the range', async () => {
    const res = await agents.physicist.post('/api/studies').send({
      title: 'Wall stand at 100 cm',
      purpose: 'The same grid at its focusing distance.',
      roomId: focused.roomId,
      detectorId: null,
      gridIds: [focused.id],
      plan: {
        ...SMALL_PLAN,
        geometry: { sidCm: 100, fieldWidthCm: 40, fieldHeightCm: 30 },
      },
    });
    expect(res.status).toBe(201);
    expect((res.body.data as StudyDto).geometryWarnings).toEqual([]);
  });
});

describe('GET /api/geometry/studies/:id/predictions', () => {
  const url = () => `/api/geometry/studies/${study.id}/predictions?spr=3`;

  it('answers 401 without a session', async () => {
    const res = await browserAgent(t.app).get(url());
    expect(res.status).toBe(401);
  });

  it.each(['admin', 'physicist', 'resident'] as const)(
    'answers 200 to a %s who may see the study',
    async (role) => {
      const res = await agents[role].get(url());
      expect(res.status).toBe(200);
      expect((res.body.data as StudyPredictionsDto).conditions).toHaveLength(
        study.conditions.length,
      );
    },
  );

  it('answers 404 to a committee member for a draft study (the study rule)', async () => {
    const res = await agents.committee.get(url());
    expect(res.status).toBe(404);
  });

  it('answers 400 naming spr when it is missing', async () => {
    const res = await agents.physicist.get(
      `/api/geometry/studies/${study.id}/predictions`,
    );
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('spr');
  });

  it('predicts each condition through its phantom, and says why a grid cannot be', async () => {
    const res = await agents.physicist.get(url());
    const data = res.body.data as StudyPredictionsDto;
    expect(data.scatterToPrimaryRatio).toBe(3);
    const ofFocused = data.conditions.filter((c) => c.gridId === focused.id);
    const ofBare = data.conditions.filter((c) => c.gridId === bare.id);
    expect(ofFocused.length).toBeGreaterThan(0);
    for (const entry of ofBare) {
      expect(entry.prediction).toBeNull();
      expect(entry.unavailableReason).toContain('interspace material');
    }
    const at70 = ofFocused.find((c) => c.conditionLabel.startsWith('70 kV'))!;
    expect(at70.prediction!.beam.description).toContain('hardened by 20 cm');
    expect(at70.prediction!.beam.description).toContain('assumed');

    // The same filtered Kramers spectrum sent as a file gives the same Tp:
    // 70 kV through 2.5 mm Al and 200 mm PMMA (Kramers, Phil Mag 1923).
    const spectrum = kramersSpectrum(70, [
      { material: 'aluminium', thicknessMm: 2.5 },
      { material: 'pmma', thicknessMm: 200 },
    ]);
    const direct = await agents.physicist
      .post('/api/geometry/transmission')
      .send({
        gridId: focused.id,
        beam: {
          kind: 'spectrum',
          spectrumCsv: spectrum
            .map((b) => `${b.energyKeV},${b.fluence}`)
            .join('\n'),
        },
        scatterToPrimaryRatio: 3,
      });
    expect(direct.status, direct.text).toBe(200);
    const expected = direct.body.data as PredictedFiguresDto;
    expect(at70.prediction!.primaryTransmission).toBeCloseTo(
      expected.primaryTransmission,
      10,
    );
    expect(at70.prediction!.scatterTransmission).toBeCloseTo(
      expected.scatterTransmission,
      10,
    );
  });
});
