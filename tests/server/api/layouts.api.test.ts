import request from 'supertest';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fromRoot } from '../../../server/config/paths.ts';
import { stopJobQueue } from '../../../server/jobs/queue.ts';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { ConditionAnalysis } from '../../../server/models/condition-analysis.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import type { Role } from '../../../shared/permissions.ts';
import type {
  ApplyLayoutResultDto,
  FindObjectsResultDto,
  ImageRegionsDto,
  LayoutDto,
  StudyLayoutDto,
} from '../../../shared/schemas/layout.schema.ts';
import { scratchDir } from '../../helpers/dicom-files.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';
import {
  buildSyntheticStudy,
  DISC,
  DISC_LAYOUT,
  imageIdOf,
  type SyntheticStudy,
} from '../jobs/synthetic-study.ts';

const UPLOADS = 'test-output/layouts-api/uploads';
/** Where the phantom sat on some exposures, relative to the first one (known by construction). */
const SHIFTS = {
  '70kV-open-1.dcm': { dx: 6, dy: -4 },
  '70kV-grid-2.dcm': { dx: -3.5, dy: 2.5 },
};
let t: TestApp;
let physicist: TestAgent;
let resident: { agent: TestAgent; user: { id: number } };
let s: SyntheticStudy;
const agents = new Map<Role, TestAgent>();

async function as(role: Role): Promise<TestAgent> {
  if (!agents.has(role))
    agents.set(role, (await signedInAgent(t.app, role)).agent);
  return agents.get(role)!;
}

beforeAll(async () => {
  scratchDir('layouts-api');
  t = await startTestApp({ uploadsDir: UPLOADS });
  physicist = (await signedInAgent(t.app, 'physicist')).agent;
  resident = await signedInAgent(t.app, 'resident');
  s = await buildSyntheticStudy(
    physicist,
    fromRoot('test-output/layouts-api/session'),
    {
      kvps: [70],
      shifts: SHIFTS,
    },
  );
});

afterAll(async () => {
  await stopJobQueue();
  await t.close();
});

