import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sequelize } from '../../../server/db/sequelize.ts';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { ROLES, type Role } from '../../../shared/permissions.ts';
import type {
  BaselineDto,
  CompareBoardDto,
  RoomSummaryDto,
  RoomTrendDto,
} from '../../../shared/schemas/compare.schema.ts';
import {
  seedStudyWithResults,
  type SeededStudy,
} from '../../helpers/results-factories.ts';
import { buildGrid, buildRoom } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

/**
 * Baselines over HTTP: who may set, change and remove them, the flags they
 * raise on later studies (just outside the tolerance and not just inside),
 * trends with the tolerance band and the room summary.
 */

let t: TestApp;
const agents = new Map<
  Role,
  Awaited<ReturnType<typeof signedInAgent>>['agent']
>();
let room: Awaited<ReturnType<typeof buildRoom>>;
let source: SeededStudy;
let justOutside: SeededStudy;
let justInside: SeededStudy;
let unsigned: SeededStudy;

const sif = (value: number) => ({
  snr_improvement_factor: { value, se: 0.01 },
});

beforeAll(async () => {
  t = await startTestApp();
  for (const role of ROLES)
    agents.set(role, (await signedInAgent(t.app, role)).agent);
  room = await buildRoom();
  const grid = await buildGrid(12, room.id);
  const at = (date: string) => ({
    room,
    grids: [grid],
    signedAt: new Date(date),
  });
  source = await seedStudyWithResults({
    ...at('2026-02-01T09:00:00Z'),
    title: 'Acceptance',
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: { ...sif(1.2), bucky_factor: { value: 4, se: 0.1 } },
      },
      { kvp: 81, phantomThicknessCm: 25, figures: sif(1.4) },
    ],
  });
  // Baseline 1.2 with ±10 %: band 1.08 … 1.32 (by hand).
  justOutside = await seedStudyWithResults({
    ...at('2026-05-01T09:00:00Z'),
    title: 'Routine May',
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: { ...sif(1.3201), bucky_factor: { value: 4.1, se: 0.1 } },
      },
    ],
  });
  justInside = await seedStudyWithResults({
    ...at('2026-08-01T09:00:00Z'),
    title: 'Routine August',
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: { ...sif(1.3199), bucky_factor: { value: 4.2, se: 0.1 } },
      },
    ],
  });
  unsigned = await seedStudyWithResults({
    room,
    grids: [grid],
    status: 'draft',
    conditions: [{ kvp: 81, phantomThicknessCm: 20, figures: sif(1.25) }],
  });
});

afterAll(async () => {
  await t.close();
  await sequelize.close();
});

const create = (role: Role, body: object) =>
  agents.get(role)!.post('/api/baselines').send(body);

describe('POST /api/baselines', () => {
  it('answers 401 without a session', async () => {
    const res = await browserAgent(t.app)
      .post('/api/baselines')
      .send({ conditionId: source.conditions[0]!.id });
    expect(res.status).toBe(401);
  });

  it.each(['committee', 'resident', 'admin'] as const)(
    'answers 403 to the %s',
    async (role) => {
      const res = await create(role, { conditionId: source.conditions[0]!.id });
      expect(res.status).toBe(403);
      expect(res.body.error).toEqual({
        code: 'forbidden',
        message: 'Only physicists set baselines.',
      });
    },
  );

  it('refuses an unsigned study’s condition (409), an unknown one (404), bad tolerances (400)', async () => {
    const draft = await create('physicist', {
      conditionId: unsigned.conditions[0]!.id,
    });
    expect(draft.status).toBe(409);
    expect(draft.body.error.code).toBe('conflict');
    expect((await create('physicist', { conditionId: 999999999 })).status).toBe(
      404,
    );
    const notHeld = await create('physicist', {
      conditionId: source.conditions[0]!.id,
      tolerances: { selectivity: 5 },
    });
    expect(notHeld.status).toBe(400);
    expect(notHeld.body.error.details[0].path).toBe('tolerances.selectivity');
    const tooWide = await create('physicist', {
      conditionId: source.conditions[0]!.id,
      tolerances: { bucky_factor: 150 },
    });
    expect(tooWide.status).toBe(400);
  });

  it('lets a physicist set one, with ±10 % where no tolerance is given', async () => {
    const res = await create('physicist', {
      conditionId: source.conditions[0]!.id,
      tolerances: { bucky_factor: 5 },
      note: 'Acceptance of the new wall stand.',
    });
    expect(res.status).toBe(201);
    const baseline = res.body.data as BaselineDto;
    expect(baseline).toMatchObject({
      room: { id: room.id },
      kvp: 81,
      phantomThicknessCm: 20,
      filtration: 'none',
      tolerances: { snr_improvement_factor: 10, bucky_factor: 5 },
      active: true,
      permissions: { edit: true, delete: true },
      source: { studyId: source.study.id, revision: 1 },
    });
    expect(baseline.figures.snr_improvement_factor?.value).toBe(1.2);
    expect(baseline.policyNote).toMatch(/local policy/);
    const audit = await AuditEvent.findOne({
      where: {
        targetType: 'baseline',
        targetId: String(baseline.id),
        action: 'baseline.set',
      },
    });
    expect(audit).not.toBeNull();
  });
});

