import { execFileSync } from 'node:child_process';
import { mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Response } from 'supertest';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sequelize } from '../../../server/db/sequelize.ts';
import { CSV_COLUMNS } from '../../../server/services/report-csv.service.ts';
import { ROLES, type Role } from '../../../shared/permissions.ts';
import { phantomDicom, scratchDir } from '../../helpers/dicom-files.ts';
import { buildUser } from '../../helpers/factories.ts';
import {
  attachImage,
  buildStatedGrid,
  seedStudyWithResults,
  setStudyLayout,
  type SeededStudy,
} from '../../helpers/results-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

/**
 * The study PDF and CSV, and the committee PDF. The PDFs are read back with
 * Debian's poppler-utils (pdftotext, pdftoppm, pdffonts), which the test
 * set-up installs; a missing tool fails the test rather than skipping it.
 */

const UPLOADS = 'test-output/reports-api/uploads';
const OUT = 'test-output/reports-api';
const SIGNER_NAME = 'Dr Ada Quill';

let t: TestApp;
let signed: SeededStudy;
let draft: SeededStudy;
const agents = new Map<
  Role,
  Awaited<ReturnType<typeof signedInAgent>>['agent']
>();

function poppler(tool: string, args: string[]): string {
  try {
    return execFileSync(tool, args, { encoding: 'utf8' });
  } catch (error) {
    throw new Error(
      `${tool} failed; install Debian's poppler-utils (npm test does).`,
      { cause: error },
    );
  }
}

function save(name: string, bytes: Buffer): string {
  mkdirSync(OUT, { recursive: true });
  const file = path.join(OUT, name);
  writeFileSync(file, bytes);
  return file;
}