describe('the layout library', () => {
  let residentLayout: LayoutDto;

  it('answers 401 without a session', async () => {
    await request(t.app).get('/api/layouts').expect(401);
    await browserAgent(t.app)
      .post('/api/layouts')
      .send({ layout: DISC_LAYOUT })
      .expect(401);
  });

  it('lets physicists and residents save layouts, admins only read, and hides it from the committee', async () => {
    const saved = await resident.agent
      .post('/api/layouts')
      .send({ layout: DISC_LAYOUT });
    expect(saved.status, saved.text).toBe(201);
    residentLayout = saved.body.data as LayoutDto;
    expect(residentLayout).toMatchObject({
      name: DISC_LAYOUT.name,
      units: 'px',
      studyId: null,
      owner: { id: resident.user.id },
      permissions: { edit: true, delete: true },
    });
    const admin = await as('admin');
    const listed = await admin.get('/api/layouts');
    expect(listed.status).toBe(200);
    const seen = (listed.body.data as LayoutDto[]).find(
      (l) => l.id === residentLayout.id,
    );
    expect(seen?.permissions).toEqual({ edit: false, delete: false });
    const refused = await admin
      .post('/api/layouts')
      .send({ layout: DISC_LAYOUT });
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('forbidden');
    const committee = await as('committee');
    expect((await committee.get('/api/layouts')).status).toBe(403);
    expect(
      (await committee.get(`/api/layouts/${residentLayout.id}`)).status,
    ).toBe(403);
  });

  it('lets only the owner or a physicist change or delete a layout', async () => {
    const other = await as('resident');
    const renamed = { layout: { ...DISC_LAYOUT, name: 'Renamed' } };
    expect(
      (await other.put(`/api/layouts/${residentLayout.id}`).send(renamed))
        .status,
    ).toBe(403);
    expect(
      (await other.delete(`/api/layouts/${residentLayout.id}`)).status,
    ).toBe(403);
    const changed = await physicist
      .put(`/api/layouts/${residentLayout.id}`)
      .send(renamed);
    expect(changed.status, changed.text).toBe(200);
    expect(changed.body.data.name).toBe('Renamed');
    const copy = await resident.agent
      .post('/api/layouts')
      .send({ layout: DISC_LAYOUT });
    await resident.agent
      .delete(`/api/layouts/${copy.body.data.id}`)
      .expect(204);
    await resident.agent.get(`/api/layouts/${copy.body.data.id}`).expect(404);
    const audit = await AuditEvent.findAll({
      where: { targetType: 'layout', targetId: String(residentLayout.id) },
    });
    expect(audit.map((e) => e.action).sort()).toEqual([
      'layout.created',
      'layout.updated',
    ]);
  });

  it('refuses a layout without a background region, naming the field', async () => {
    const res = await resident.agent.post('/api/layouts').send({
      layout: {
        name: 'No background',
        regions: [{ name: 'a', role: 'object', spec: 'circle:1,1,1' }],
      },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(
      res.body.error.details.map((d: { path: string }) => d.path),
    ).toContain('layout.regions');
  });
});

describe("a study's layout", () => {
  it('is read by staff, hidden from the committee while a draft, changed only by those who may edit the study', async () => {
    const empty = await physicist.get(`/api/studies/${s.studyId}/layout`);
    expect(empty.body.data).toEqual({
      layout: null,
      placements: [],
      permissions: { edit: true },
    });
    expect(
      (await (await as('committee')).get(`/api/studies/${s.studyId}/layout`))
        .status,
    ).toBe(404);
    const body = {
      layout: DISC_LAYOUT,
      referenceImageId: imageIdOf(s, '70kV-grid-1.dcm'),
    };
    for (const role of ['admin', 'resident'] as const) {
      const res = await (
        await as(role)
      )
        .put(`/api/studies/${s.studyId}/layout`)
        .send(body);
      expect(res.status, role).toBe(403);
    }
    const saved = await physicist
      .put(`/api/studies/${s.studyId}/layout`)
      .send(body);
    expect(saved.status, saved.text).toBe(200);
    const dto = saved.body.data as StudyLayoutDto;
    expect(dto.layout).toMatchObject({
      studyId: s.studyId,
      referenceImageId: body.referenceImageId,
    });
    expect(dto.layout?.regions).toEqual(DISC_LAYOUT.regions);
    // Saving the regions asks for new results.
    const queued = await ConditionAnalysis.findAll({
      where: { studyId: s.studyId },
    });
    expect(queued.length).toBe(1);
  });

  it('refuses a reference image from outside the study', async () => {
    const res = await physicist
      .put(`/api/studies/${s.studyId}/layout`)
      .send({ layout: DISC_LAYOUT, referenceImageId: 2_000_000_000 });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('referenceImageId');
  });

  it('follows the phantom when applied with the automatic shift', async () => {
    const res = await physicist
      .post(`/api/studies/${s.studyId}/layout/apply`)
      .send({ autoShift: true });
    expect(res.status, res.text).toBe(200);
    const { placements, warnings } = res.body.data as ApplyLayoutResultDto;
    expect(warnings).toEqual([]);
    expect(placements).toHaveLength(4);
    for (const f of s.files) {
      const name = f.file.split('/').pop()!;
      const p = placements.find((x) => x.imageId === imageIdOf(s, name))!;
      // Truth: the offsets the files were generated with.
      expect(Math.abs(p.dxPx - f.shift.dx), name).toBeLessThan(0.5);
      expect(Math.abs(p.dyPx - f.shift.dy), name).toBeLessThan(0.5);
    }
    const shifted = placements.find(
      (p) => p.imageId === imageIdOf(s, '70kV-open-1.dcm'),
    )!;
    expect(shifted.source).toBe('auto_shift');
    expect(shifted.confidence).toBeGreaterThan(0.3);
    const regions = await physicist.get(
      `/api/images/${shifted.imageId}/regions`,
    );
    const placed = (regions.body.data as ImageRegionsDto).placed!;
    const [cx, cy] = placed.regions[0]!.spec.replace('circle:', '')
      .split(',')
      .map(Number);
    expect(Math.abs(cx! - (DISC.cx + 6))).toBeLessThan(0.5);
    expect(Math.abs(cy! - (DISC.cy - 4))).toBeLessThan(0.5);
    const audit = await AuditEvent.findOne({
      where: {
        targetType: 'study',
        targetId: String(s.studyId),
        action: 'study.layout_applied',
      },
    });
    expect(audit?.details).toMatchObject({ autoShift: true, images: 4 });
  });

  it('places the layout as drawn without the automatic shift', async () => {
    const res = await physicist
      .post(`/api/studies/${s.studyId}/layout/apply`)
      .send({ autoShift: false });
    expect(res.status, res.text).toBe(200);
    const { placements } = res.body.data as ApplyLayoutResultDto;
    expect(
      placements.every(
        (p) => p.dxPx === 0 && p.dyPx === 0 && p.source === 'applied',
      ),
    ).toBe(true);
  });

  it("keeps an image's own offset and regions, and refuses one that does not fit the layout", async () => {
    const imageId = imageIdOf(s, '70kV-grid-2.dcm');
    const set = await physicist.put(`/api/images/${imageId}/regions`).send({
      dxPx: -3.5,
      dyPx: 2.5,
      overrides: { ring: 'ring:96.5,82.5,28,48' },
    });
    expect(set.status, set.text).toBe(200);
    const dto = set.body.data as ImageRegionsDto;
    expect(dto.placement).toMatchObject({
      source: 'manual',
      dxPx: -3.5,
      dyPx: 2.5,
    });
    expect(dto.placed?.regions.map((r) => r.spec)).toEqual([
      'circle:96.5,82.5,14',
      'ring:96.5,82.5,28,48',
    ]);
    const bad = await physicist
      .put(`/api/images/${imageId}/regions`)
      .send({ dxPx: 0, dyPx: 0, overrides: { nowhere: 'circle:1,1,1' } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('region_invalid');
    const admin = await as('admin');
    expect(
      (
        await admin
          .put(`/api/images/${imageId}/regions`)
          .send({ dxPx: 0, dyPx: 0 })
      ).status,
    ).toBe(403);
    expect(
      (await admin.get(`/api/images/${imageId}/regions`)).body.data.permissions
        .edit,
    ).toBe(false);
  });

  it('copies a library layout into the study, so later library edits do not reach it', async () => {
    const lib = await physicist
      .post('/api/layouts')
      .send({ layout: { ...DISC_LAYOUT, name: 'Library copy' } });
    const res = await physicist
      .put(`/api/studies/${s.studyId}/layout`)
      .send({ fromLayoutId: lib.body.data.id });
    expect(res.status, res.text).toBe(200);
    await physicist
      .put(`/api/layouts/${lib.body.data.id}`)
      .send({ layout: { ...DISC_LAYOUT, name: 'Library edited' } })
      .expect(200);
    const study = await physicist.get(`/api/studies/${s.studyId}/layout`);
    expect(study.body.data.layout.name).toBe('Library copy');
  });

  it('refuses every change to a signed study with 409 study_locked', async () => {
    const signed = await buildSyntheticStudy(
      physicist,
      fromRoot('test-output/layouts-api/signed'),
      {
        kvps: [90],
      },
    );
    await physicist
      .put(`/api/studies/${signed.studyId}/layout`)
      .send({ layout: DISC_LAYOUT, referenceImageId: null })
      .expect(200);
    await Study.update({ status: 'signed' }, { where: { id: signed.studyId } });
    const imageId = imageIdOf(signed, '90kV-grid-1.dcm');
    const attempts = [
      physicist
        .put(`/api/studies/${signed.studyId}/layout`)
        .send({ layout: DISC_LAYOUT, referenceImageId: null }),
      physicist
        .post(`/api/studies/${signed.studyId}/layout/apply`)
        .send({ autoShift: false }),
      physicist
        .put(`/api/images/${imageId}/regions`)
        .send({ dxPx: 1, dyPx: 1 }),
    ];
    for (const res of await Promise.all(attempts)) {
      expect(res.status, res.text).toBe(409);
      expect(res.body.error.code).toBe('study_locked');
    }
    const committee = await as('committee');
    const read = await committee.get(`/api/studies/${signed.studyId}/layout`);
    expect(read.status).toBe(200);
    expect(read.body.data.permissions.edit).toBe(false);
  });

  it('answers 409 when applying before any layout is saved', async () => {
    const bare = await buildSyntheticStudy(
      physicist,
      fromRoot('test-output/layouts-api/bare'),
      { kvps: [90] },
    );
    const res = await physicist
      .post(`/api/studies/${bare.studyId}/layout/apply`)
      .send({});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/no region layout/);
  });
});

describe('finding objects', () => {
  it('finds the disc of a synthetic phantom image and proposes a circle and a ring', async () => {
    const imageId = imageIdOf(s, '70kV-grid-1.dcm');
    const res = await resident.agent
      .post(`/api/images/${imageId}/find-objects`)
      .send({ minRadiusPx: 5 });
    expect(res.status, res.text).toBe(200);
    const found = res.body.data as FindObjectsResultDto;
    expect(found.objects).toHaveLength(1);
    // Truth: the generator drew the disc at (100, 80) with radius 20 px.
    expect(Math.abs(found.objects[0]!.cx - DISC.cx)).toBeLessThan(1);
    expect(Math.abs(found.objects[0]!.cy - DISC.cy)).toBeLessThan(1);
    expect(Math.abs(found.objects[0]!.radiusPx - DISC.radiusPx)).toBeLessThan(
      2,
    );
    expect(found.regions.map((r) => r.role)).toEqual(['object', 'background']);
  });

  it('is offered to physicists and residents only', async () => {
    const imageId = imageIdOf(s, '70kV-grid-1.dcm');
    await browserAgent(t.app)
      .post(`/api/images/${imageId}/find-objects`)
      .send({})
      .expect(401);
    for (const role of ['admin', 'committee'] as const) {
      const res = await (
        await as(role)
      )
        .post(`/api/images/${imageId}/find-objects`)
        .send({});
      expect(res.status, role).toBe(403);
    }
    const bad = await physicist
      .post(`/api/images/${imageId}/find-objects`)
      .send({ minRadiusPx: 10, maxRadiusPx: 5 });
    expect(bad.status).toBe(400);
  });
});
