import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { DetectorCalibration } from '../../../server/models/detector-calibration.model.ts';
import type { browserAgent } from '../../helpers/test-app.ts';
import {
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
let physicist: ReturnType<typeof browserAgent>;
let committee: ReturnType<typeof browserAgent>;
beforeAll(async () => {
  t = await startTestApp();
  physicist = (await signedInAgent(t.app, 'physicist')).agent;
  committee = (await signedInAgent(t.app, 'committee')).agent;
});
afterAll(async () => {
  await t.close();
});

const KERMAS_UGY = [0.5, 1, 2, 5, 10, 20];
// Points built exactly on known curves, so the fitted parameters must come
// back as the ones used to build them and R² must be 1.
const linearPoints = KERMAS_UGY.map((k) => ({
  airKermaUgy: k,
  meanPixelValue: 100 + 400 * k,
}));
const logarithmicPoints = KERMAS_UGY.map((k) => ({
  airKermaUgy: k,
  meanPixelValue: 2000 + 500 * Math.log(k),
}));

async function newDetector(): Promise<number> {
  const room = await physicist.post('/api/equipment/rooms').send({
    name: `Calibration room ${randomUUID().slice(0, 8)}`,
    site: 'Saltmarsh General Hospital',
  });
  const detector = await physicist.post('/api/equipment/detectors').send({
    roomId: room.body.data.id,
    name: 'Panel',
    detectorType: 'flat_panel_indirect',
    pixelPitchUm: 140,
  });
  return detector.body.data.id;
}

describe('calibration fit preview', () => {
  it('fits all three models and chooses the best R² when none is asked for', async () => {
    const res = await committee
      .post('/api/equipment/calibrations/fit')
      .send({ points: logarithmicPoints });
    expect(res.status).toBe(200);
    const { fits, chosen, choice } = res.body.data;
    expect(fits.map((f: { model: string }) => f.model)).toEqual([
      'linear',
      'logarithmic',
      'power',
    ]);
    expect(choice).toBe('best R²');
    expect(chosen.model).toBe('logarithmic');
    expect(chosen.a).toBeCloseTo(2000, 8);
    expect(chosen.b).toBeCloseTo(500, 8);
    expect(chosen.rSquared).toBeCloseTo(1, 12);
  });

  it('answers 400 on points for too few or flat points, and on model for an impossible one', async () => {
    const few = await committee
      .post('/api/equipment/calibrations/fit')
      .send({ points: linearPoints.slice(0, 2) });
    expect(few.status).toBe(400);
    expect(few.body.error.details).toEqual([
      { path: 'points', message: 'Enter at least 3 flat-field points.' },
    ]);

    const flat = await committee.post('/api/equipment/calibrations/fit').send({
      points: KERMAS_UGY.map((k) => ({ airKermaUgy: k, meanPixelValue: 800 })),
    });
    expect(flat.status).toBe(400);
    expect(flat.body.error.details[0].path).toBe('points');
    expect(flat.body.error.details[0].message).toMatch(/do not vary/);

    const negative = linearPoints.map((p) => ({
      ...p,
      meanPixelValue: p.meanPixelValue - 1000,
    }));
    const power = await committee
      .post('/api/equipment/calibrations/fit')
      .send({ points: negative, model: 'power' });
    expect(power.status).toBe(400);
    expect(power.body.error.details[0].path).toBe('model');

    const zeroKerma = await committee
      .post('/api/equipment/calibrations/fit')
      .send({
        points: [{ airKermaUgy: 0, meanPixelValue: 100 }, ...linearPoints],
      });
    expect(zeroKerma.status).toBe(400);
    expect(zeroKerma.body.error.details).toEqual([
      {
        path: 'points.0.airKermaUgy',
        message: 'Air kerma at the detector must be above 0 µGy.',
      },
    ]);
  });
});

describe('calibration records', () => {
  it('records a calibration with the requested model and all fits, and audits it', async () => {
    const detectorId = await newDetector();
    const res = await physicist
      .post(`/api/equipment/detectors/${detectorId}/calibrations`)
      .send({
        calibratedOn: '2026-11-28',
        beamQualityNote: 'RQA5: 70 kV, 21 mm Al added',
        points: linearPoints,
        model: 'linear',
      });
    expect(res.status).toBe(201);
    const record = res.body.data;
    expect(record).toMatchObject({
      detectorId,
      calibratedOn: '2026-11-28',
      model: 'linear',
      modelChoice: 'requested',
      permissions: { edit: false, delete: true },
    });
    expect(record.parameters.a).toBeCloseTo(100, 8);
    expect(record.parameters.b).toBeCloseTo(400, 8);
    expect(record.rSquared).toBeCloseTo(1, 12);
    expect(record.residuals).toHaveLength(KERMAS_UGY.length);
    expect(record.fits).toHaveLength(3);
    const audit = await AuditEvent.findOne({
      where: {
        action: 'detector_calibration.created',
        targetId: String(record.id),
      },
    });
    expect(audit?.details).toMatchObject({
      detectorId,
      model: 'linear',
      choice: 'requested',
    });

    const detector = await committee.get(
      `/api/equipment/detectors/${detectorId}`,
    );
    expect(detector.body.data.calibrationCount).toBe(1);
    expect(detector.body.data.calibrations[0].id).toBe(record.id);
    expect(detector.body.data.calibrations[0].permissions).toEqual({
      edit: false,
      delete: false,
    });
  });

  it('answers 400 naming bad fields and writes nothing', async () => {
    const detectorId = await newDetector();
    const res = await physicist
      .post(`/api/equipment/detectors/${detectorId}/calibrations`)
      .send({
        calibratedOn: '28/11/2026',
        beamQualityNote: '',
        points: [{ airKermaUgy: 'one', meanPixelValue: 500 }, ...linearPoints],
        model: 'cubic',
      });
    expect(res.status).toBe(400);
    const paths = res.body.error.details
      .map((d: { path: string }) => d.path)
      .sort();
    expect(paths).toEqual([
      'beamQualityNote',
      'calibratedOn',
      'model',
      'points.0.airKermaUgy',
    ]);
    expect(await DetectorCalibration.count({ where: { detectorId } })).toBe(0);
  });

  it('answers 404 for a record of another detector', async () => {
    const first = await newDetector();
    const second = await newDetector();
    const created = await physicist
      .post(`/api/equipment/detectors/${first}/calibrations`)
      .send({
        calibratedOn: '2026-11-28',
        beamQualityNote: 'RQA5',
        points: linearPoints,
      });
    const res = await committee.get(
      `/api/equipment/detectors/${second}/calibrations/${created.body.data.id}`,
    );
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('refuses to delete a detector with calibration records until they are deleted', async () => {
    const detectorId = await newDetector();
    const created = await physicist
      .post(`/api/equipment/detectors/${detectorId}/calibrations`)
      .send({
        calibratedOn: '2026-11-28',
        beamQualityNote: 'RQA5',
        points: linearPoints,
      });
    const refused = await physicist.delete(
      `/api/equipment/detectors/${detectorId}`,
    );
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toBe(
      '“Panel” has 1 calibration record(s); delete them first.',
    );

    const removed = await physicist.delete(
      `/api/equipment/detectors/${detectorId}/calibrations/${created.body.data.id}`,
    );
    expect(removed.status).toBe(204);
    expect(
      await AuditEvent.count({
        where: {
          action: 'detector_calibration.deleted',
          targetId: String(created.body.data.id),
        },
      }),
    ).toBe(1);
    const deleted = await physicist.delete(
      `/api/equipment/detectors/${detectorId}`,
    );
    expect(deleted.status).toBe(204);
  });
});