describe('flags on later studies', () => {
  it('fire just outside the tolerance and not just inside it', async () => {
    const res = await agents
      .get('committee')!
      .get(`/api/compare?rooms=${room.id}&thicknessMax=20`);
    const board = res.body.data as CompareBoardDto;
    const of = (study: SeededStudy) =>
      board.conditions.find((c) => c.study.id === study.study.id)!.baseline!;
    const flagOf = (study: SeededStudy) =>
      of(study).flags.find((f) => f.figure === 'snr_improvement_factor')!;
    // 1.3201 > 1.32 is outside; 1.3199 < 1.32 is within (band by hand).
    expect(flagOf(justOutside).status).toBe('outside');
    expect(flagOf(justInside).status).toBe('within');
    expect(flagOf(justOutside).band.high).toBeCloseTo(1.32, 12);
    expect(of(source).isSource).toBe(true);
    // Bucky factor 4 ± 5 %: 4.1 within, 4.2 on the edge counts as within.
    expect(
      of(justOutside).flags.find((f) => f.figure === 'bucky_factor')!.status,
    ).toBe('within');
    expect(
      of(justInside).flags.find((f) => f.figure === 'bucky_factor')!.status,
    ).toBe('within');
    expect(of(justOutside).outside).toBe(1);
    expect(of(justInside).outside).toBe(0);
  });
});

describe('GET /api/baselines', () => {
  it.each(ROLES)(
    'lists them for the %s with the right permissions',
    async (role) => {
      const res = await agents
        .get(role)!
        .get(`/api/baselines?roomId=${room.id}`);
      expect(res.status).toBe(200);
      const list = res.body.data as BaselineDto[];
      expect(list).toHaveLength(1);
      expect(list[0]!.permissions.edit).toBe(role === 'physicist');
      const one = await agents.get(role)!.get(`/api/baselines/${list[0]!.id}`);
      expect(one.status).toBe(200);
      expect(one.body.data.id).toBe(list[0]!.id);
    },
  );

  it('answers 404 for an unknown baseline', async () => {
    const res = await agents.get('committee')!.get('/api/baselines/999999999');
    expect(res.status).toBe(404);
  });
});

describe('GET /api/rooms/:id/trend', () => {
  it.each(ROLES)(
    'shows each figure over time with the band for the %s',
    async (role) => {
      const res = await agents.get(role)!.get(`/api/rooms/${room.id}/trend`);
      expect(res.status).toBe(200);
      const trend = res.body.data as RoomTrendDto;
      const group = trend.groups[0]!;
      expect(group.baseline).not.toBeNull();
      expect(group.phantomThicknessCm).toBe(20);
      const series = group.series.find(
        (s) => s.figure === 'snr_improvement_factor',
      )!;
      expect(series.band!.low).toBeCloseTo(1.08, 12);
      expect(series.band!.high).toBeCloseTo(1.32, 12);
      // Signed studies only, oldest first; the draft's 1.25 is not there.
      expect(series.points.map((p) => p.value)).toEqual([1.2, 1.3201, 1.3199]);
      expect(series.points.map((p) => p.flag?.status ?? null)).toEqual([
        null,
        'outside',
        'within',
      ]);
      // The 25 cm condition has no baseline and comes after.
      expect(trend.groups[1]!.baseline).toBeNull();
    },
  );

  it('answers 404 for an unknown room and 400 for an unknown figure', async () => {
    expect(
      (await agents.get('committee')!.get('/api/rooms/999999999/trend')).status,
    ).toBe(404);
    const bad = await agents
      .get('committee')!
      .get(`/api/rooms/${room.id}/trend?figures=nonsense`);
    expect(bad.status).toBe(400);
  });
});

