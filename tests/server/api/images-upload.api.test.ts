import path from 'node:path';
import {
  afterAll,
  afterEach,
  beforeAll,
  describe,
  expect,
  it,
  vi,
} from 'vitest';
import { fromRoot } from '../../../server/config/paths.ts';
import { Image } from '../../../server/models/image.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import type { StudyStatus } from '../../../shared/schemas/study.schema.ts';
import type { UploadResponseDto } from '../../../shared/schemas/image.schema.ts';
import {
  bytesOf,
  filesUnder,
  lossyJpegCopy,
  phantomDicom,
  scratchDir,
  writeFile,
  zipFolder,
} from '../../helpers/dicom-files.ts';
import { buildRoom, SMALL_PLAN } from '../../helpers/study-factories.ts';
import { studyPlanSchema } from '../../../shared/schemas/study.schema.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

const UPLOADS = 'test-output/images-upload-api/uploads';
const uploadsDir = fromRoot(UPLOADS);
const sources = scratchDir('images-upload-api/sources');
let t: TestApp;
beforeAll(async () => {
  scratchDir('images-upload-api/uploads');
  t = await startTestApp({ uploadsDir: UPLOADS });
});
afterAll(async () => {
  await t.close();
});
afterEach(() => {
  vi.restoreAllMocks();
});

const storedFiles = () => filesUnder(path.join(uploadsDir, 'images')).sort();
const tempFiles = () => filesUnder(path.join(uploadsDir, 'tmp'));

async function buildStudy(
  createdBy: number,
  status: StudyStatus = 'draft',
): Promise<Study> {
  const room = await buildRoom();
  return Study.create({
    roomId: room.id,
    detectorId: null,
    title: 'Grid check, Room 2',
    purpose: 'Upload test',
    status,
    plan: studyPlanSchema.parse(SMALL_PLAN),
    createdBy,
  });
}

