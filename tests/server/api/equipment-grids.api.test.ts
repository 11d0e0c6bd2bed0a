import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { Grid } from '../../../server/models/grid.model.ts';
import type { browserAgent } from '../../helpers/test-app.ts';
import {
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
let physicist: ReturnType<typeof browserAgent>;
let resident: ReturnType<typeof browserAgent>;
beforeAll(async () => {
  t = await startTestApp();
  physicist = (await signedInAgent(t.app, 'physicist')).agent;
  resident = (await signedInAgent(t.app, 'resident')).agent;
});
afterAll(async () => {
  await t.close();
});

const unique = (label: string): string =>
  `${label} ${randomUUID().slice(0, 8)}`;

describe('deriving grid construction without saving', () => {
  // PHYSICS.md §1 worked examples (r = h/D, IAEA Diagnostic Radiology
  // Physics (2014) §6.3.4): h 2 mm, D 0.25 mm → r 8; h 1.6 mm, D 0.10 mm →
  // r 16; h 6 mm, D 0.5 mm → r 12. Lengths are sent in µm.
  it.each([
    { stripHeightUm: 2000, interspaceWidthUm: 250, ratio: 8 },
    { stripHeightUm: 1600, interspaceWidthUm: 100, ratio: 16 },
    { stripHeightUm: 6000, interspaceWidthUm: 500, ratio: 12 },
  ])(
    'derives r $ratio from h $stripHeightUm µm and D $interspaceWidthUm µm',
    async ({ stripHeightUm, interspaceWidthUm, ratio }) => {
      const res = await resident
        .post('/api/equipment/grids/derive')
        .send({ stripHeightUm, interspaceWidthUm });
      expect(res.status).toBe(200);
      expect(res.body.data.values.ratio).toBeCloseTo(ratio, 10);
      expect(res.body.data.derivedFields).toEqual(['ratio']);
      expect(res.body.data.missing).toEqual([
        'stripFrequencyPerCm',
        'stripThicknessUm',
      ]);
      expect(res.body.data.problems).toEqual([]);
    },
  );

  it('derives D, h and N from r, N and t (PHYSICS.md §6 check grid)', async () => {
    // PHYSICS.md §6: N 40, t 36 µm, r 12 → D 214 µm, h 2568 µm.
    const res = await resident
      .post('/api/equipment/grids/derive')
      .send({ ratio: 12, stripFrequencyPerCm: 40, stripThicknessUm: 36 });
    expect(res.status).toBe(200);
    const { values, derivedFields, missing } = res.body.data;
    expect(values.interspaceWidthUm).toBeCloseTo(214, 9);
    expect(values.stripHeightUm).toBeCloseTo(2568, 9);
    expect(derivedFields).toEqual(['stripHeightUm', 'interspaceWidthUm']);
    expect(missing).toEqual([]);
  });

  it('derives N = 10 000/(D + t) lines/cm (PHYSICS.md §1)', async () => {
    // PHYSICS.md §1: N = 10 000 / (D + t) with D and t in µm; 250 + 50 µm
    // gives 33.33 lines/cm.
    const res = await resident.post('/api/equipment/grids/derive').send({
      stripHeightUm: 2000,
      interspaceWidthUm: 250,
      stripThicknessUm: 50,
    });
    expect(res.body.data.values.stripFrequencyPerCm).toBeCloseTo(
      10_000 / 300,
      10,
    );
  });

  it('flags each value of an inconsistent set', async () => {
    // 2000/250 = 8 (PHYSICS.md §1), so a stated ratio of 10 contradicts it.
    const res = await resident
      .post('/api/equipment/grids/derive')
      .send({ ratio: 10, stripHeightUm: 2000, interspaceWidthUm: 250 });
    expect(res.status).toBe(200);
    const problems = res.body.data.problems as {
      path: string;
      message: string;
    }[];
    expect(problems.map((p) => p.path).sort()).toEqual([
      'interspaceWidthUm',
      'ratio',
      'stripHeightUm',
    ]);
    expect(problems[0]!.message).toMatch(/Inconsistent construction/);
  });

  it('flags a derived ratio outside the common practice range', async () => {
    const res = await resident
      .post('/api/equipment/grids/derive')
      .send({ stripHeightUm: 2000, interspaceWidthUm: 50 });
    expect(res.body.data.problems).toEqual([
      {
        path: 'ratio',
        message:
          'Derived grid ratio 40: Grid ratio must be between 2 and 20 (common practice range).',
      },
    ]);
  });

  it('answers 400 naming a given value outside its range', async () => {
    const res = await resident
      .post('/api/equipment/grids/derive')
      .send({ ratio: 25, stripFrequencyPerCm: 'forty' });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([
      {
        path: 'ratio',
        message: 'Grid ratio must be between 2 and 20 (common practice range).',
      },
      {
        path: 'stripFrequencyPerCm',
        message: 'Strip frequency must be a number.',
      },
    ]);
  });
});

describe('grid inventory', () => {
  it('stores a grid entered by h and D with r marked as derived, and audits it', async () => {
    const label = unique('Wall stand grid');
    const res = await physicist.post('/api/equipment/grids').send({
      label,
      stripHeightUm: 2000,
      interspaceWidthUm: 250,
      stripThicknessUm: 50,
      stripMaterial: 'lead',
      interspaceMaterial: 'aluminium',
      focusDistanceCm: 100,
      focusRangeMinCm: 80,
      focusRangeMaxCm: 130,
      statedTp: 0.72,
      statedTs: 0.14,
      statedSelectivity: 5.1,
      statedFiguresNote: 'Maker’s data sheet',
    });
    expect(res.status).toBe(201);
    const grid = res.body.data;
    // PHYSICS.md §1 worked example: h 2 mm, D 0.25 mm → r 8.
    expect(grid.ratio).toBeCloseTo(8, 10);
    expect(grid.stripFrequencyPerCm).toBeCloseTo(10_000 / 300, 10);
    expect(grid.derivedFields).toEqual(['ratio', 'stripFrequencyPerCm']);
    expect(grid.warnings).toEqual([]);
    const stored = await Grid.findByPk(grid.id);
    expect(stored?.ratio).toBeCloseTo(8, 10);
    const audit = await AuditEvent.findOne({
      where: { action: 'grid.created', targetId: String(grid.id) },
    });
    expect(audit?.details).toMatchObject({
      label,
      derivedFields: ['ratio', 'stripFrequencyPerCm'],
    });
  });

  it('refuses an inconsistent grid with field details and writes nothing', async () => {
    const label = unique('Inconsistent grid');
    const res = await physicist.post('/api/equipment/grids').send({
      label,
      ratio: 12,
      stripFrequencyPerCm: 40,
      interspaceWidthUm: 214,
      stripThicknessUm: 100,
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    const paths = res.body.error.details
      .map((d: { path: string }) => d.path)
      .sort();
    expect(paths).toEqual([
      'interspaceWidthUm',
      'stripFrequencyPerCm',
      'stripThicknessUm',
    ]);
    expect(await Grid.count({ where: { label } })).toBe(0);
  });

  it('answers 400 with range messages that say they are common practice', async () => {
    const label = unique('Odd grid');
    const res = await physicist.post('/api/equipment/grids').send({
      label,
      ratio: 1.5,
      stripFrequencyPerCm: 120,
      focusDistanceCm: 30,
      statedTp: 1.4,
      stripMaterial: 'gold',
    });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([
      {
        path: 'ratio',
        message: 'Grid ratio must be between 2 and 20 (common practice range).',
      },
      {
        path: 'stripFrequencyPerCm',
        message:
          'Strip frequency must be between 15 and 90 lines/cm (common practice range).',
      },
      { path: 'stripMaterial', message: 'Choose a known strip material.' },
      {
        path: 'focusDistanceCm',
        message:
          'Focusing distance must be between 50 and 400 cm (common practice range).',
      },
      {
        path: 'statedTp',
        message: 'Primary transmission Tp is a transmission between 0 and 1.',
      },
    ]);
    expect(await Grid.count({ where: { label } })).toBe(0);
  });

  it('needs a ratio and a focusing range around the focusing distance', async () => {
    const res = await physicist.post('/api/equipment/grids').send({
      label: unique('Vague grid'),
      stripFrequencyPerCm: 40,
      focusDistanceCm: 100,
      focusRangeMinCm: 110,
      focusRangeMaxCm: 90,
    });
    expect(res.status).toBe(400);
    expect(res.body.error.details.map((d: { path: string }) => d.path)).toEqual(
      ['ratio', 'focusRangeMinCm', 'focusRangeMaxCm'],
    );
  });

  it('warns when stated figures contradict Σ = Tp/Ts', async () => {
    const res = await physicist.post('/api/equipment/grids').send({
      label: unique('Stated grid'),
      ratio: 12,
      stripFrequencyPerCm: 44,
      statedTp: 0.66,
      statedTs: 0.08,
      statedSelectivity: 12,
    });
    expect(res.status).toBe(201);
    // IEC 60627 selectivity Σ = Tp/Ts (PHYSICS.md §2): 0.66/0.08 = 8.25.
    expect(res.body.data.warnings).toEqual([
      {
        code: 'stated_figures_inconsistent',
        message:
          'The stated selectivity 12 differs from Tp/Ts = 8.25; check the data sheet.',
      },
    ]);
  });

  it('re-derives on update: the new entered value replaces the old, derived ones follow', async () => {
    const created = await physicist.post('/api/equipment/grids').send({
      label: unique('Editable grid'),
      stripHeightUm: 2000,
      interspaceWidthUm: 250,
    });
    const id = created.body.data.id;
    // PHYSICS.md §1: h 1.6 mm with D 0.10 mm → r 16.
    const res = await physicist
      .patch(`/api/equipment/grids/${id}`)
      .send({ stripHeightUm: 1600, interspaceWidthUm: 100 });
    expect(res.status).toBe(200);
    expect(res.body.data.ratio).toBeCloseTo(16, 10);
    expect(res.body.data.derivedFields).toEqual(['ratio']);

    const contradiction = await physicist
      .patch(`/api/equipment/grids/${id}`)
      .send({ ratio: 8 });
    expect(contradiction.status).toBe(400);
    expect((await Grid.findByPk(id))?.ratio).toBeCloseTo(16, 10);

    const audit = await AuditEvent.findOne({
      where: { action: 'grid.updated', targetId: String(id) },
      order: [['id', 'DESC']],
    });
    expect(audit?.details).toMatchObject({
      before: { stripHeightUm: 2000, interspaceWidthUm: 250, ratio: 8 },
      change: { stripHeightUm: 1600, interspaceWidthUm: 100 },
    });
  });

  it('answers 409 for a label already used', async () => {
    const label = unique('Twin grid');
    await physicist.post('/api/equipment/grids').send({ label, ratio: 8 });
    const res = await physicist
      .post('/api/equipment/grids')
      .send({ label, ratio: 10 });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe(
      `A grid labelled “${label}” already exists.`,
    );
    expect(await Grid.count({ where: { label } })).toBe(1);
  });

  it('deletes a grid and audits it; a resident cannot', async () => {
    const created = await physicist
      .post('/api/equipment/grids')
      .send({ label: unique('Spare grid'), ratio: 6 });
    const id = created.body.data.id;
    const refused = await resident.delete(`/api/equipment/grids/${id}`);
    expect(refused.status).toBe(403);
    expect(await Grid.findByPk(id)).not.toBeNull();
    const res = await physicist.delete(`/api/equipment/grids/${id}`);
    expect(res.status).toBe(204);
    expect(await Grid.findByPk(id)).toBeNull();
    expect(
      await AuditEvent.count({
        where: { action: 'grid.deleted', targetId: String(id) },
      }),
    ).toBe(1);
  });
});
