import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { ImageAssignment } from '../../../server/models/image-assignment.model.ts';
import {
  buildGrid,
  buildImageRow,
  buildRoom,
  SMALL_PLAN,
} from '../../helpers/study-factories.ts';
import {
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

type Signed = Awaited<ReturnType<typeof signedInAgent>>;

interface Proposal {
  imageId: number;
  conditionId: number | null;
  arm: 'grid' | 'no_grid' | null;
  replicate: number | null;
  status: string;
  reasons: string[];
  doubts: string[];
}

/** A study of SMALL_PLAN (70 and 81 kV, 20 cm, 2 replicates) with a session of images. */
async function studyWithSession(who: Signed) {
  const room = await buildRoom();
  const grid = await buildGrid(12, room.id);
  const res = await who.agent.post('/api/studies').send({
    title: 'Paediatric room grid check',
    purpose: 'Does the 12:1 grid help at 20 cm?',
    roomId: room.id,
    gridIds: [grid.id],
    plan: SMALL_PLAN,
  });
  expect(res.status).toBe(201);
  const study = res.body.data as {
    id: number;
    conditions: { id: number; kvp: number }[];
  };
  const at = (m: number) => `2026-11-30T10:${String(m).padStart(2, '0')}:00`;
  const make = (
    kvp: number | null,
    grid: string[] | null,
    minute: number,
    extra: Partial<Parameters<typeof buildImageRow>[0]> = {},
  ) =>
    buildImageRow({
      uploadedBy: who.user.id,
      studyId: study.id,
      kvp,
      grid,
      acquisitionDateTime: at(minute),
      ...extra,
    });
  const images = {
    grid70a: await make(70, ['FOCUSED'], 2),
    grid70b: await make(70, ['FOCUSED'], 1),
    none70: await make(70, ['NONE'], 3, {
      warnings: [
        {
          code: 'for_presentation',
          message: 'Processed for presentation: figures are not trustworthy.',
        },
      ],
    }),
    grid81: await make(81, ['FOCUSED'], 4),
    stray: await make(100, ['NONE'], 5),
  };
  return { study, images };
}

describe('pairing images to conditions', () => {
  let resident: Signed;
  beforeAll(async () => {
    resident = await signedInAgent(t.app, 'resident');
  });

  it('proposes a place with reasons for each image, and an unassigned one for a stray kV', async () => {
    const { study, images } = await studyWithSession(resident);
    const [c70, c81] = study.conditions;

    const res = await resident.agent.post(
      `/api/studies/${study.id}/pairing/propose`,
    );

    expect(res.status).toBe(200);
    const byImage = new Map<number, Proposal>(
      res.body.data.proposals.map((p: Proposal) => [p.imageId, p]),
    );
    expect(byImage.get(images.grid70b.id)).toMatchObject({
      conditionId: c70!.id,
      arm: 'grid',
      replicate: 1,
      status: 'confident',
    });
    expect(byImage.get(images.grid70a.id)).toMatchObject({ replicate: 2 });
    expect(byImage.get(images.none70.id)).toMatchObject({
      conditionId: c70!.id,
      arm: 'no_grid',
    });
    expect(byImage.get(images.grid81.id)).toMatchObject({
      conditionId: c81!.id,
    });
    expect(byImage.get(images.stray.id)).toMatchObject({
      status: 'unassigned',
      conditionId: null,
    });
    expect(byImage.get(images.stray.id)!.doubts[0]).toMatch(/100 kV/);
    expect(res.body.data.openSlots).toEqual([
      { conditionId: c70!.id, arm: 'no_grid', missing: 1 },
      { conditionId: c81!.id, arm: 'grid', missing: 1 },
      { conditionId: c81!.id, arm: 'no_grid', missing: 2 },
    ]);
    expect(await ImageAssignment.count({ where: { studyId: study.id } })).toBe(
      0,
    );
  });

  it('saves confirmed and moved assignments, lists them with warnings, and audits the change', async () => {
    const { study, images } = await studyWithSession(resident);
    const [c70, c81] = study.conditions;
    const proposed = (
      await resident.agent.post(`/api/studies/${study.id}/pairing/propose`)
    ).body.data.proposals as Proposal[];
    const confirmed = proposed
      .filter((p) => p.conditionId !== null)
      .map((p) => ({
        imageId: p.imageId,
        conditionId: p.conditionId!,
        arm: p.arm!,
        replicate: p.replicate!,
        proposedBy: 'auto' as const,
        reason: p.reasons.join('; '),
      }));
    const moved = {
      imageId: images.stray.id,
      conditionId: c81!.id,
      arm: 'no_grid' as const,
      replicate: 1,
      proposedBy: 'user' as const,
      reason: 'kV typed wrongly at the console',
    };

    const res = await resident.agent
      .put(`/api/studies/${study.id}/assignments`)
      .send({ assignments: [...confirmed, moved] });

    expect(res.status).toBe(200);
    expect(res.body.data.assignments).toHaveLength(5);
    const listed = await resident.agent.get(
      `/api/studies/${study.id}/assignments`,
    );
    const none70 = listed.body.data.images.find(
      (i: { id: number }) => i.id === images.none70.id,
    );
    expect(none70.warnings[0].code).toBe('for_presentation');
    expect(none70.assignment).toMatchObject({
      conditionId: c70!.id,
      arm: 'no_grid',
      proposedBy: 'auto',
    });
    const stray = listed.body.data.images.find(
      (i: { id: number }) => i.id === images.stray.id,
    );
    expect(stray.assignment).toMatchObject({
      conditionId: c81!.id,
      proposedBy: 'user',
      reason: 'kV typed wrongly at the console',
    });
    const audit = await AuditEvent.findOne({
      where: { action: 'study.assignments_saved', targetId: String(study.id) },
    });
    expect(audit?.details).toMatchObject({ assigned: 5, byUser: 1 });
  });

  it('refuses two images in one place and an image from another study, writing nothing', async () => {
    const { study, images } = await studyWithSession(resident);
    const other = await studyWithSession(resident);
    const [c70] = study.conditions;
    const slot = {
      conditionId: c70!.id,
      arm: 'grid' as const,
      replicate: 1,
      proposedBy: 'user' as const,
    };

    const twice = await resident.agent
      .put(`/api/studies/${study.id}/assignments`)
      .send({
        assignments: [
          { ...slot, imageId: images.grid70a.id },
          { ...slot, imageId: images.grid70b.id },
        ],
      });
    const foreign = await resident.agent
      .put(`/api/studies/${study.id}/assignments`)
      .send({
        assignments: [
          { ...slot, imageId: other.images.grid70a.id },
          {
            ...slot,
            replicate: 2,
            conditionId: other.study.conditions[0]!.id,
            imageId: images.grid70a.id,
          },
        ],
      });

    expect(twice.status).toBe(400);
    expect(twice.body.error.details[0]).toEqual({
      path: 'assignments',
      message: 'Two images cannot fill the same replicate.',
    });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.details).toEqual([
      {
        path: 'assignments.0.imageId',
        message: `Image ${other.images.grid70a.id} is not in this study.`,
      },
      {
        path: 'assignments.1.conditionId',
        message: `Condition ${other.study.conditions[0]!.id} is not one of this study's.`,
      },
    ]);
    expect(await ImageAssignment.count({ where: { studyId: study.id } })).toBe(
      0,
    );
  });

  it('drops the assignments of a condition the plan no longer has, and says so in the trail', async () => {
    const { study, images } = await studyWithSession(resident);
    const [c70, c81] = study.conditions;
    const place = (imageId: number, conditionId: number) => ({
      imageId,
      conditionId,
      arm: 'grid' as const,
      replicate: 1,
      proposedBy: 'user' as const,
    });
    await resident.agent
      .put(`/api/studies/${study.id}/assignments`)
      .send({
        assignments: [
          place(images.grid70a.id, c70!.id),
          place(images.grid81.id, c81!.id),
        ],
      })
      .expect(200);

    const res = await resident.agent.patch(`/api/studies/${study.id}`).send({
      plan: { ...SMALL_PLAN, beamQualities: [SMALL_PLAN.beamQualities[0]] },
    });

    expect(res.status).toBe(200);
    const left = await ImageAssignment.findAll({
      where: { studyId: study.id },
    });
    expect(left.map((a) => a.imageId)).toEqual([images.grid70a.id]);
    const audit = await AuditEvent.findOne({
      where: { action: 'study.updated', targetId: String(study.id) },
    });
    expect(audit?.details).toMatchObject({
      conditions: { removed: 1, assignmentsDropped: 1 },
    });
  });
});