describe('GET /api/room-summary', () => {
  it.each(ROLES)('gives every room’s latest status to the %s', async (role) => {
    const res = await agents.get(role)!.get('/api/room-summary');
    expect(res.status).toBe(200);
    const summary = (res.body.data as RoomSummaryDto[]).find(
      (r) => r.room.id === room.id,
    )!;
    // The latest signed study (August, 1.3199) is within its baseline.
    expect(summary).toMatchObject({
      status: 'within-tolerance',
      signedStudies: 3,
      activeBaselines: 1,
      conditionsChecked: 1,
      conditionsOutside: 0,
      latestStudy: { id: justInside.study.id, title: 'Routine August' },
    });
    expect(summary.verdicts?.benefit).toBe(1);
    expect(res.body.meta.cautions.length).toBeGreaterThan(0);
  });
});

describe('PATCH and DELETE /api/baselines/:id', () => {
  let id: number;
  beforeAll(async () => {
    const list = await agents
      .get('physicist')!
      .get(`/api/baselines?roomId=${room.id}&active=true`);
    id = list.body.data[0].id;
  });

  it('answers 401 without a session on every baseline route', async () => {
    const anonymous = browserAgent(t.app);
    for (const res of [
      await anonymous.get(`/api/baselines/${id}`),
      await anonymous.patch(`/api/baselines/${id}`).send({ note: 'x' }),
      await anonymous.delete(`/api/baselines/${id}`),
    ]) {
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });

  it.each(['committee', 'resident', 'admin'] as const)(
    'answers 403 to the %s',
    async (role) => {
      const patch = await agents
        .get(role)!
        .patch(`/api/baselines/${id}`)
        .send({ tolerances: { snr_improvement_factor: 1 } });
      expect(patch.status).toBe(403);
      const del = await agents.get(role)!.delete(`/api/baselines/${id}`);
      expect(del.status).toBe(403);
    },
  );

  it('lets a physicist tighten a tolerance, which moves the flags', async () => {
    const res = await agents
      .get('physicist')!
      .patch(`/api/baselines/${id}`)
      .send({ tolerances: { snr_improvement_factor: 5 } });
    expect(res.status).toBe(200);
    expect(res.body.data.tolerances).toEqual({
      snr_improvement_factor: 5,
      bucky_factor: 5,
    });
    const summary = await agents.get('committee')!.get('/api/room-summary');
    const mine = (summary.body.data as RoomSummaryDto[]).find(
      (r) => r.room.id === room.id,
    )!;
    // 1.3199 against 1.2 ± 5 % (1.14 … 1.26) is now outside.
    expect(mine.status).toBe('outside-tolerance');
    expect(mine.conditionsOutside).toBe(1);
  });

  it('replaces the active baseline when another is set for the same match', async () => {
    const res = await create('physicist', {
      conditionId: justInside.conditions[0]!.id,
    });
    expect(res.status).toBe(201);
    const old = await agents.get('physicist')!.get(`/api/baselines/${id}`);
    expect(old.body.data.active).toBe(false);
    expect(old.body.data.retiredAt).not.toBeNull();
    const retiredEdit = await agents
      .get('physicist')!
      .patch(`/api/baselines/${id}`)
      .send({ note: 'x' });
    expect(retiredEdit.status).toBe(409);
    const active = await agents
      .get('committee')!
      .get(`/api/baselines?roomId=${room.id}&active=true`);
    expect(active.body.data).toHaveLength(1);
    expect(active.body.data[0].source.studyId).toBe(justInside.study.id);
  });

  it('lets a physicist retire and delete baselines', async () => {
    const active = await agents
      .get('physicist')!
      .get(`/api/baselines?roomId=${room.id}&active=true`);
    const current = active.body.data[0].id as number;
    const retired = await agents
      .get('physicist')!
      .patch(`/api/baselines/${current}`)
      .send({ active: false });
    expect(retired.status).toBe(200);
    expect(retired.body.data.active).toBe(false);
    const del = await agents.get('physicist')!.delete(`/api/baselines/${id}`);
    expect(del.status).toBe(204);
    expect(
      (await agents.get('physicist')!.get(`/api/baselines/${id}`)).status,
    ).toBe(404);
    const summary = await agents.get('committee')!.get('/api/room-summary');
    const mine = (summary.body.data as RoomSummaryDto[]).find(
      (r) => r.room.id === room.id,
    )!;
    expect(mine.status).toBe('no-baseline');
  });
});
