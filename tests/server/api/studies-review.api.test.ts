import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { ConditionAnalysis } from '../../../server/models/condition-analysis.model.ts';
import { ImageAssignment } from '../../../server/models/image-assignment.model.ts';
import { StudyCondition } from '../../../server/models/study-condition.model.ts';
import { StudyRevision } from '../../../server/models/study-revision.model.ts';
import { buildUser } from '../../helpers/factories.ts';
import { linkIn, waitForMail } from '../../helpers/mailbox.ts';
import {
  buildGrid,
  buildImageRow,
  buildRoom,
  SMALL_PLAN,
} from '../../helpers/study-factories.ts';
import {
  signedInAgent,
  startTestApp,
  TEST_ORIGIN,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

type Signed = Awaited<ReturnType<typeof signedInAgent>>;

async function draftBy(who: Signed): Promise<number> {
  const room = await buildRoom();
  const grid = await buildGrid(10, room.id);
  const res = await who.agent.post('/api/studies').send({
    title: `Emergency room 10:1 grid ${room.id}`,
    purpose: 'Routine grid check.',
    roomId: room.id,
    gridIds: [grid.id],
    plan: SMALL_PLAN,
  });
  expect(res.status).toBe(201);
  return res.body.data.id;
}

const LOCKED_MESSAGE =
  'This study is signed and read-only. Start a new revision to change it; the signed revision stays as it is.';

describe('state transitions', () => {
  let resident: Signed;
  let physicist: Signed;
  beforeAll(async () => {
    resident = await signedInAgent(t.app, 'resident');
    physicist = await signedInAgent(t.app, 'physicist');
  });

  it('submits, returns with a comment, resubmits and signs, mailing the right people', async () => {
    const id = await draftBy(resident);

    const submitted = await resident.agent.post(`/api/studies/${id}/submit`);
    expect(submitted.status).toBe(200);
    expect(submitted.body.data).toMatchObject({
      status: 'submitted',
      permissions: { edit: false, submit: false },
    });
    expect(submitted.body.meta.mailDelivered).toBe(true);
    const toPhysicist = await waitForMail(physicist.user.email);
    expect(toPhysicist.subject).toMatch(/waiting for review/);
    expect(linkIn(toPhysicist, `/studies/${id}`).origin).toBe(TEST_ORIGIN);

    const returned = await physicist.agent
      .post(`/api/studies/${id}/return`)
      .send({ comment: 'The 81 kV no-grid images are missing.' });
    expect(returned.status).toBe(200);
    expect(returned.body.data.status).toBe('returned');
    const toResident = await waitForMail(resident.user.email);
    expect(toResident.subject).toMatch(/returned/);
    expect(toResident.textBody).toContain(
      'The 81 kV no-grid images are missing.',
    );
    expect(linkIn(toResident, `/studies/${id}`).pathname).toBe(
      `/studies/${id}`,
    );

    const edited = await resident.agent
      .patch(`/api/studies/${id}`)
      .send({ purpose: 'Routine grid check, 81 kV redone.' });
    expect(edited.status).toBe(200);
    await resident.agent.post(`/api/studies/${id}/submit`).expect(200);

    const signed = await physicist.agent
      .post(`/api/studies/${id}/sign`)
      .send({ comment: 'Figures agree with last year.' });
    expect(signed.status).toBe(200);
    expect(signed.body.data).toMatchObject({
      status: 'signed',
      signedBy: { id: physicist.user.id },
      selfSigned: false,
      permissions: { edit: false, sign: false, revise: true },
    });
    const signedMail = await waitForMail(resident.user.email);
    expect(signedMail.subject).toMatch(/^Study signed/);

    const actions = (
      await AuditEvent.findAll({
        where: { targetType: 'study', targetId: String(id) },
        order: [['id', 'ASC']],
      })
    ).map((e) => e.action);
    expect(actions).toEqual([
      'study.created',
      'study.submitted',
      'study.returned',
      'study.updated',
      'study.submitted',
      'study.signed',
    ]);

    const thread = await resident.agent.get(`/api/studies/${id}/comments`);
    expect(
      thread.body.data.map((c: { kind: string; body: string }) => [
        c.kind,
        c.body,
      ]),
    ).toEqual([
      ['return', 'The 81 kV no-grid images are missing.'],
      ['sign', 'Figures agree with last year.'],
    ]);
  });

  it('refuses a resident who tries to sign with 403', async () => {
    const id = await draftBy(resident);
    await resident.agent.post(`/api/studies/${id}/submit`).expect(200);
    const res = await resident.agent.post(`/api/studies/${id}/sign`).send({});
    expect(res.status).toBe(403);
    expect(res.body).toEqual({
      error: {
        code: 'forbidden',
        message: 'Only a physicist can sign a study.',
      },
    });
  });

  it('refuses to sign a draft with 409 invalid_state_transition', async () => {
    const id = await draftBy(resident);
    const res = await physicist.agent.post(`/api/studies/${id}/sign`).send({});
    expect(res.status).toBe(409);
    expect(res.body).toEqual({
      error: {
        code: 'invalid_state_transition',
        message: 'A study that is a draft cannot be signed.',
      },
    });
  });

  it('refuses to return without a comment (400) and to return a draft (409)', async () => {
    const id = await draftBy(resident);
    const empty = await physicist.agent
      .post(`/api/studies/${id}/return`)
      .send({ comment: '  ' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.details[0].path).toBe('comment');
    const draft = await physicist.agent
      .post(`/api/studies/${id}/return`)
      .send({ comment: 'Not yet.' });
    expect(draft.status).toBe(409);
    expect(draft.body.error.code).toBe('invalid_state_transition');
  });

  it('refuses changes while the study waits for review', async () => {
    const id = await draftBy(resident);
    await resident.agent.post(`/api/studies/${id}/submit`).expect(200);
    const res = await resident.agent
      .patch(`/api/studies/${id}`)
      .send({ title: 'Changed during review' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('study_locked');
    const twice = await resident.agent.post(`/api/studies/${id}/submit`);
    expect(twice.status).toBe(409);
  });

  it('lets a physicist sign their own study, recorded as self-signed, without mailing themselves', async () => {
    const id = await draftBy(physicist);
    await physicist.agent.post(`/api/studies/${id}/submit`).expect(200);
    const res = await physicist.agent.post(`/api/studies/${id}/sign`).send({});
    expect(res.status).toBe(200);
    expect(res.body.data.selfSigned).toBe(true);
    expect(res.body.meta.notified).toBe(0);
    const audit = await AuditEvent.findOne({
      where: { action: 'study.signed', targetId: String(id) },
    });
    expect(audit?.details).toMatchObject({ selfSigned: true, revision: 1 });
  });

  it('does not mail a disabled physicist on submit', async () => {
    const disabled = await buildUser({ role: 'physicist', disabled: true });
    const id = await draftBy(resident);
    const res = await resident.agent.post(`/api/studies/${id}/submit`);
    expect(res.status).toBe(200);
    await waitForMail(physicist.user.email);
    await expect(waitForMail(disabled.email, 300)).rejects.toThrow(/no mail/);
  });
});

describe('a signed study is locked', () => {
  let resident: Signed;
  let physicist: Signed;
  let id: number;
  beforeAll(async () => {
    resident = await signedInAgent(t.app, 'resident');
    physicist = await signedInAgent(t.app, 'physicist');
    id = await draftBy(resident);
    await resident.agent.post(`/api/studies/${id}/submit`).expect(200);
    await physicist.agent.post(`/api/studies/${id}/sign`).send({}).expect(200);
  });

  it.each([
    ['patch', '', { title: 'Changed after signing' }],
    ['put', '/assignments', { assignments: [] }],
    ['post', '/pairing/propose', {}],
    ['post', '/comments', { body: 'One more thing.' }],
  ] as const)(
    'answers %s %s with 409 study_locked and says what to do',
    async (method, suffix, body) => {
      const res = await physicist.agent[method](
        `/api/studies/${id}${suffix}`,
      ).send(body);
      expect(res.status).toBe(409);
      expect(res.body).toEqual({
        error: { code: 'study_locked', message: LOCKED_MESSAGE },
      });
    },
  );

  it('keeps the signed values in its revision when a new revision changes them', async () => {
    const revised = await resident.agent.post(`/api/studies/${id}/revise`);
    expect(revised.status).toBe(200);
    expect(revised.body.data).toMatchObject({
      status: 'draft',
      revision: 2,
      signedBy: null,
    });
    const changed = await resident.agent.patch(`/api/studies/${id}`).send({
      title: 'Revision 2 title',
      plan: { ...SMALL_PLAN, replicates: 3 },
    });
    expect(changed.status).toBe(200);

    const old = await resident.agent.get(`/api/studies/${id}/revisions/1`);
    expect(old.status).toBe(200);
    expect(old.body.data).toMatchObject({
      revision: 1,
      signedBy: { id: physicist.user.id },
      snapshot: {
        format: 1,
        study: { title: expect.stringMatching(/^Emergency room/), revision: 1 },
        plan: { replicates: 2 },
      },
    });
    expect(old.body.data.snapshot.conditions).toHaveLength(2);

    const list = await resident.agent.get(`/api/studies/${id}/revisions`);
    expect(
      list.body.data.map((r: { revision: number; status: string }) => [
        r.revision,
        r.status,
      ]),
    ).toEqual([
      [1, 'signed'],
      [2, 'draft'],
    ]);
    expect(await StudyRevision.count({ where: { studyId: id } })).toBe(1);
    const missing = await resident.agent.get(`/api/studies/${id}/revisions/2`);
    expect(missing.status).toBe(404);
  });
});

describe('comments and the audit trail', () => {
  it('threads comments from residents and physicists and files each in the trail', async () => {
    const resident = await signedInAgent(t.app, 'resident');
    const physicist = await signedInAgent(t.app, 'physicist');
    const id = await draftBy(resident);

    const first = await resident.agent
      .post(`/api/studies/${id}/comments`)
      .send({ body: 'Grid was moved between exposures 3 and 4.' });
    const second = await physicist.agent
      .post(`/api/studies/${id}/comments`)
      .send({ body: 'Then repeat exposure 4.' });

    expect(first.status).toBe(201);
    expect(second.body.data).toMatchObject({
      kind: 'comment',
      revision: 1,
      author: { id: physicist.user.id, role: 'physicist' },
    });
    const trail = await resident.agent.get(`/api/studies/${id}/audit`);
    expect(trail.status).toBe(200);
    expect(
      trail.body.data.map((e: { action: string }) => e.action).slice(0, 3),
    ).toEqual(['study.commented', 'study.commented', 'study.created']);
    expect(trail.body.data[0].actor).toMatchObject({
      id: physicist.user.id,
    });
  });

  it('refuses an empty comment with 400 and writes nothing', async () => {
    const resident = await signedInAgent(t.app, 'resident');
    const id = await draftBy(resident);
    const res = await resident.agent
      .post(`/api/studies/${id}/comments`)
      .send({ body: '' });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([
      { path: 'body', message: 'Write a comment.' },
    ]);
    const thread = await resident.agent.get(`/api/studies/${id}/comments`);
    expect(thread.body.data).toEqual([]);
  });
});

describe('submitting while results are recomputed', () => {
  it('answers 409 while a condition with images is queued, and submits once it is done', async () => {
    const resident = await signedInAgent(t.app, 'resident');
    const id = await draftBy(resident);
    const conditions = await StudyCondition.findAll({ where: { studyId: id } });
    const image = await buildImageRow({
      uploadedBy: resident.user.id,
      studyId: id,
    });
    await ImageAssignment.create({
      imageId: image.id,
      studyId: id,
      conditionId: conditions[0]!.id,
      arm: 'grid',
      replicate: 1,
      proposedBy: 'user',
      reason: 'test',
      assignedBy: resident.user.id,
    });
    const analysis = await ConditionAnalysis.create({
      studyId: id,
      conditionId: conditions[0]!.id,
      status: 'queued',
      options: {},
      result: null,
      verdictOutcome: null,
      verdictSentence: null,
      warnings: [],
      errorCode: null,
      errorMessage: null,
      computedAt: null,
    });

    const refused = await resident.agent.post(`/api/studies/${id}/submit`);
    expect(refused.status).toBe(409);
    expect(refused.body.error).toEqual({
      code: 'conflict',
      message:
        'The results of 1 condition(s) are still being computed. Submit the study when they are done.',
    });
    expect(
      (await resident.agent.get(`/api/studies/${id}`)).body.data.status,
    ).toBe('draft');

    await analysis.update({ status: 'done' });
    const submitted = await resident.agent.post(`/api/studies/${id}/submit`);
    expect(submitted.status).toBe(200);
    expect(submitted.body.data.status).toBe('submitted');
  });
});
