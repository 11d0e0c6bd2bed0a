import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { StudyCondition } from '../../../server/models/study-condition.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import type { Role } from '../../../shared/permissions.ts';
import { SAFETY_CAUTIONS } from '../../../shared/cautions.ts';
import {
  buildDetector,
  buildGrid,
  buildRoom,
  SMALL_PLAN,
} from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

type Agent = Awaited<ReturnType<typeof signedInAgent>>['agent'];

async function equipment() {
  const room = await buildRoom();
  const detector = await buildDetector(room.id);
  const grid = await buildGrid(12, room.id);
  return { room, detector, grid };
}

async function newStudyBody() {
  const { room, detector, grid } = await equipment();
  return {
    title: 'Wall stand 12:1 grid, abdomen thicknesses',
    purpose: 'Is the 12:1 grid worth its dose at 20 cm PMMA?',
    roomId: room.id,
    detectorId: detector.id,
    gridIds: [grid.id],
    plan: SMALL_PLAN,
  };
}

async function createAs(agent: Agent) {
  const res = await agent.post('/api/studies').send(await newStudyBody());
  expect(res.status).toBe(201);
  return res.body.data as { id: number; conditions: { id: number }[] };
}

const FORBIDDEN = {
  error: { code: 'forbidden', message: 'Your role does not allow this.' },
};

describe('role matrix on the study routes', () => {
  let draftId: number;
  let signedId: number;
  beforeAll(async () => {
    const { agent: resident } = await signedInAgent(t.app, 'resident');
    const { agent: physicist } = await signedInAgent(t.app, 'physicist');
    draftId = (await createAs(resident)).id;
    signedId = (await createAs(resident)).id;
    await resident.post(`/api/studies/${signedId}/submit`).expect(200);
    await physicist.post(`/api/studies/${signedId}/sign`).send({}).expect(200);
  });

  const ROUTES = [
    { method: 'get', suffix: '', body: undefined },
    { method: 'get', suffix: '/checklist', body: undefined },
    { method: 'get', suffix: '/assignments', body: undefined },
    { method: 'get', suffix: '/comments', body: undefined },
    { method: 'get', suffix: '/audit', body: undefined },
    { method: 'get', suffix: '/revisions', body: undefined },
    { method: 'get', suffix: '/revisions/1', body: undefined },
    { method: 'patch', suffix: '', body: { title: 'x' } },
    { method: 'post', suffix: '/pairing/propose', body: {} },
    { method: 'put', suffix: '/assignments', body: { assignments: [] } },
    { method: 'post', suffix: '/submit', body: {} },
    { method: 'post', suffix: '/return', body: { comment: 'Redo 81 kV.' } },
    { method: 'post', suffix: '/sign', body: {} },
    { method: 'post', suffix: '/revise', body: {} },
    { method: 'post', suffix: '/comments', body: { body: 'Looks fine.' } },
  ] as const;
  const studyRoutes = (id: () => number) =>
    ROUTES.map((r) => ({
      ...r,
      path: () => `/api/studies/${id()}${r.suffix}`,
    }));

  const collection = [
    {
      method: 'get',
      suffix: ' (list)',
      path: () => '/api/studies',
      body: undefined,
    },
    {
      method: 'get',
      suffix: '/options',
      path: () => '/api/studies/options',
      body: undefined,
    },
    {
      method: 'post',
      suffix: ' (create)',
      path: () => '/api/studies',
      body: {},
    },
  ] as const;

  it.each([...collection, ...studyRoutes(() => draftId)])(
    '$method $suffix answers 401 with no session',
    async ({ method, path, body }) => {
      const res = await browserAgent(t.app)[method](path()).send(body);
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    },
  );

  it.each(studyRoutes(() => draftId))(
    'hides a draft from the committee: $method $suffix answers 404',
    async ({ method, path, body }) => {
      const { agent } = await signedInAgent(t.app, 'committee');
      const res = await agent[method](path()).send(body);
      expect(res.status).toBe(404);
      expect(res.body).toEqual({
        error: { code: 'not_found', message: 'No such study.' },
      });
    },
  );

  const writes = (id: () => number) =>
    studyRoutes(id).filter((r) => r.method !== 'get');

  for (const role of ['admin', 'committee'] as Role[]) {
    it.each(writes(() => signedId))(
      `refuses a ${role}: $method $suffix answers 403`,
      async ({ method, path, body }) => {
        const { agent } = await signedInAgent(t.app, role);
        const res = await agent[method](path()).send(body);
        expect(res.status).toBe(403);
        expect(res.body.error.code).toBe('forbidden');
      },
    );

    it(`refuses to let a ${role} create a study`, async () => {
      const { agent } = await signedInAgent(t.app, role);
      const res = await agent.post('/api/studies').send(await newStudyBody());
      expect(res.status).toBe(403);
      expect(res.body).toEqual(FORBIDDEN);
    });
  }

  it.each(writes(() => draftId).filter((r) => r.suffix !== '/comments'))(
    'refuses another resident’s change to a draft: $method $suffix answers 403',
    async ({ method, path, body }) => {
      const { agent } = await signedInAgent(t.app, 'resident');
      const res = await agent[method](path()).send(body);
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    },
  );

  it.each(studyRoutes(() => signedId).filter((r) => r.method === 'get'))(
    'lets the committee read a signed study: $method $suffix',
    async ({ method, path }) => {
      const { agent } = await signedInAgent(t.app, 'committee');
      const res = await agent[method](path());
      expect(res.status).toBe(200);
    },
  );

  it('lets an admin read a draft but offers no action', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const res = await agent.get(`/api/studies/${draftId}`);
    expect(res.status).toBe(200);
    expect(Object.values(res.body.data.permissions)).not.toContain(true);
  });
});