describe('POST /api/images', () => {
  it('answers 401 without a session and 403 for admin and committee', async () => {
    const anonymous = await browserAgent(t.app).post('/api/images');
    expect(anonymous.status).toBe(401);
    expect(anonymous.body.error.code).toBe('unauthenticated');
    for (const role of ['admin', 'committee'] as const) {
      const { agent } = await signedInAgent(t.app, role);
      const res = await agent
        .post('/api/images')
        .attach('files', Buffer.from(phantomDicom()), 'a.dcm');
      expect(res.status).toBe(403);
      expect(res.body).toEqual({
        error: { code: 'forbidden', message: 'Your role does not allow this.' },
      });
    }
  });

  it('answers 400 when no file is sent', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    const res = await agent.post('/api/images').field('studyId', '');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
  });

  it('stores the good files of a mix and reports every file, keeping exactly the good ones', async () => {
    const { agent, user } = await signedInAgent(t.app, 'physicist');
    const good = phantomDicom({ seed: 31 });
    const flaggedLossy = phantomDicom({
      seed: 33,
      attributes: { LossyImageCompression: '01' },
    });
    const plain = writeFile(sources, 'plain.dcm', phantomDicom({ seed: 34 }));
    const jpeg = lossyJpegCopy(plain, path.join(sources, 'jpeg-12bit.dcm'));
    const filesBefore = storedFiles();

    const first = await agent
      .post('/api/images')
      .attach('files', Buffer.from(good), 'good.dcm')
      .attach('files', Buffer.from(good), 'good-again.dcm')
      .attach('files', Buffer.from(flaggedLossy), 'IM0003')
      .attach('files', bytesOf(jpeg), 'jpeg-12bit.dcm')
      .attach('files', Buffer.from(good.subarray(0, 700)), 'cut.dcm')
      .attach('files', Buffer.from('not an image\n'.repeat(30)), 'notes.txt');
    expect(first.status).toBe(200);
    const body = first.body.data as UploadResponseDto;
    expect(body.results.map((r) => [r.name, r.outcome, r.code])).toEqual([
      ['good.dcm', 'stored', undefined],
      ['good-again.dcm', 'duplicate', undefined],
      ['IM0003', 'stored', undefined],
      ['jpeg-12bit.dcm', 'stored', undefined],
      ['cut.dcm', 'rejected', 'truncated_dicom'],
      ['notes.txt', 'rejected', 'not_dicom'],
    ]);
    expect(body.counts).toEqual({
      stored: 3,
      duplicate: 1,
      rejected: 2,
      skipped: 0,
    });
    const [stored, again, lossy, jpegResult] = body.results;
    expect(again!.imageId).toBe(stored!.imageId);
    expect(lossy!.image!.warnings.map((w) => w.code)).toContain(
      'lossy_compression',
    );
    // dcmcjpeg +ee writes JPEG Extended (process 2 & 4), DICOM PS3.6 Annex A.
    expect(jpegResult!.image!.transferSyntaxUid).toBe('1.2.840.10008.1.2.4.51');
    expect(jpegResult!.image!.warnings.map((w) => w.code)).toContain(
      'lossy_compression',
    );
    for (const r of body.results.filter((x) => x.outcome === 'rejected')) {
      expect(r.message).toMatch(/\w+/);
    }

    const uidOfGood = stored!.image!.sopInstanceUid!;
    const second = await agent
      .post('/api/images')
      .attach(
        'files',
        Buffer.from(
          phantomDicom({ seed: 35, attributes: { SOPInstanceUID: uidOfGood } }),
        ),
        'same-uid.dcm',
      );
    expect(second.body.data.results).toEqual([
      expect.objectContaining({
        name: 'same-uid.dcm',
        outcome: 'duplicate',
        imageId: stored!.imageId,
      }),
    ]);

    const rows = await Image.findAll({ where: { uploadedBy: user.id } });
    expect(rows).toHaveLength(3);
    const newFiles = storedFiles().filter((f) => !filesBefore.includes(f));
    expect(newFiles.sort()).toEqual(
      rows.map((r) => r.storageKey.replace(/^images\//, '')).sort(),
    );
    expect(tempFiles()).toEqual([]);
  });

  it('takes a zip of an exported folder, member by member', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    const folder = path.join(sources, 'export');
    writeFile(folder, 'DICOMDIR', phantomDicom({ seed: 36 }));
    writeFile(folder, 'SERIES1/IM1', phantomDicom({ seed: 37 }));
    writeFile(folder, 'SERIES1/IM2', phantomDicom({ seed: 38 }));
    const zip = zipFolder(folder, path.join(sources, 'export.zip'));
    const res = await agent
      .post('/api/images')
      .attach('files', bytesOf(zip), 'export.zip');
    expect(res.status).toBe(200);
    expect(
      res.body.data.results.map((r: { name: string; outcome: string }) => [
        r.name,
        r.outcome,
      ]),
    ).toEqual([
      ['export.zip/DICOMDIR', 'skipped'],
      ['export.zip/SERIES1/IM1', 'stored'],
      ['export.zip/SERIES1/IM2', 'stored'],
    ]);
    expect(tempFiles()).toEqual([]);
  });

  it('never returns patient-identifying values and warns that the file carried them', async () => {
    const { agent } = await signedInAgent(t.app, 'physicist');
    const bytes = phantomDicom({
      seed: 39,
      attributes: {
        PatientName: 'Phantom^Saltmarsh',
        PatientID: 'SGH-PH-0042',
        PatientBirthDate: '19700101',
      },
    });
    const res = await agent
      .post('/api/images')
      .attach('files', Buffer.from(bytes), 'with-patient.dcm');
    const result = res.body.data.results[0];
    expect(result.outcome).toBe('stored');
    expect(
      result.image.warnings.map((w: { code: string }) => w.code),
    ).toContain('patient_identifiers_present');
    const detail = await agent.get(`/api/images/${result.imageId}`);
    for (const text of [
      JSON.stringify(res.body),
      JSON.stringify(detail.body),
    ]) {
      expect(text).not.toMatch(/Saltmarsh\^|Phantom\^|SGH-PH-0042|19700101/);
    }
    const row = await Image.findByPk(result.imageId);
    expect(JSON.stringify(row!.header)).not.toMatch(
      /SGH-PH-0042|Phantom\^Saltmarsh/,
    );
  });

  it('leaves no file and no row when the database insert fails, and keeps the other files', async () => {
    const { agent, user } = await signedInAgent(t.app, 'physicist');
    const filesBefore = storedFiles();
    vi.spyOn(Image, 'create').mockRejectedValueOnce(
      new Error('forced insert failure'),
    );
    vi.spyOn(console, 'error').mockImplementation(() => undefined);
    const res = await agent
      .post('/api/images')
      .attach('files', Buffer.from(phantomDicom({ seed: 40 })), 'fails.dcm')
      .attach('files', Buffer.from(phantomDicom({ seed: 41 })), 'ok.dcm');
    expect(res.status).toBe(200);
    expect(
      res.body.data.results.map((r: { outcome: string; code?: string }) => [
        r.outcome,
        r.code,
      ]),
    ).toEqual([
      ['rejected', 'internal_error'],
      ['stored', undefined],
    ]);
    expect(await Image.count({ where: { uploadedBy: user.id } })).toBe(1);
    expect(storedFiles().filter((f) => !filesBefore.includes(f))).toHaveLength(
      1,
    );
    expect(tempFiles()).toEqual([]);
  });
});

