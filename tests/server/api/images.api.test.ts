import sharp from 'sharp';
import type { Response } from 'supertest';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeDicom } from '../../../server/dicom/decode-dicom.ts';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { Image } from '../../../server/models/image.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import {
  studyPlanSchema,
  type StudyStatus,
} from '../../../shared/schemas/study.schema.ts';
import { phantomDicom, scratchDir } from '../../helpers/dicom-files.ts';
import { buildRoom, SMALL_PLAN } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

const UPLOADS = 'test-output/images-api/uploads';
let t: TestApp;
let physicist: TestAgent;
let physicistId: number;
/** A 600 × 400 phantom in no study, with its bytes for the decoder. */
let free: { id: number; bytes: Uint8Array };
let signedImageId: number;
let submittedImageId: number;

async function upload(
  agent: TestAgent,
  bytes: Uint8Array,
  studyId?: number,
): Promise<number> {
  let req = agent.post('/api/images');
  if (studyId) req = req.field('studyId', String(studyId));
  const res = await req.attach('files', Buffer.from(bytes), 'phantom.dcm');
  const [result] = res.body.data.results;
  if (result.outcome !== 'stored')
    throw new Error(`upload failed: ${JSON.stringify(result)}`);
  return result.imageId as number;
}

async function imageInStudy(
  status: StudyStatus,
  seed: number,
): Promise<number> {
  const room = await buildRoom();
  const study = await Study.create({
    roomId: room.id,
    detectorId: null,
    title: `Grid check ${seed}`,
    purpose: 'Image API test',
    plan: studyPlanSchema.parse(SMALL_PLAN),
    createdBy: physicistId,
  });
  const id = await upload(physicist, phantomDicom({ seed }), study.id);
  await study.update({ status });
  return id;
}

beforeAll(async () => {
  scratchDir('images-api/uploads');
  t = await startTestApp({ uploadsDir: UPLOADS });
  const signedIn = await signedInAgent(t.app, 'physicist');
  physicist = signedIn.agent;
  physicistId = signedIn.user.id;
  const bytes = phantomDicom({ seed: 60, rows: 400, columns: 600 });
  free = { id: await upload(physicist, bytes), bytes };
  signedImageId = await imageInStudy('signed', 61);
  submittedImageId = await imageInStudy('submitted', 62);
});
afterAll(async () => {
  await t.close();
});