describe('listing studies', () => {
  it('shows the committee signed studies only, in the query', async () => {
    const { agent: resident } = await signedInAgent(t.app, 'resident');
    const { agent: physicist } = await signedInAgent(t.app, 'physicist');
    const { agent: committee } = await signedInAgent(t.app, 'committee');
    const draft = await createAs(resident);
    const signed = await createAs(resident);
    await resident.post(`/api/studies/${signed.id}/submit`).expect(200);
    await physicist.post(`/api/studies/${signed.id}/sign`).send({}).expect(200);

    const all = await committee.get('/api/studies');
    const drafts = await committee.get('/api/studies?status=draft');

    expect(all.status).toBe(200);
    const ids = all.body.data.map((s: { id: number }) => s.id);
    expect(ids).toContain(signed.id);
    expect(ids).not.toContain(draft.id);
    expect(
      all.body.data.every((s: { status: string }) => s.status === 'signed'),
    ).toBe(true);
    expect(drafts.body.data).toEqual([]);
  });

  it('filters by state, room and own studies', async () => {
    const { agent, user } = await signedInAgent(t.app, 'resident');
    const mine = await createAs(agent);
    const study = await Study.findByPk(mine.id);

    const byRoom = await agent.get(`/api/studies?roomId=${study!.roomId}`);
    const own = await agent.get('/api/studies?mine=true&status=draft');

    expect(byRoom.body.data.map((s: { id: number }) => s.id)).toEqual([
      mine.id,
    ]);
    expect(
      own.body.data.every(
        (s: { createdBy: { id: number } }) => s.createdBy.id === user.id,
      ),
    ).toBe(true);
    expect(own.body.data[0]).toMatchObject({
      id: mine.id,
      status: 'draft',
      revision: 1,
      expectedAcquisitionCount: 8,
    });
  });

  it('answers 400 for a bad filter', async () => {
    const { agent } = await signedInAgent(t.app, 'physicist');
    const res = await agent.get('/api/studies?status=archived');
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('status');
  });
});

