import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DetectorCalibration } from '../../../server/models/detector-calibration.model.ts';
import { Detector } from '../../../server/models/detector.model.ts';
import type { Grid } from '../../../server/models/grid.model.ts';
import { Room } from '../../../server/models/room.model.ts';
import { XrayUnit } from '../../../server/models/xray-unit.model.ts';
import type { Role } from '../../../shared/permissions.ts';
import { buildGridWith } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgentsByRole,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
let agents: Record<Role, ReturnType<typeof browserAgent>>;
beforeAll(async () => {
  t = await startTestApp();
  agents = await signedInAgentsByRole(t.app);
});
afterAll(async () => {
  await t.close();
});

const unique = (label: string): string =>
  `${label} ${randomUUID().slice(0, 8)}`;

/** Flat-field points on PV = 100 + 400·K, with small scatter. */
const POINTS = [
  { airKermaUgy: 1, meanPixelValue: 502 },
  { airKermaUgy: 2, meanPixelValue: 897 },
  { airKermaUgy: 5, meanPixelValue: 2104 },
  { airKermaUgy: 10, meanPixelValue: 4095 },
];

async function buildRoom(): Promise<Room> {
  return Room.create({
    name: unique('Matrix room'),
    site: 'Saltmarsh General Hospital',
    modalityNotes: null,
  });
}

async function buildDetector(roomId: number): Promise<Detector> {
  return Detector.create({
    roomId,
    name: unique('Panel'),
    model: null,
    detectorType: 'flat_panel_indirect',
    pixelPitchUm: 140,
    serial: null,
  });
}

async function buildCalibration(
  detectorId: number,
): Promise<DetectorCalibration> {
  const fit = {
    model: 'linear' as const,
    a: 100,
    b: 400,
    rSquared: 0.999,
    residuals: [0, 0, 0, 0],
    residualSd: 1,
  };
  return DetectorCalibration.create({
    detectorId,
    calibratedOn: '2026-11-20',
    beamQualityNote: 'RQA5',
    points: POINTS,
    model: 'linear',
    modelChoice: 'requested',
    parameters: { a: 100, b: 400 },
    rSquared: 0.999,
    residuals: [0, 0, 0, 0],
    residualSd: 1,
    fits: [fit],
    notes: null,
  });
}

function buildGrid(roomId: number | null): Promise<Grid> {
  return buildGridWith({
    label: unique('Matrix grid'),
    roomId,
    ratio: 8,
    stripFrequencyPerCm: 40,
  });
}

type Method = 'get' | 'post' | 'patch' | 'delete';
interface Call {
  method: Method;
  path: string;
  body?: object;
}
interface RouteCase {
  name: string;
  write: boolean;
  success: number;
  /** Builds what the call needs, fresh for each call that may succeed. */
  call: () => Promise<Call>;
}

