import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { Detector } from '../../../server/models/detector.model.ts';
import { Grid } from '../../../server/models/grid.model.ts';
import { Room } from '../../../server/models/room.model.ts';
import { StudyGrid } from '../../../server/models/study-grid.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import { XrayUnit } from '../../../server/models/xray-unit.model.ts';
import { studyPlanSchema } from '../../../shared/schemas/study.schema.ts';
import { SMALL_PLAN } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
let admin: ReturnType<typeof browserAgent>;
let physicist: ReturnType<typeof browserAgent>;
let physicistId: number;
let adminId: number;
beforeAll(async () => {
  t = await startTestApp();
  const signedInAdmin = await signedInAgent(t.app, 'admin');
  admin = signedInAdmin.agent;
  adminId = signedInAdmin.user.id;
  const signedIn = await signedInAgent(t.app, 'physicist');
  physicist = signedIn.agent;
  physicistId = signedIn.user.id;
});
afterAll(async () => {
  await t.close();
});

const unique = (label: string): string =>
  `${label} ${randomUUID().slice(0, 8)}`;

async function postRoom(name = unique('Room')) {
  const res = await physicist
    .post('/api/equipment/rooms')
    .send({ name, site: 'Saltmarsh General Hospital', modalityNotes: '' });
  expect(res.status).toBe(201);
  return res.body.data as { id: number; name: string };
}

describe('rooms', () => {
  it('creates a room, stores empty notes as none, and audits it', async () => {
    const name = unique('Fluoro-free room');
    const res = await physicist.post('/api/equipment/rooms').send({
      name: `  ${name}  `,
      site: 'Saltmarsh General Hospital',
      modalityNotes: '',
    });
    expect(res.status).toBe(201);
    expect(res.body.data).toMatchObject({
      name,
      modalityNotes: null,
      units: [],
      detectors: [],
      grids: [],
      permissions: { edit: true, delete: true },
    });
    const audit = await AuditEvent.findOne({
      where: { action: 'room.created', targetId: String(res.body.data.id) },
    });
    expect(audit?.actorId).toBe(physicistId);
    expect(audit?.details).toMatchObject({
      name,
      site: 'Saltmarsh General Hospital',
    });
  });

  it('answers 400 naming each bad field and writes nothing', async () => {
    // Other suites may write to the shared test database meanwhile, so the
    // checks count only what this admin did.
    const auditsBefore = await AuditEvent.count({
      where: { actorId: adminId },
    });
    const res = await admin
      .post('/api/equipment/rooms')
      .send({ name: '', site: 7, modalityNotes: 'x'.repeat(2001) });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    const paths = res.body.error.details
      .map((d: { path: string }) => d.path)
      .sort();
    expect(paths).toEqual(['modalityNotes', 'name', 'site']);
    expect(await AuditEvent.count({ where: { actorId: adminId } })).toBe(
      auditsBefore,
    );
    expect(await Room.count({ where: { name: '' } })).toBe(0);
  });

  it('answers 409 for a second room of the same name', async () => {
    const room = await postRoom();
    const res = await admin
      .post('/api/equipment/rooms')
      .send({ name: room.name, site: 'Elsewhere' });
    expect(res.status).toBe(409);
    expect(res.body.error).toEqual({
      code: 'conflict',
      message: `A room named “${room.name}” already exists.`,
    });
    expect(await Room.count({ where: { name: room.name } })).toBe(1);
  });

  it('updates a room and audits the values before and after', async () => {
    const room = await postRoom();
    const res = await admin
      .patch(`/api/equipment/rooms/${room.id}`)
      .send({ site: 'Saltmarsh General Hospital, East Wing' });
    expect(res.status).toBe(200);
    expect(res.body.data.site).toBe('Saltmarsh General Hospital, East Wing');
    const audit = await AuditEvent.findOne({
      where: { action: 'room.updated', targetId: String(room.id) },
    });
    expect(audit?.details).toEqual({
      before: { site: 'Saltmarsh General Hospital' },
      change: { site: 'Saltmarsh General Hospital, East Wing' },
    });
  });

  it('answers 400 for an empty change and 404 for an unknown room', async () => {
    const room = await postRoom();
    const empty = await admin.patch(`/api/equipment/rooms/${room.id}`).send({});
    expect(empty.status).toBe(400);
    expect(empty.body.error.details).toEqual([
      { path: '(body)', message: 'Nothing to change.' },
    ]);
    const missing = await admin.get('/api/equipment/rooms/99999999');
    expect(missing.status).toBe(404);
    expect(missing.body.error.code).toBe('not_found');
    const badId = await admin.get('/api/equipment/rooms/abc');
    expect(badId.status).toBe(400);
    expect(badId.body.error.details[0].path).toBe('id');
  });

  it('refuses to delete a room in use (409), keeps it, and audits nothing', async () => {
    const room = await postRoom();
    const unit = await physicist
      .post('/api/equipment/units')
      .send({ roomId: room.id, name: 'Ceiling tube' });
    expect(unit.status).toBe(201);
    const detail = await physicist.get(`/api/equipment/rooms/${room.id}`);
    expect(detail.body.data.permissions).toEqual({ edit: true, delete: false });

    const res = await physicist.delete(`/api/equipment/rooms/${room.id}`);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('conflict');
    expect(res.body.error.message).toContain('1 X-ray unit(s)');
    expect(await Room.findByPk(room.id)).not.toBeNull();
    expect(
      await AuditEvent.count({
        where: { action: 'room.deleted', targetId: String(room.id) },
      }),
    ).toBe(0);
  });

  it('deletes an empty room and audits what it was', async () => {
    const room = await postRoom();
    const res = await admin.delete(`/api/equipment/rooms/${room.id}`);
    expect(res.status).toBe(204);
    expect(await Room.findByPk(room.id)).toBeNull();
    const audit = await AuditEvent.findOne({
      where: { action: 'room.deleted', targetId: String(room.id) },
    });
    expect(audit?.details).toMatchObject({ name: room.name });
  });

  it('lists rooms with their units, detectors and grids', async () => {
    const room = await postRoom();
    await physicist.post('/api/equipment/units').send({
      roomId: room.id,
      name: 'Floor tube',
      model: 'Saltmarsh Radiant 65',
    });
    await physicist.post('/api/equipment/detectors').send({
      roomId: room.id,
      name: 'Table panel',
      detectorType: 'flat_panel_indirect',
      pixelPitchUm: 148,
    });
    await physicist.post('/api/equipment/grids').send({
      label: unique('Table grid'),
      roomId: room.id,
      ratio: 10,
      stripFrequencyPerCm: 40,
    });
    const res = await browserAgent(t.app).get('/api/equipment/rooms');
    expect(res.status).toBe(401);
    const list = await physicist.get('/api/equipment/rooms');
    const listed = list.body.data.find((r: { id: number }) => r.id === room.id);
    expect(listed.units.map((u: { name: string }) => u.name)).toEqual([
      'Floor tube',
    ]);
    expect(listed.detectors[0]).toMatchObject({
      name: 'Table panel',
      pixelPitchUm: 148,
      calibrationCount: 0,
    });
    expect(listed.grids[0]).toMatchObject({
      ratio: 10,
      stripFrequencyPerCm: 40,
    });
  });
});