describe('creating and editing a study', () => {
  it('creates a draft with conditions from the plan and an audit entry', async () => {
    const { agent, user } = await signedInAgent(t.app, 'resident');
    const body = await newStudyBody();

    const res = await agent.post('/api/studies').send(body);

    expect(res.status).toBe(201);
    const data = res.body.data;
    expect(data).toMatchObject({
      title: body.title,
      status: 'draft',
      revision: 1,
      createdBy: { id: user.id, role: 'resident' },
      grids: [{ id: body.gridIds[0] }],
      permissions: { edit: true, submit: true, sign: false, return: false },
      stateActions: ['submit'],
    });
    expect(
      data.conditions.map((c: { kvp: number; label: string }) => [
        c.kvp,
        c.label,
      ]),
    ).toEqual([
      [70, expect.stringMatching(/^70 kV \(none\) · 20 cm PMMA · G12-/)],
      [81, expect.stringMatching(/^81 kV \(0.1 mm Cu\) · 20 cm PMMA/)],
    ]);
    const audit = await AuditEvent.findOne({
      where: { action: 'study.created', targetId: String(data.id) },
    });
    expect(audit?.actorId).toBe(user.id);
  });

  it('answers 400 naming each bad field, and writes nothing', async () => {
    const { agent } = await signedInAgent(t.app, 'physicist');
    const before = await Study.count();
    const res = await agent.post('/api/studies').send({
      title: '',
      roomId: 'one',
      gridIds: [],
      plan: { ...SMALL_PLAN, replicates: 0, geometry: { sidCm: 9000 } },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    const paths = res.body.error.details.map((d: { path: string }) => d.path);
    expect(paths).toEqual(
      expect.arrayContaining([
        'title',
        'purpose',
        'roomId',
        'gridIds',
        'plan.replicates',
        'plan.geometry.sidCm',
        'plan.geometry.fieldWidthCm',
      ]),
    );
    expect(await Study.count()).toBe(before);
  });

  it('refuses a detector of another room and an unknown grid with field messages', async () => {
    const { agent } = await signedInAgent(t.app, 'physicist');
    const body = await newStudyBody();
    const otherRoom = await buildRoom();
    const foreignDetector = await buildDetector(otherRoom.id);
    const res = await agent.post('/api/studies').send({
      ...body,
      detectorId: foreignDetector.id,
      gridIds: [body.gridIds[0], 99999999],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([
      {
        path: 'detectorId',
        message: expect.stringMatching(/belongs to another room/),
      },
      { path: 'gridIds', message: 'No such grid: 99999999.' },
    ]);
  });

  it('refuses a plan of more exposures than one session can take', async () => {
    const { agent } = await signedInAgent(t.app, 'physicist');
    const body = await newStudyBody();
    const res = await agent.post('/api/studies').send({
      ...body,
      plan: {
        ...SMALL_PLAN,
        phantom: { material: 'pmma', thicknessesCm: [5, 10, 15, 20, 25] },
        beamQualities: [60, 70, 81, 90, 102, 109, 117, 125].map((kvp) => ({
          kvp,
        })),
        replicates: 6,
      },
    });
    expect(res.status).toBe(400);
    // 5 thicknesses × 8 kV × 1 grid × 2 arms × 6 replicates = 480.
    expect(res.body.error.details[0]).toEqual({
      path: 'plan',
      message:
        'This plan asks for 480 exposures; keep one study to at most 400.',
    });
  });

  it('keeps unchanged conditions (and their ids) when the plan is edited', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    const created = await createAs(agent);
    const [first] = created.conditions;

    const res = await agent.patch(`/api/studies/${created.id}`).send({
      plan: {
        ...SMALL_PLAN,
        beamQualities: [SMALL_PLAN.beamQualities[0], { kvp: 102 }],
      },
    });

    expect(res.status).toBe(200);
    const ids = res.body.data.conditions.map((c: { id: number }) => c.id);
    expect(ids[0]).toBe(first!.id);
    expect(res.body.data.conditions[1].kvp).toBe(102);
    expect(await StudyCondition.count({ where: { studyId: created.id } })).toBe(
      2,
    );
    const audit = await AuditEvent.findOne({
      where: { action: 'study.updated', targetId: String(created.id) },
    });
    expect(audit?.details).toMatchObject({
      changed: ['plan'],
      conditions: { added: 1, removed: 1, kept: 1, assignmentsDropped: 0 },
    });
  });

  it('records only the fields that really changed when the whole form is sent back', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    const body = await newStudyBody();
    const created = (await agent.post('/api/studies').send(body)).body.data;
    const { plan } = (await agent.get(`/api/studies/${created.id}`)).body.data;

    const res = await agent
      .patch(`/api/studies/${created.id}`)
      .send({ ...body, plan, purpose: 'Second look at 20 cm.' });

    expect(res.status).toBe(200);
    const audit = await AuditEvent.findOne({
      where: { action: 'study.updated', targetId: String(created.id) },
    });
    expect(audit?.details).toMatchObject({
      changed: ['purpose'],
      conditions: { added: 0, removed: 0, kept: 2 },
    });
  });

  it('lets a physicist edit a resident’s draft', async () => {
    const { agent: resident } = await signedInAgent(t.app, 'resident');
    const { agent: physicist } = await signedInAgent(t.app, 'physicist');
    const created = await createAs(resident);
    const res = await physicist
      .patch(`/api/studies/${created.id}`)
      .send({ purpose: 'Baseline after grid replacement.' });
    expect(res.status).toBe(200);
    expect(res.body.data.purpose).toBe('Baseline after grid replacement.');
  });

  it('answers 404 for an unknown study', async () => {
    const { agent } = await signedInAgent(t.app, 'physicist');
    const res = await agent.get('/api/studies/99999999');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('checklist and options', () => {
  it('lists every exposure with its settings and the cautions', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    const created = await createAs(agent);

    const res = await agent.get(`/api/studies/${created.id}/checklist`);

    expect(res.status).toBe(200);
    const { steps, cautions } = res.body.data;
    expect(steps).toHaveLength(8);
    expect(steps[0]).toMatchObject({
      step: 1,
      kvp: 70,
      arm: 'grid',
      replicate: 1,
      sidCm: 115,
      exposure: { mode: 'aec', chamber: 'centre' },
      gridLabel: expect.stringMatching(/^G12-/),
    });
    expect(cautions).toEqual([...SAFETY_CAUTIONS]);
  });

  it('offers rooms, detectors and grids for the plan form', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    const { room, detector, grid } = await equipment();
    const res = await agent.get('/api/studies/options');
    expect(res.status).toBe(200);
    expect(res.body.data.rooms).toContainEqual({
      id: room.id,
      name: room.name,
      site: room.site,
    });
    expect(res.body.data.detectors).toContainEqual(
      expect.objectContaining({ id: detector.id, roomId: room.id }),
    );
    expect(res.body.data.grids).toContainEqual(
      expect.objectContaining({ id: grid.id, ratio: 12 }),
    );
  });
});