/** Collects a binary body into a Buffer. */
function binary(
  res: Response,
  done: (error: Error | null, body: Buffer) => void,
): void {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

beforeAll(async () => {
  scratchDir('reports-api/uploads');
  t = await startTestApp({ uploadsDir: UPLOADS });
  for (const role of ROLES)
    agents.set(role, (await signedInAgent(t.app, role)).agent);
  const physicist = await buildUser({ role: 'physicist' });
  await physicist.update({ displayName: SIGNER_NAME });
  const grid = await buildStatedGrid(null);
  signed = await seedStudyWithResults({
    grids: [grid],
    title: 'Wall stand acceptance',
    signedBy: physicist,
    signedAt: new Date('2026-09-14T09:30:00Z'),
    revision: 2,
    conditions: [
      {
        kvp: 70,
        phantomThicknessCm: 20,
        figures: {
          snr_improvement_factor: { value: 1.234, ciLow: 1.15, ciHigh: 1.318 },
          contrast_improvement_factor: {
            value: 2.468,
            ciLow: 2.3,
            ciHigh: 2.636,
          },
          bucky_factor: { value: 3.579, ciLow: 3.4, ciHigh: 3.758 },
          primary_transmission: { value: 0.6543, ciLow: 0.63, ciHigh: 0.68 },
          scatter_to_primary_ratio: { value: 2.5, ciLow: 2.2, ciHigh: 2.8 },
        },
        warnings: [
          {
            code: 'for_presentation',
            message: 'One image is processed for presentation.',
          },
        ],
      },
      {
        kvp: 90,
        phantomThicknessCm: 20,
        figures: {
          snr_improvement_factor: { value: 1.111, ciLow: 1.02, ciHigh: 1.2 },
          contrast_improvement_factor: {
            value: 2.222,
            ciLow: 2.1,
            ciHigh: 2.35,
          },
        },
      },
    ],
  });
  const rows = 96;
  const columns = 128;
  const imageIds: number[] = [];
  for (const [index, condition] of signed.conditions.entries()) {
    for (const arm of ['grid', 'no_grid'] as const) {
      imageIds.push(
        await attachImage({
          uploadsDir: UPLOADS,
          bytes: phantomDicom({ rows, columns, seed: 10 + index }),
          studyId: signed.study.id,
          conditionId: condition.id,
          arm,
          uploadedBy: physicist.id,
          rows,
          columns,
          spacingMm: 0.148,
        }),
      );
    }
  }
  await setStudyLayout({
    studyId: signed.study.id,
    ownerId: physicist.id,
    regions: [
      { name: 'disc', role: 'object', spec: 'circle:38.4,48,10' },
      { name: 'around', role: 'background', spec: 'ring:38.4,48,16,24' },
    ],
    offsets: [{ imageId: imageIds[1]!, dxPx: 4, dyPx: -2 }],
  });
  draft = await seedStudyWithResults({
    status: 'draft',
    conditions: [
      {
        kvp: 70,
        phantomThicknessCm: 20,
        figures: { snr_improvement_factor: { value: 1.5 } },
      },
    ],
  });
});

afterAll(async () => {
  await t.close();
  await sequelize.close();
});

describe('GET /api/studies/:id/report.pdf', () => {
  const url = () => `/api/studies/${signed.study.id}/report.pdf`;

  it('answers 401 without a session', async () => {
    const res = await browserAgent(t.app).get(url());
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('hides an unsigned study from the committee (404) and refuses its PDF to others (409)', async () => {
    const hidden = await agents
      .get('committee')!
      .get(`/api/studies/${draft.study.id}/report.pdf`);
    expect(hidden.status).toBe(404);
    expect(hidden.body.error.code).toBe('not_found');
    for (const role of ['physicist', 'resident', 'admin'] as const) {
      const res = await agents
        .get(role)!
        .get(`/api/studies/${draft.study.id}/report.pdf`);
      expect(res.status).toBe(409);
      expect(res.body.error.code).toBe('conflict');
    }
  });

  it('answers 404 for a study that does not exist', async () => {
    const res = await agents
      .get('physicist')!
      .get('/api/studies/999999999/report.pdf');
    expect(res.status).toBe(404);
  });

  it.each(ROLES)('gives the signed study’s PDF to the %s', async (role) => {
    const res = await agents.get(role)!.get(url()).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toMatch(
      /attachment; filename="?lamella-study-\d+-revision-2\.pdf"?/,
    );
    expect((res.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
  });

  it('holds the figures, signer, revision, method, cautions and page numbers (pdftotext)', async () => {
    const res = await agents
      .get('committee')!
      .get(url())
      .buffer(true)
      .parse(binary);
    const file = save('study-report.pdf', res.body as Buffer);
    const text = poppler('pdftotext', ['-layout', file, '-']);
    expect(text).toContain('Wall stand acceptance');
    for (const value of [
      '1.234',
      '1.15 to 1.318',
      '2.468',
      '3.579',
      '0.6543',
      '1.111',
    ]) {
      expect(text).toContain(value);
    }
    expect(text).toContain(`Signed by ${SIGNER_NAME} (physicist)`);
    expect(text).toContain('2026-09-14 09:30 UTC, revision 2');
    expect(text).toContain('The grid improves CNR at equal dose by 23 %');
    expect(text).toContain('CNR = Delta S/sigma_bg');
    expect(text).toContain('One image is processed for presentation.');
    expect(text).toContain('Phantom results are not patient dose');
    expect(text).toContain('field value');
    expect(text).toContain('stated value (IEC 60627)');
    expect(text).toContain('predicted from construction');
    expect(text).toMatch(/Page 1 of (\d+)/);
    const pages = Number(/Page 1 of (\d+)/.exec(text)![1]);
    expect(text).toContain(`Page ${pages} of ${pages}`);
  });

  it('renders every page as a non-blank image (pdftoppm, pixel SD by sharp)', async () => {
    const res = await agents
      .get('physicist')!
      .get(url())
      .buffer(true)
      .parse(binary);
    const file = save('study-report-pages.pdf', res.body as Buffer);
    const prefix = path.join(scratchDir('reports-api/pages'), 'page');
    poppler('pdftoppm', ['-png', '-r', '40', file, prefix]);
    const pngs = readdirSync(path.dirname(prefix)).filter((f) =>
      /^page-\d+\.png$/.test(f),
    );
    expect(pngs.length).toBeGreaterThanOrEqual(4);
    for (const png of pngs) {
      const stats = await sharp(path.join(path.dirname(prefix), png)).stats();
      // A blank page has SD 0; a page of text at 40 dpi well above 2.
      expect(stats.channels[0]!.stdev, png).toBeGreaterThan(2);
    }
  });

  it('embeds Lexend and no other font (pdffonts)', async () => {
    const res = await agents
      .get('resident')!
      .get(url())
      .buffer(true)
      .parse(binary);
    const file = save('study-report-fonts.pdf', res.body as Buffer);
    const lines = poppler('pdffonts', [file]).trim().split('\n').slice(2);
    expect(lines.length).toBeGreaterThanOrEqual(2);
    for (const line of lines) {
      expect(line).toMatch(/Lexend/);
      // Columns: name type encoding emb sub uni object ID.
      expect(line.split(/\s+/).slice(-5, -4)[0], line).toBe('yes');
    }
  });
});

describe('GET /api/studies/:id/results.csv', () => {
  it('answers 401 without a session and 404 to the committee for a draft', async () => {
    expect(
      (
        await browserAgent(t.app).get(
          `/api/studies/${signed.study.id}/results.csv`,
        )
      ).status,
    ).toBe(401);
    const res = await agents
      .get('committee')!
      .get(`/api/studies/${draft.study.id}/results.csv`);
    expect(res.status).toBe(404);
  });

  it('gives a draft’s results to a physicist, marked with its status', async () => {
    const res = await agents
      .get('physicist')!
      .get(`/api/studies/${draft.study.id}/results.csv`);
    expect(res.status).toBe(200);
    const rows = parse(res.text, { bom: true, columns: true }) as Array<
      Record<string, string>
    >;
    expect(rows).toHaveLength(1);
    expect(rows[0]!.study_status).toBe('draft');
  });

  it.each(ROLES)(
    'parses back to the stored numbers for the %s (csv-parse)',
    async (role) => {
      const res = await agents
        .get(role)!
        .get(`/api/studies/${signed.study.id}/results.csv`);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
      expect(res.text.charCodeAt(0)).toBe(0xfeff);
      const rows = parse(res.text, { bom: true, columns: true }) as Array<
        Record<string, string>
      >;
      expect(Object.keys(rows[0]!)).toEqual([...CSV_COLUMNS]);
      const measured = rows.filter((r) => r.value_kind === 'field value');
      expect(measured).toHaveLength(7);
      const sif70 = measured.find(
        (r) => r.kvp_kv === '70' && r.figure_key === 'snr_improvement_factor',
      )!;
      expect(Number(sif70.value)).toBe(1.234);
      expect(Number(sif70.ci95_low)).toBe(1.15);
      expect(Number(sif70.ci95_high)).toBe(1.318);
      expect(sif70.unit).toBe('1');
      expect(sif70.cnr_definition).toBe('CNR = ΔS/σ_bg (background SD)');
      expect(sif70.signed_by).toBe(SIGNER_NAME);
      const tp = measured.find((r) => r.figure_key === 'primary_transmission')!;
      expect(Number(tp.value)).toBe(0.6543);
      // The stated grid has a full construction, so Tp is also predicted.
      expect(
        rows.some(
          (r) =>
            r.value_kind === 'predicted from construction' &&
            r.figure_key === 'primary_transmission',
        ),
      ).toBe(true);
    },
  );
});

describe('GET /api/compare.pdf', () => {
  it('answers 401 without a session, 403 for unsigned studies to the committee', async () => {
    expect((await browserAgent(t.app).get('/api/compare.pdf')).status).toBe(
      401,
    );
    const res = await agents
      .get('committee')!
      .get('/api/compare.pdf?drafts=true');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
  });

  it.each(ROLES)('gives the %s a PDF of the signed selection', async (role) => {
    const res = await agents
      .get(role)!
      .get(`/api/compare.pdf?rooms=${signed.room.id}`)
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect((res.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
  });

  it('prints the selection, verdicts and conditions for the committee (pdftotext)', async () => {
    const res = await agents
      .get('committee')!
      .get(`/api/compare.pdf?rooms=${signed.room.id}&kvMin=60&kvMax=100`)
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    const file = save('board-report.pdf', res.body as Buffer);
    const text = poppler('pdftotext', ['-layout', file, '-']);
    expect(text).toContain('Comparison of grid conditions');
    expect(text).toContain(`rooms: ${signed.room.name}`);
    expect(text).toContain('tube voltage 60–100 kV');
    expect(text).toContain(
      'Of 2 conditions, the grid improves CNR at equal dose in 2',
    );
    expect(text).toContain('1.234 [1.15 to 1.318]');
    expect(text).toContain('Wall stand acceptance');
    expect(text).not.toContain('DRAFT');
    expect(text).toMatch(/Page 1 of \d+/);
  });

  it('marks a physicist’s selection with unsigned studies as DRAFT', async () => {
    const res = await agents
      .get('physicist')!
      .get(`/api/compare.pdf?rooms=${draft.room.id}&drafts=true`)
      .buffer(true)
      .parse(binary);
    expect(res.status).toBe(200);
    const text = poppler('pdftotext', [
      '-layout',
      save('board-draft.pdf', res.body as Buffer),
      '-',
    ]);
    expect(text).toContain('DRAFT: this selection includes unsigned studies');
  });
});
