import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Grid } from '../../../server/models/grid.model.ts';
import type { Role } from '../../../shared/permissions.ts';
import type {
  GeometryPlanDto,
  PredictedFiguresDto,
} from '../../../shared/schemas/geometry-api.schema.ts';
import { buildGridWith } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgentsByRole,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

const ROLES = ['admin', 'physicist', 'resident', 'committee'] as const;

let t: TestApp;
let agents: Record<Role, ReturnType<typeof browserAgent>>;
let focusedGrid: Grid;
let parallelGrid: Grid;
beforeAll(async () => {
  t = await startTestApp();
  agents = await signedInAgentsByRole(t.app);
  // The PHYSICS.md §6 construction: N 40, t 36 µm, r 12 (D 214, h 2568 µm).
  focusedGrid = await buildGridWith({
    label: `Geometry G12 ${randomUUID().slice(0, 8)}`,
    ratio: 12,
    stripFrequencyPerCm: 40,
    stripHeightUm: 2568,
    interspaceWidthUm: 214,
    stripThicknessUm: 36,
    derivedFields: ['stripHeightUm', 'interspaceWidthUm'],
    stripMaterial: 'lead',
    interspaceMaterial: 'aluminium',
    focusDistanceCm: 100,
  });
  parallelGrid = await buildGridWith({
    label: `Geometry parallel ${randomUUID().slice(0, 8)}`,
    ratio: 6,
    coverMaterial: 'carbon-fibre',
  });
});
afterAll(async () => {
  await Grid.destroy({ where: { id: [focusedGrid.id, parallelGrid.id] } });
  await t.close();
});

/** r 10 focused at 100 cm, 40 cm field: the §5 distance-only example. */
const PLAN = {
  ratio: 10,
  focusDistanceCm: 100,
  sourceGridDistanceCm: 80,
  fieldWidthCm: 40,
};

/** The §6 construction typed in, aluminium interspace, 60 keV. */
const TRANSMISSION = {
  construction: { ratio: 12, stripFrequencyPerCm: 40, stripThicknessUm: 36 },
  interspaceMaterial: 'aluminium',
  beam: { kind: 'energy', energyKeV: 60 },
  scatterToPrimaryRatio: 4,
};