/** Collects a binary body into a Buffer. */
function binary(
  res: Response,
  done: (error: Error | null, body: Buffer) => void,
): void {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

const READ_ROUTES = [
  {
    label: 'GET /:id',
    method: 'get',
    path: (id: number) => `/api/images/${id}`,
  },
  {
    label: 'GET /:id/preview',
    method: 'get',
    path: (id: number) => `/api/images/${id}/preview?size=thumb`,
  },
  {
    label: 'GET /:id/pixels',
    method: 'get',
    path: (id: number) => `/api/images/${id}/pixels?decimate=8`,
  },
  {
    label: 'POST /:id/region-stats',
    method: 'post',
    path: (id: number) => `/api/images/${id}/region-stats`,
  },
] as const;
const REGION_BODY = { regions: [{ shape: 'rect', x0: 0, y0: 0, w: 4, h: 4 }] };

describe('role matrix for reading images', () => {
  it.each(READ_ROUTES)(
    '$label answers 401 without a session',
    async ({ method, path }) => {
      const res = await browserAgent(t.app)
        [method](path(free.id))
        .send(REGION_BODY);
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    },
  );

  for (const role of ['admin', 'physicist', 'resident'] as const) {
    it.each(READ_ROUTES)(
      `$label answers 200 for a ${role}`,
      async ({ method, path }) => {
        const { agent } = await signedInAgent(t.app, role);
        const res = await agent[method](path(free.id)).send(REGION_BODY);
        expect(res.status).toBe(200);
      },
    );
  }

  it.each(READ_ROUTES)(
    '$label hides images outside signed studies from the committee (404)',
    async ({ method, path }) => {
      const { agent } = await signedInAgent(t.app, 'committee');
      for (const id of [free.id, submittedImageId]) {
        const res = await agent[method](path(id)).send(REGION_BODY);
        expect(res.status).toBe(404);
        expect(res.body).toEqual({
          error: { code: 'not_found', message: 'No such image.' },
        });
      }
      expect(
        (await agent[method](path(signedImageId)).send(REGION_BODY)).status,
      ).toBe(200);
    },
  );

  it('answers 404 for an image that does not exist', async () => {
    const res = await physicist.get('/api/images/2000000000');
    expect(res.status).toBe(404);
  });
});

describe('GET /api/images/:id', () => {
  it('presents the file facts, acquisition, header and warnings', async () => {
    const res = await physicist.get(`/api/images/${free.id}`);
    expect(res.body.data).toMatchObject({
      id: free.id,
      rows: 400,
      columns: 600,
      transferSyntaxName: 'Explicit VR Little Endian',
      pixelSpacing: {
        rowMm: 0.148,
        columnMm: 0.148,
        source: 'ImagerPixelSpacing',
      },
      acquisition: {
        kvp: 81,
        exposureMas: 10,
        sidMm: 1800,
        grid: ['FOCUSED', 'RECIPROCATING'],
      },
      corrections: {},
      header: { Modality: 'DX', KVP: 81 },
      permissions: { correct: true },
    });
    expect(res.body.data).not.toHaveProperty('storageKey');
  });
});

describe('PATCH /api/images/:id/corrections', () => {
  it('keeps the file value beside the correction, applies it to the effective values and audits it', async () => {
    const { agent, user } = await signedInAgent(t.app, 'physicist');
    const res = await agent.patch(`/api/images/${free.id}/corrections`).send({
      values: { kvp: 80, gridPitchMm: 0.278 },
      reason: 'Generator display read 80 kV; pitch from the grid label.',
    });
    expect(res.status).toBe(200);
    expect(res.body.data.acquisition.kvp).toBe(81);
    expect(res.body.data.effectiveAcquisition).toMatchObject({
      kvp: 80,
      gridPitchMm: 0.278,
    });
    expect(res.body.data.corrections.kvp).toMatchObject({
      value: 80,
      correctedBy: user.id,
    });
    expect((await Image.findByPk(free.id))!.kvp).toBe(81);
    const audit = await AuditEvent.findOne({
      where: { action: 'image.corrected', targetId: String(free.id) },
      order: [['id', 'DESC']],
    });
    expect(audit?.details).toMatchObject({
      changes: { kvp: { fileValue: 81, after: 80 } },
    });

    const cleared = await agent
      .patch(`/api/images/${free.id}/corrections`)
      .send({ values: { kvp: null }, reason: 'The file was right after all.' });
    expect(cleared.body.data.effectiveAcquisition.kvp).toBe(81);
    expect(cleared.body.data.corrections).not.toHaveProperty('kvp');
    expect(cleared.body.data.corrections).toHaveProperty('gridPitchMm');
  });

  it('answers 400 for an unknown field or a value of the wrong type', async () => {
    for (const values of [
      { colour: 'red' },
      { kvp: 'eighty' },
      { grid: ['SIDEWAYS'] },
    ]) {
      const res = await physicist
        .patch(`/api/images/${free.id}/corrections`)
        .send({ values, reason: 'x' });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
    }
  });

  it('answers 403 for admin, committee on a signed study and another resident; 409 for a submitted study', async () => {
    const body = { values: { sidMm: 1500 }, reason: 'Measured with a tape.' };
    const { agent: admin } = await signedInAgent(t.app, 'admin');
    expect(
      (await admin.patch(`/api/images/${free.id}/corrections`).send(body))
        .status,
    ).toBe(403);
    const { agent: committee } = await signedInAgent(t.app, 'committee');
    expect(
      (
        await committee
          .patch(`/api/images/${signedImageId}/corrections`)
          .send(body)
      ).status,
    ).toBe(403);
    const { agent: resident } = await signedInAgent(t.app, 'resident');
    expect(
      (await resident.patch(`/api/images/${free.id}/corrections`).send(body))
        .status,
    ).toBe(403);
    const locked = await physicist
      .patch(`/api/images/${submittedImageId}/corrections`)
      .send(body);
    expect(locked.status).toBe(409);
    expect(locked.body.error.code).toBe('study_locked');
    expect(
      await browserAgent(t.app)
        .patch(`/api/images/${free.id}/corrections`)
        .send(body)
        .then((r) => r.status),
    ).toBe(401);
  });
});

describe('GET /api/images/:id/preview', () => {
  it('serves a greyscale PNG no larger than the size asked, with an immutable ETag and 304', async () => {
    const res = await physicist
      .get(`/api/images/${free.id}/preview?size=thumb`)
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('image/png');
    expect(res.headers['cache-control']).toBe(
      'private, max-age=31536000, immutable',
    );
    const png = res.body as Buffer;
    // PNG signature, ISO/IEC 15948 §5.2.
    expect([...png.subarray(0, 8)]).toEqual([
      0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a,
    ]);
    const meta = await sharp(png).metadata();
    expect(Math.max(meta.width, meta.height)).toBeLessThanOrEqual(256);
    expect(meta.width / meta.height).toBeCloseTo(600 / 400, 1);
    expect(meta.channels).toBe(1);

    const again = await physicist
      .get(`/api/images/${free.id}/preview?size=thumb`)
      .set('If-None-Match', res.headers.etag!);
    expect(again.status).toBe(304);
  });

  it('renders a requested window with its own ETag and shorter caching', async () => {
    const auto = await physicist
      .get(`/api/images/${free.id}/preview?size=view`)
      .buffer(true)
      .parse(binary);
    const windowed = await physicist
      .get(`/api/images/${free.id}/preview?size=view&wc=2000&ww=400`)
      .buffer(true)
      .parse(binary);
    expect(windowed.status).toBe(200);
    expect(windowed.headers.etag).not.toBe(auto.headers.etag);
    expect(windowed.headers['cache-control']).toBe('private, max-age=86400');
    expect((windowed.body as Buffer).equals(auto.body as Buffer)).toBe(false);
    const meta = await sharp(auto.body as Buffer).metadata();
    expect([meta.width, meta.height]).toEqual([600, 400]);
  });

  it('answers 400 for a window centre without a width', async () => {
    const res = await physicist.get(`/api/images/${free.id}/preview?wc=2000`);
    expect(res.status).toBe(400);
  });
});

describe('GET /api/images/:id/pixels', () => {
  it('returns the decoder’s values, little-endian, with their shape and type', async () => {
    const res = await physicist
      .get(`/api/images/${free.id}/pixels`)
      .buffer(true)
      .parse(binary);
    expect(res.headers).toMatchObject({
      'x-rows': '400',
      'x-columns': '600',
      'x-pixel-type': 'uint16',
    });
    const body = res.body as Buffer;
    expect(body.length).toBe(400 * 600 * 2);
    const served = new Uint16Array(
      body.buffer.slice(body.byteOffset, body.byteOffset + body.length),
    );
    const decoded = await decodeDicom(free.bytes);
    expect(served).toEqual(decoded.pixels);
  });

  it('decimates by taking every N-th row and column', async () => {
    const res = await physicist
      .get(`/api/images/${free.id}/pixels?decimate=7`)
      .buffer(true)
      .parse(binary);
    expect(res.headers).toMatchObject({ 'x-rows': '58', 'x-columns': '86' });
    const body = res.body as Buffer;
    const served = new Uint16Array(
      body.buffer.slice(body.byteOffset, body.byteOffset + body.length),
    );
    const decoded = (await decodeDicom(free.bytes)).pixels;
    for (const [y, x] of [
      [0, 0],
      [57, 85],
      [20, 33],
    ] as const) {
      expect(served[y * 86 + x]).toBe(decoded[y * 7 * 600 + x * 7]);
    }
  });
});

describe('POST /api/images/:id/region-stats', () => {
  it('equals regionStatistics on the decoded pixels, with an error in place of an empty region', async () => {
    const regions: Region[] = [
      { shape: 'circle', cx: 180, cy: 200, r: 40 },
      { shape: 'rect', x0: 400, y0: 50, w: 120, h: 80 },
      { shape: 'rect', x0: 5000, y0: 5000, w: 10, h: 10 },
    ];
    const res = await physicist
      .post(`/api/images/${free.id}/region-stats`)
      .send({ regions, percentiles: [5, 95] });
    expect(res.status).toBe(200);
    const decoded = await decodeDicom(free.bytes);
    for (const [i, region] of regions.slice(0, 2).entries()) {
      const expected = regionStatistics(decoded.pixels, 600, 400, region, {
        percentiles: [5, 95],
      });
      expect(res.body.data[i]).toEqual({
        region,
        stats: expected.stats,
        warnings: expected.warnings,
      });
    }
    expect(res.body.data[2].error.code).toBe('region_empty');
  });

  it('answers 400 for a malformed region', async () => {
    const res = await physicist
      .post(`/api/images/${free.id}/region-stats`)
      .send({ regions: [{ shape: 'circle', cx: 1, cy: 2 }] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
  });
});