const ROUTES: RouteCase[] = [
  {
    name: 'GET /rooms',
    write: false,
    success: 200,
    call: async () => ({ method: 'get', path: '/api/equipment/rooms' }),
  },
  {
    name: 'POST /rooms',
    write: true,
    success: 201,
    call: async () => ({
      method: 'post',
      path: '/api/equipment/rooms',
      body: { name: unique('New room'), site: 'Saltmarsh' },
    }),
  },
  {
    name: 'GET /rooms/:id',
    write: false,
    success: 200,
    call: async () => ({
      method: 'get',
      path: `/api/equipment/rooms/${(await buildRoom()).id}`,
    }),
  },
  {
    name: 'PATCH /rooms/:id',
    write: true,
    success: 200,
    call: async () => ({
      method: 'patch',
      path: `/api/equipment/rooms/${(await buildRoom()).id}`,
      body: { site: 'Annexe' },
    }),
  },
  {
    name: 'DELETE /rooms/:id',
    write: true,
    success: 204,
    call: async () => ({
      method: 'delete',
      path: `/api/equipment/rooms/${(await buildRoom()).id}`,
    }),
  },
  {
    name: 'GET /units',
    write: false,
    success: 200,
    call: async () => ({ method: 'get', path: '/api/equipment/units' }),
  },
  {
    name: 'POST /units',
    write: true,
    success: 201,
    call: async () => ({
      method: 'post',
      path: '/api/equipment/units',
      body: { roomId: (await buildRoom()).id, name: 'Ceiling tube' },
    }),
  },
  ...(['get', 'patch', 'delete'] as const).map((method): RouteCase => ({
    name: `${method.toUpperCase()} /units/:id`,
    write: method !== 'get',
    success: method === 'delete' ? 204 : 200,
    call: async () => {
      const unit = await XrayUnit.create({
        roomId: (await buildRoom()).id,
        name: 'Tube',
        model: null,
        serial: null,
      });
      return {
        method,
        path: `/api/equipment/units/${unit.id}`,
        body: method === 'patch' ? { serial: 'S-1' } : undefined,
      };
    },
  })),
  {
    name: 'GET /detectors',
    write: false,
    success: 200,
    call: async () => ({ method: 'get', path: '/api/equipment/detectors' }),
  },
  {
    name: 'POST /detectors',
    write: true,
    success: 201,
    call: async () => ({
      method: 'post',
      path: '/api/equipment/detectors',
      body: {
        roomId: (await buildRoom()).id,
        name: 'Panel',
        detectorType: 'flat_panel_direct',
        pixelPitchUm: 100,
      },
    }),
  },
  ...(['get', 'patch', 'delete'] as const).map((method): RouteCase => ({
    name: `${method.toUpperCase()} /detectors/:id`,
    write: method !== 'get',
    success: method === 'delete' ? 204 : 200,
    call: async () => {
      const detector = await buildDetector((await buildRoom()).id);
      return {
        method,
        path: `/api/equipment/detectors/${detector.id}`,
        body: method === 'patch' ? { pixelPitchUm: 150 } : undefined,
      };
    },
  })),
  {
    name: 'GET /detectors/:id/calibrations',
    write: false,
    success: 200,
    call: async () => ({
      method: 'get',
      path: `/api/equipment/detectors/${(await buildDetector((await buildRoom()).id)).id}/calibrations`,
    }),
  },
  {
    name: 'POST /detectors/:id/calibrations',
    write: true,
    success: 201,
    call: async () => ({
      method: 'post',
      path: `/api/equipment/detectors/${(await buildDetector((await buildRoom()).id)).id}/calibrations`,
      body: {
        calibratedOn: '2026-11-30',
        beamQualityNote: 'RQA5',
        points: POINTS,
        model: 'linear',
      },
    }),
  },
  ...(['get', 'delete'] as const).map((method): RouteCase => ({
    name: `${method.toUpperCase()} /detectors/:id/calibrations/:calibrationId`,
    write: method === 'delete',
    success: method === 'delete' ? 204 : 200,
    call: async () => {
      const detector = await buildDetector((await buildRoom()).id);
      const calibration = await buildCalibration(detector.id);
      return {
        method,
        path: `/api/equipment/detectors/${detector.id}/calibrations/${calibration.id}`,
      };
    },
  })),
  {
    name: 'POST /calibrations/fit',
    write: false,
    success: 200,
    call: async () => ({
      method: 'post',
      path: '/api/equipment/calibrations/fit',
      body: { points: POINTS },
    }),
  },
  {
    name: 'GET /grids',
    write: false,
    success: 200,
    call: async () => ({ method: 'get', path: '/api/equipment/grids' }),
  },
  {
    name: 'POST /grids/derive',
    write: false,
    success: 200,
    call: async () => ({
      method: 'post',
      path: '/api/equipment/grids/derive',
      body: { stripHeightUm: 2000, interspaceWidthUm: 250 },
    }),
  },
  {
    name: 'POST /grids',
    write: true,
    success: 201,
    call: async () => ({
      method: 'post',
      path: '/api/equipment/grids',
      body: { label: unique('New grid'), ratio: 10, stripFrequencyPerCm: 36 },
    }),
  },
  ...(['get', 'patch', 'delete'] as const).map((method): RouteCase => ({
    name: `${method.toUpperCase()} /grids/:id`,
    write: method !== 'get',
    success: method === 'delete' ? 204 : 200,
    call: async () => {
      const grid = await buildGrid(null);
      return {
        method,
        path: `/api/equipment/grids/${grid.id}`,
        body: method === 'patch' ? { serial: 'G-7' } : undefined,
      };
    },
  })),
];

const READERS: Role[] = ['resident', 'committee'];
const EDITORS: Role[] = ['admin', 'physicist'];

async function send(agent: ReturnType<typeof browserAgent>, call: Call) {
  const request = agent[call.method](call.path);
  return call.body ? request.send(call.body) : request;
}

describe('role matrix of the equipment register', () => {
  it.each(ROUTES)('$name answers 401 with no session', async ({ call }) => {
    const res = await send(browserAgent(t.app), await call());
    expect(res.status).toBe(401);
    expect(res.body).toEqual({
      error: { code: 'unauthenticated', message: 'Sign in first.' },
    });
  });

  for (const role of READERS) {
    it.each(ROUTES)(
      `$name as a ${role}: 403 on writes, success on reads`,
      async ({ call, write, success }) => {
        const res = await send(agents[role], await call());
        if (write) {
          expect(res.status).toBe(403);
          expect(res.body).toEqual({
            error: {
              code: 'forbidden',
              message: 'Your role does not allow this.',
            },
          });
        } else {
          expect(res.status).toBe(success);
          expect(res.body.data).toBeDefined();
        }
      },
    );
  }

  for (const role of EDITORS) {
    it.each(ROUTES)(
      `$name succeeds for a ${role}`,
      async ({ call, success }) => {
        const res = await send(agents[role], await call());
        expect(res.status).toBe(success);
        if (success === 204) expect(res.body).toEqual({});
        else expect(res.body.data).toBeDefined();
      },
    );
  }

  it('refuses a resident’s write without changing anything', async () => {
    const room = await buildRoom();
    const res = await agents.resident
      .patch(`/api/equipment/rooms/${room.id}`)
      .send({ name: 'Renamed by a resident' });
    expect(res.status).toBe(403);
    await room.reload();
    expect(room.name).not.toBe('Renamed by a resident');
  });

  it('tells readers they cannot edit and editors that they can', async () => {
    const room = await buildRoom();
    const asCommittee = await agents.committee.get(
      `/api/equipment/rooms/${room.id}`,
    );
    const asPhysicist = await agents.physicist.get(
      `/api/equipment/rooms/${room.id}`,
    );
    expect(asCommittee.body.data.permissions).toEqual({
      edit: false,
      delete: false,
    });
    expect(asPhysicist.body.data.permissions).toEqual({
      edit: true,
      delete: true,
    });
  });
});