describe('X-ray units and detectors', () => {
  it('creates a unit and a detector, each audited', async () => {
    const room = await postRoom();
    const unit = await admin.post('/api/equipment/units').send({
      roomId: room.id,
      name: 'Tube A',
      model: 'Saltmarsh Radiant 80',
      serial: 'SGH-XU-9',
    });
    expect(unit.status).toBe(201);
    expect(unit.body.data).toMatchObject({
      roomId: room.id,
      name: 'Tube A',
      serial: 'SGH-XU-9',
    });
    const detector = await admin.post('/api/equipment/detectors').send({
      roomId: room.id,
      name: 'Panel A',
      detectorType: 'computed_radiography',
      pixelPitchUm: 100,
    });
    expect(detector.status).toBe(201);
    expect(detector.body.data).toMatchObject({
      roomName: room.name,
      calibrations: [],
      model: null,
    });
    for (const [action, id] of [
      ['xray_unit.created', unit.body.data.id],
      ['detector.created', detector.body.data.id],
    ]) {
      expect(
        await AuditEvent.count({ where: { action, targetId: String(id) } }),
      ).toBe(1);
    }
  });

  it('answers 400 for an unknown room, a bad type and an implausible pixel pitch', async () => {
    const name = unique('Ghost panel');
    const res = await admin.post('/api/equipment/detectors').send({
      roomId: 99999999,
      name,
      detectorType: 'film',
      pixelPitchUm: 0.14,
    });
    expect(res.status).toBe(400);
    const details = res.body.error.details as {
      path: string;
      message: string;
    }[];
    expect(details.map((d) => d.path).sort()).toEqual([
      'detectorType',
      'pixelPitchUm',
    ]);
    expect(details.find((d) => d.path === 'pixelPitchUm')?.message).toBe(
      'Pixel pitch must be between 20 and 1000 µm (plausibility bound).',
    );
    const unknownRoom = await admin.post('/api/equipment/detectors').send({
      roomId: 99999999,
      name,
      detectorType: 'other',
      pixelPitchUm: 140,
    });
    expect(unknownRoom.status).toBe(400);
    expect(unknownRoom.body.error.details).toEqual([
      { path: 'roomId', message: 'There is no room with this id.' },
    ]);
    expect(await Detector.count({ where: { name } })).toBe(0);
  });

  it('answers 409 for a second unit of the same name in a room', async () => {
    const room = await postRoom();
    await admin
      .post('/api/equipment/units')
      .send({ roomId: room.id, name: 'Tube' });
    const res = await admin
      .post('/api/equipment/units')
      .send({ roomId: room.id, name: 'Tube' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toBe(
      'This room already has an X-ray unit of that name.',
    );
    expect(await XrayUnit.count({ where: { roomId: room.id } })).toBe(1);
  });

  it('moves a detector to another room and audits the move', async () => {
    const from = await postRoom();
    const to = await postRoom();
    const created = await admin.post('/api/equipment/detectors').send({
      roomId: from.id,
      name: 'Wireless panel',
      detectorType: 'flat_panel_indirect',
      pixelPitchUm: 140,
    });
    const id = created.body.data.id;
    const res = await physicist
      .patch(`/api/equipment/detectors/${id}`)
      .send({ roomId: to.id });
    expect(res.status).toBe(200);
    expect(res.body.data).toMatchObject({ roomId: to.id, roomName: to.name });
    const audit = await AuditEvent.findOne({
      where: { action: 'detector.updated', targetId: String(id) },
    });
    expect(audit?.details).toEqual({
      before: { roomId: from.id },
      change: { roomId: to.id },
    });
  });

  it('deletes a unit and audits it', async () => {
    const room = await postRoom();
    const unit = await admin
      .post('/api/equipment/units')
      .send({ roomId: room.id, name: 'Old tube' });
    const res = await physicist.delete(
      `/api/equipment/units/${unit.body.data.id}`,
    );
    expect(res.status).toBe(204);
    expect(await XrayUnit.findByPk(unit.body.data.id)).toBeNull();
    expect(
      await AuditEvent.count({
        where: {
          action: 'xray_unit.deleted',
          targetId: String(unit.body.data.id),
        },
      }),
    ).toBe(1);
  });
});

describe('equipment a study uses', () => {
  it('refuses to delete the room, detector and grid of a study (409) and keeps them', async () => {
    const room = await postRoom();
    const detector = await physicist.post('/api/equipment/detectors').send({
      roomId: room.id,
      name: 'Study panel',
      detectorType: 'flat_panel_indirect',
      pixelPitchUm: 139,
    });
    const grid = await physicist.post('/api/equipment/grids').send({
      label: unique('Study grid'),
      ratio: 12,
      stripFrequencyPerCm: 40,
    });
    const study = await Study.create({
      roomId: room.id,
      detectorId: detector.body.data.id,
      title: 'Grid check',
      purpose: 'Equipment in use',
      plan: studyPlanSchema.parse(SMALL_PLAN),
      createdBy: physicistId,
    });
    await StudyGrid.create({
      studyId: study.id,
      gridId: grid.body.data.id,
      position: 0,
    });

    const gridRes = await physicist.delete(
      `/api/equipment/grids/${grid.body.data.id}`,
    );
    expect(gridRes.status).toBe(409);
    expect(gridRes.body.error.message).toBe(
      'This grid is in use by a study, so it cannot be deleted.',
    );
    const detectorRes = await physicist.delete(
      `/api/equipment/detectors/${detector.body.data.id}`,
    );
    expect(detectorRes.status).toBe(409);
    expect(detectorRes.body.error.message).toBe(
      'This detector is in use by a study, so it cannot be deleted.',
    );
    await Detector.update(
      { roomId: (await postRoom()).id },
      { where: { id: detector.body.data.id } },
    );
    const roomRes = await physicist.delete(`/api/equipment/rooms/${room.id}`);
    expect(roomRes.status).toBe(409);
    expect(roomRes.body.error.message).toBe(
      'This room is in use by a study, so it cannot be deleted.',
    );

    expect(await Grid.findByPk(grid.body.data.id)).not.toBeNull();
    expect(await Detector.findByPk(detector.body.data.id)).not.toBeNull();
    expect(await Room.findByPk(room.id)).not.toBeNull();
    const deletions = await AuditEvent.count({
      where: {
        action: ['grid.deleted', 'detector.deleted', 'room.deleted'],
        actorId: physicistId,
      },
    });
    expect(deletions).toBe(0);
  });
});