describe('upload limits', () => {
  let small: TestApp;
  beforeAll(async () => {
    small = await startTestApp({
      uploadsDir: UPLOADS,
      maxFileBytes: 4000,
      maxFilesPerRequest: 2,
    });
  });
  afterAll(async () => {
    await small.close();
  });

  it('answers 413 for a file over maxFileBytes and keeps nothing of the request', async () => {
    const { agent, user } = await signedInAgent(small.app, 'resident');
    const filesBefore = storedFiles();
    const res = await agent
      .post('/api/images')
      .attach(
        'files',
        Buffer.from(phantomDicom({ seed: 42, rows: 8, columns: 8 })),
        'tiny.dcm',
      )
      .attach('files', Buffer.from(phantomDicom({ seed: 43 })), 'big.dcm');
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
    expect(await Image.count({ where: { uploadedBy: user.id } })).toBe(0);
    expect(storedFiles()).toEqual(filesBefore);
    expect(tempFiles()).toEqual([]);
  });

  it('answers 413 for more files than maxFilesPerRequest', async () => {
    const { agent } = await signedInAgent(small.app, 'resident');
    let req = agent.post('/api/images');
    for (let i = 0; i < 3; i += 1) {
      req = req.attach(
        'files',
        Buffer.from(phantomDicom({ seed: 44 + i, rows: 8, columns: 8 })),
        `f${i}.dcm`,
      );
    }
    const res = await req;
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
    expect(tempFiles()).toEqual([]);
  });
});

describe('uploading into a study', () => {
  it('adds images to an open study and lists them', async () => {
    const { agent, user } = await signedInAgent(t.app, 'resident');
    const study = await buildStudy(user.id, 'returned');
    const res = await agent
      .post('/api/images')
      .field('studyId', String(study.id))
      .attach('files', Buffer.from(phantomDicom({ seed: 50 })), 'a.dcm');
    expect(res.body.data.results[0]).toMatchObject({
      outcome: 'stored',
      image: { studyId: study.id },
    });
    const list = await agent.get(`/api/images?studyId=${study.id}`);
    expect(list.status).toBe(200);
    expect(list.body.data.map((i: { id: number }) => i.id)).toEqual([
      res.body.data.results[0].imageId,
    ]);
  });

  it('answers 404 for a missing study, 403 for another resident’s study, 409 for a submitted one', async () => {
    const { agent, user } = await signedInAgent(t.app, 'resident');
    const { user: other } = await signedInAgent(t.app, 'resident');
    const send = (studyId: number) =>
      agent
        .post('/api/images')
        .field('studyId', String(studyId))
        .attach('files', Buffer.from(phantomDicom({ seed: 51 })), 'a.dcm');
    expect((await send(2_000_000_000)).status).toBe(404);
    const theirs = await send((await buildStudy(other.id)).id);
    expect(theirs.status).toBe(403);
    expect(theirs.body.error.code).toBe('forbidden');
    const submitted = await send((await buildStudy(user.id, 'submitted')).id);
    expect(submitted.status).toBe(409);
    expect(submitted.body.error.code).toBe('study_locked');
    expect(await Image.count({ where: { uploadedBy: user.id } })).toBe(0);
    expect(tempFiles()).toEqual([]);
  });
});