describe('who may use /api/geometry', () => {
  const routes = () => [
    { method: 'post' as const, url: '/api/geometry/plan', body: PLAN },
    {
      method: 'post' as const,
      url: '/api/geometry/transmission',
      body: TRANSMISSION,
    },
    {
      method: 'get' as const,
      url: `/api/geometry/grids/${focusedGrid.id}/prediction?kvp=80&spr=4`,
    },
  ];

  it('answers 401 without a session on every route', async () => {
    for (const route of routes()) {
      const agent = browserAgent(t.app);
      const res =
        route.method === 'get'
          ? await agent.get(route.url)
          : await agent.post(route.url).send(route.body);
      expect(res.status, route.url).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
    const studyRes = await request(t.app).get(
      '/api/geometry/studies/1/predictions?spr=4',
    );
    expect(studyRes.status).toBe(401);
  });

  it.each(ROLES)('answers 200 to a %s on every route', async (role) => {
    for (const route of routes()) {
      const res =
        route.method === 'get'
          ? await agents[role].get(route.url)
          : await agents[role].post(route.url).send(route.body);
      expect(res.status, `${role} ${route.url}: ${res.text}`).toBe(200);
      expect(res.body.data).toBeDefined();
    }
  });
});

describe('POST /api/geometry/plan', () => {
  const plan = async (body: object): Promise<GeometryPlanDto> => {
    const res = await agents.resident.post('/api/geometry/plan').send(body);
    expect(res.status, res.text).toBe(200);
    return res.body.data as GeometryPlanDto;
  };

  it('loses 0.24 everywhere with r 12 and a 2 cm lateral offset at f0', async () => {
    const data = await plan({
      ratio: 12,
      focusDistanceCm: 100,
      sourceGridDistanceCm: 100,
      lateralOffsetCm: 2,
      fieldWidthCm: 30,
    });
    // PHYSICS.md §5 check values (derived): r 12, b 2 cm, f0 100 → L 0.24.
    expect(data.centreLossFraction).toBeCloseTo(0.24, 10);
    expect(data.edgeLossFraction).toBeCloseTo(0.24, 10);
  });

  it('loses 0.50 at the edge of a 40 cm field with r 10, f0 100 at 80 cm, and warns', async () => {
    const data = await plan(PLAN);
    // PHYSICS.md §5 check values (derived): r 10, f0 100, f1 80, c 20 → 0.50.
    expect(data.edgeLossFraction).toBeCloseTo(0.5, 10);
    expect(data.centreLossFraction).toBe(0);
    // PHYSICS.md §5 check values: limits at c = 20 cm, r 10 → 83.3–125.0 cm.
    expect(data.focusingRange.nearCm).toBeCloseTo(83.3, 1);
    expect(data.focusingRange.farCm).toBeCloseTo(125.0, 1);
    expect(data.focusingRange.criterion).toBe(0.6);
    expect(data.isWithinFocusingRange).toBe(false);
    expect(data.warnings.map((w) => w.code)).toContain(
      'outside_focusing_range',
    );
    expect(data.profile).toHaveLength(41);
    expect(data.profile[0]!.positionCm).toBe(-20);
    expect(data.grid).toBeNull();
    expect(data.input).toMatchObject(PLAN);
  });

  it('gives the focusing range 83.3–125.0 cm and no warning inside it', async () => {
    const data = await plan({ ...PLAN, sourceGridDistanceCm: 100 });
    // PHYSICS.md §5 check values: r 10 f0 100 c 20 → 83.3–125.0 cm.
    expect(data.focusingRange.nearCm).toBeCloseTo(83.333, 2);
    expect(data.focusingRange.farCm).toBeCloseTo(125.0, 6);
    expect(data.isWithinFocusingRange).toBe(true);
    expect(data.warnings).toEqual([]);
  });

  it('says where an upside-down r 10 grid cuts off completely', async () => {
    const data = await plan({
      ...PLAN,
      sourceGridDistanceCm: 100,
      isUpsideDown: true,
    });
    // PHYSICS.md §5 check values: upside-down r 10 f0 100 → total beyond 5.0 cm.
    expect(data.upsideDownTotalCutoffCm).toBeCloseTo(5.0, 10);
    expect(data.warnings.map((w) => w.code)).toEqual(
      expect.arrayContaining(['grid_upside_down', 'total_cutoff_in_field']),
    );
  });

  it('takes ratio and focusing distance from a register grid', async () => {
    const data = await plan({
      gridId: focusedGrid.id,
      sourceGridDistanceCm: 100,
      fieldWidthCm: 40,
    });
    // PHYSICS.md §5 check values: limits at c = 20 cm, r 12 → 85.7–120.0 cm.
    expect(data.focusingRange.nearCm).toBeCloseTo(85.7, 1);
    expect(data.focusingRange.farCm).toBeCloseTo(120.0, 6);
    expect(data.input.ratio).toBe(12);
    expect(data.grid).toEqual({ id: focusedGrid.id, label: focusedGrid.label });
  });

  it('uses an edited criterion', async () => {
    const data = await plan({ ...PLAN, focusingCriterion: 0.8 });
    // Derived from PHYSICS.md §5: 1/f = 1/f0 ± (1 − 0.8)/(r·c) = 0.01 ± 0.001.
    expect(data.focusingRange.nearCm).toBeCloseTo(1 / 0.011, 6);
    expect(data.focusingRange.farCm).toBeCloseTo(1 / 0.009, 6);
    expect(data.focusingRange.criterionSource).toBe('chosen by the user');
  });

  it.each([
    [{ ...PLAN, ratio: -2 }, 'ratio'],
    [{ ...PLAN, fieldWidthCm: 'wide' }, 'fieldWidthCm'],
    [{ ...PLAN, focusingCriterion: 1.2 }, 'focusingCriterion'],
    [{ ...PLAN, focusDistanceCm: undefined }, 'focusDistanceCm'],
    [{ ...PLAN, gridId: 1 }, 'gridId'],
  ])('answers 400 naming the field for %j', async (body, field) => {
    const res = await agents.physicist.post('/api/geometry/plan').send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(
      res.body.error.details.map((d: { path: string }) => d.path),
    ).toContain(field);
  });

  it('answers 400 on gridId for a grid not in the register or without a focusing distance', async () => {
    for (const gridId of [2_000_000_000, parallelGrid.id]) {
      const res = await agents.physicist
        .post('/api/geometry/plan')
        .send({ gridId, sourceGridDistanceCm: 100, fieldWidthCm: 40 });
      expect(res.status).toBe(400);
      expect(res.body.error.details[0].path).toBe('gridId');
    }
  });
});

describe('POST /api/geometry/transmission', () => {
  const predict = async (body: object): Promise<PredictedFiguresDto> => {
    const res = await agents.committee
      .post('/api/geometry/transmission')
      .send(body);
    expect(res.status, res.text).toBe(200);
    return res.body.data as PredictedFiguresDto;
  };

  it('predicts Tp 0.7061 for N 40, t 36 µm, r 12, aluminium, 60 keV', async () => {
    const data = await predict(TRANSMISSION);
    // PHYSICS.md §6 check values (derived, μ from xraylib): 0.7061.
    expect(Math.abs(data.primaryTransmission - 0.7061)).toBeLessThan(1e-4);
    expect(data.construction.interspaceWidthUm).toBeCloseTo(214, 9);
    expect(data.construction.stripHeightUm).toBeCloseTo(2568, 9);
    expect(data.beam.description).toContain('60 keV');
    expect(data.assumptions.scatterToPrimaryRatio).toBe(4);
    expect(data.assumptions.scatterModel).toContain('Day & Dance');
  });

  it('derives K, B, Σ, SIF from Tp, Ts and the assumed SPR', async () => {
    const data = await predict(TRANSMISSION);
    const tp = data.primaryTransmission;
    const ts = data.scatterTransmission;
    // PHYSICS.md §2: Tt = (Tp + SPR·Ts)/(1 + SPR), K = Tp/Tt, B = 1/Tt,
    // Σ = Tp/Ts, SIF = Tp/√Tt.
    const tt = (tp + 4 * ts) / 5;
    expect(data.figures.totalTransmission).toBeCloseTo(tt, 12);
    expect(data.figures.contrastImprovementFactor).toBeCloseTo(tp / tt, 12);
    expect(data.figures.buckyFactor).toBeCloseTo(1 / tt, 12);
    expect(data.figures.selectivity).toBeCloseTo(tp / ts, 12);
    expect(data.figures.snrImprovementFactor).toBeCloseTo(
      tp / Math.sqrt(tt),
      12,
    );
  });

  it('predicts the same Tp for the register grid of that construction', async () => {
    const data = await predict({
      gridId: focusedGrid.id,
      beam: { kind: 'energy', energyKeV: 60 },
      scatterToPrimaryRatio: 2,
    });
    // PHYSICS.md §6 check values (derived): 0.7061 at 60 keV, Al interspace.
    expect(Math.abs(data.primaryTransmission - 0.7061)).toBeLessThan(1e-4);
    expect(data.grid?.id).toBe(focusedGrid.id);
  });

  it('predicts Tp 0.7606 at 100 keV', async () => {
    const data = await predict({
      ...TRANSMISSION,
      beam: { kind: 'energy', energyKeV: 100 },
    });
    // PHYSICS.md §6 check values (derived): at 100 keV 0.7606 (Al).
    expect(Math.abs(data.primaryTransmission - 0.7606)).toBeLessThan(1e-4);
  });

  it('weights an uploaded two-line spectrum between its single-energy values', async () => {
    const single60 = await predict(TRANSMISSION);
    const single100 = await predict({
      ...TRANSMISSION,
      beam: { kind: 'energy', energyKeV: 100 },
    });
    const data = await predict({
      ...TRANSMISSION,
      beam: {
        kind: 'spectrum',
        spectrumCsv: 'energy_keV,fluence\n60,1\n100,1\n',
        fileName: 'two-lines.csv',
        weighting: 'photons',
      },
    });
    // Photon weighting of two equal lines is their plain mean (definition).
    expect(data.primaryTransmission).toBeCloseTo(
      (single60.primaryTransmission + single100.primaryTransmission) / 2,
      12,
    );
    expect(data.beam.description).toContain('two-lines.csv');
  });

  it('names the Kramers model and the filtration for a kV beam', async () => {
    const data = await predict({
      ...TRANSMISSION,
      beam: { kind: 'kramers', kvp: 80 },
    });
    expect(data.beam.spectrumModel).toContain('Kramers');
    expect(data.beam.description).toContain('2.5 mm Al');
    expect(data.assumptions.weighting).toBe('energy');
    expect(data.primaryTransmission).toBeGreaterThan(0);
    expect(data.primaryTransmission).toBeLessThan(1);
  });

  it.each([
    [{ ...TRANSMISSION, interspaceMaterial: undefined }, 'interspaceMaterial'],
    [
      { ...TRANSMISSION, interspaceMaterial: 'unobtainium' },
      'interspaceMaterial',
    ],
    [
      { ...TRANSMISSION, beam: { kind: 'energy', energyKeV: 500 } },
      'beam.energyKeV',
    ],
    [{ ...TRANSMISSION, beam: { kind: 'kramers', kvp: 400 } }, 'beam.kvp'],
    [{ ...TRANSMISSION, scatterToPrimaryRatio: -1 }, 'scatterToPrimaryRatio'],
    [{ ...TRANSMISSION, construction: { ratio: -12 } }, 'construction.ratio'],
    [{ ...TRANSMISSION, gridId: 5 }, 'construction'],
  ])('answers 400 naming the field for %j', async (body, field) => {
    const res = await agents.resident
      .post('/api/geometry/transmission')
      .send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(
      res.body.error.details.map((d: { path: string }) => d.path),
    ).toContain(field);
  });

  it('answers 400 with the reason for a construction that does not fix the grid or a bad spectrum file', async () => {
    const underdetermined = await agents.resident
      .post('/api/geometry/transmission')
      .send({ ...TRANSMISSION, construction: { ratio: 12 } });
    expect(underdetermined.status).toBe(400);
    expect(underdetermined.body.error.message).toContain('Not enough to fix');
    const badFile = await agents.resident
      .post('/api/geometry/transmission')
      .send({
        ...TRANSMISSION,
        beam: { kind: 'spectrum', spectrumCsv: '60,1\nsixty,2\n' },
      });
    expect(badFile.status).toBe(400);
    expect(badFile.body.error.message).toContain('line 2');
    const unpredictable = await agents.resident
      .post('/api/geometry/transmission')
      .send({
        gridId: parallelGrid.id,
        beam: { kind: 'energy', energyKeV: 60 },
        scatterToPrimaryRatio: 4,
      });
    expect(unpredictable.status).toBe(400);
    expect(unpredictable.body.error.message).toContain('interspace material');
  });
});

describe('GET /api/geometry/grids/:id/prediction', () => {
  it('predicts a register grid for a kV beam, stating the assumed filtration', async () => {
    const res = await agents.admin.get(
      `/api/geometry/grids/${focusedGrid.id}/prediction?kvp=80&spr=4`,
    );
    expect(res.status).toBe(200);
    const data = res.body.data as PredictedFiguresDto;
    expect(data.beam.description).toContain('assumed');
    expect(data.assumptions.scatterToPrimaryRatio).toBe(4);
    expect(data.figures.selectivity).toBeCloseTo(
      data.primaryTransmission / data.scatterTransmission,
      12,
    );
  });

  it('answers 400 naming the query field and 404 for an unknown grid', async () => {
    const missing = await agents.admin.get(
      `/api/geometry/grids/${focusedGrid.id}/prediction?spr=4`,
    );
    expect(missing.status).toBe(400);
    expect(missing.body.error.details[0].path).toBe('kvp');
    const unknown = await agents.admin.get(
      '/api/geometry/grids/2000000000/prediction?kvp=80&spr=4',
    );
    expect(unknown.status).toBe(404);
  });
});
