import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Browser, Download, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Room } from '../../server/models/room.model.ts';
import { phantomDicom, scratchDir } from '../helpers/dicom-files.ts';
import { buildUser } from '../helpers/factories.ts';
import {
  attachImage,
  buildStatedGrid,
  seedStudyWithResults,
  setStudyLayout,
} from '../helpers/results-factories.ts';
import {
  launchBrowser,
  newPage,
  SCREENSHOT_DIR,
  screenshot,
  signIn,
} from './helpers/browser.ts';
import { startE2eServer, type E2eServer } from './helpers/e2e-server.ts';

/**
 * The comparison board in Chromium against a real server: a committee
 * member filters, reads the charts and downloads the CSV and PDF (their
 * bytes checked: csv-parse, and Debian's pdftotext); a physicist sets a
 * baseline that flags a later study, and follows the room's trend.
 */

const UPLOADS = 'test-output/compare-e2e/uploads';

let server: E2eServer;
let browser: Browser;
let room: Room;
let titles: { early: string; late: string };

const sif = (value: number, half = 0.06) => ({
  value,
  se: half / 2,
  ciLow: value - half,
  ciHigh: value + half,
});

beforeAll(async () => {
  scratchDir('compare-e2e/uploads');
  server = await startE2eServer({ uploadsDir: UPLOADS });
  browser = await launchBrowser();
  const tag = Math.random().toString(36).slice(2, 8);
  const { buildRoom } = await import('../helpers/study-factories.ts');
  room = await buildRoom(`Browser compare room ${tag}`);
  const grid = await buildStatedGrid(room.id);
  titles = { early: `Acceptance ${tag}`, late: `Routine ${tag}` };
  const physicist = await buildUser({ role: 'physicist' });
  const early = await seedStudyWithResults({
    room,
    grids: [grid],
    title: titles.early,
    signedBy: physicist,
    signedAt: new Date('2026-03-10T10:00:00Z'),
    conditions: [60, 81, 100].map((kvp, i) => ({
      kvp,
      phantomThicknessCm: 20,
      figures: {
        snr_improvement_factor: sif(1.1 + i * 0.1),
        contrast_improvement_factor: sif(1.8 + i * 0.3, 0.1),
        bucky_factor: sif(3 + i * 0.4, 0.2),
        primary_transmission: sif(0.62 + i * 0.02, 0.02),
      },
    })),
  });
  await seedStudyWithResults({
    room,
    grids: [grid],
    title: titles.late,
    signedAt: new Date('2026-09-10T10:00:00Z'),
    conditions: [60, 81, 100].map((kvp, i) => ({
      kvp,
      phantomThicknessCm: 20,
      // The 81 kV SIF drops from 1.2 to 1.0: outside ±10 %.
      figures: {
        snr_improvement_factor: sif(kvp === 81 ? 1.0 : 1.12 + i * 0.1),
        contrast_improvement_factor: sif(1.85 + i * 0.3, 0.1),
        bucky_factor: sif(3.1 + i * 0.4, 0.2),
      },
    })),
  });
  const ids: number[] = [];
  for (const arm of ['grid', 'no_grid'] as const) {
    ids.push(
      await attachImage({
        uploadsDir: UPLOADS,
        bytes: phantomDicom({ rows: 96, columns: 128, seed: 3 }),
        studyId: early.study.id,
        conditionId: early.conditions[1]!.id,
        arm,
        uploadedBy: physicist.id,
        rows: 96,
        columns: 128,
      }),
    );
  }
  await setStudyLayout({
    studyId: early.study.id,
    ownerId: physicist.id,
    regions: [
      { name: 'disc', role: 'object', spec: 'circle:38.4,48,10' },
      { name: 'around', role: 'background', spec: 'ring:38.4,48,16,24' },
    ],
  });
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

async function download(page: Page, name: string): Promise<Buffer> {
  const [file] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('link', { name }).click(),
  ]);
  const saved = await (file as Download).path();
  return readFileSync(saved);
}

async function openBoard(page: Page) {
  await page
    .getByRole('navigation', { name: 'Main' })
    .getByRole('link', { name: 'Compare' })
    .click();
  const filters = page.getByRole('form', { name: 'Filters' });
  await filters.getByRole('checkbox', { name: room.name }).check();
  await filters.getByLabel('Lowest kV').fill('55');
  await filters.getByLabel('Highest kV').fill('105');
  await filters.getByRole('button', { name: 'Show' }).click();
  await page.waitForURL(/rooms=\d+/);
  await page.getByTestId('compare-board').waitFor();
  await page.getByText('Of 6 conditions').waitFor();
}

describe('comparison board in the browser', () => {
  it('lets a committee member filter, read the charts and download CSV and PDF', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'committee');
    await openBoard(page);

    const chart = page.getByTestId('board-chart-sif-vs-kv');
    // recharts draws each series as a path and each point's error bar.
    await chart.locator('path.recharts-curve').first().waitFor();
    expect(
      await chart.locator('.recharts-errorBar').count(),
    ).toBeGreaterThanOrEqual(3);
    await expect(
      page.getByTestId('verdict-sentence').textContent(),
    ).resolves.toMatch(/the grid improves CNR at equal dose in 5/);
    await expect(
      page.getByTestId('conditions-table').textContent(),
    ).resolves.toContain(titles.late);
    expect(
      await page.getByRole('button', { name: /Set .* as baseline/ }).count(),
    ).toBe(0);
    await page
      .getByText('stated value (IEC 60627)', { exact: false })
      .first()
      .waitFor();
    await screenshot(page, 'compare-board-committee');

    const csv = await download(page, 'Download CSV');
    // UTF-8 byte-order mark (EF BB BF), then the header.
    expect([...csv.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const rows = parse(csv.toString('utf8'), {
      bom: true,
      columns: true,
    }) as Array<Record<string, string>>;
    const late81 = rows.find(
      (r) =>
        r.study_title === titles.late &&
        r.kvp_kv === '81' &&
        r.figure_key === 'snr_improvement_factor' &&
        r.value_kind === 'field value',
    )!;
    expect(Number(late81.value)).toBe(1);
    expect(Number(late81.ci95_low)).toBe(0.94);
    expect(Number(late81.ci95_high)).toBe(1.06);

    const pdf = await download(page, 'Download PDF report');
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    const file = path.join(scratchDir('compare-e2e/pdf'), 'board.pdf');
    writeFileSync(file, pdf);
    const text = execFileSync('pdftotext', ['-layout', file, '-'], {
      encoding: 'utf8',
    });
    expect(text).toContain('Comparison of grid conditions');
    expect(text).toContain(`rooms: ${room.name}`);
    expect(text).toContain(titles.early);
  });

  it('lets a physicist set a baseline that flags the later study, then follow the trend', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'physicist');
    await openBoard(page);
    const rowButtons = page.getByRole('button', {
      name: /^Set 81 kV \(none\) · 20 cm PMMA · /,
    });
    // Newest first: the later study's row comes before the early one.
    await rowButtons.last().click();
    await page.getByRole('button', { name: 'Save baseline' }).click();
    await page.getByTestId('baseline-flag').first().waitFor();
    await expect(
      page.getByTestId('baseline-flag').first().textContent(),
    ).resolves.toContain('snr improvement factor 1 vs 1.2 ±10 %');
    await screenshot(page, 'compare-board-baseline-flag');

    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Rooms' })
      .click();
    const summary = page.getByTestId('room-summary');
    const row = summary.getByRole('row', { name: new RegExp(room.name) });
    await row.getByText('Outside tolerance').waitFor();
    // The test database holds every suite's rooms: keep to the viewport.
    await page.screenshot({
      path: path.join(SCREENSHOT_DIR, 'rooms-summary.png'),
    });
    await row.getByRole('link', { name: 'Trend' }).click();
    await page
      .getByRole('heading', { name: `${room.name}: figures over time` })
      .waitFor();
    const trend = page.getByTestId('trend-snr_improvement_factor').first();
    await trend.locator('.recharts-reference-area-rect').waitFor();
    expect(await trend.locator('circle[data-outside="true"]').count()).toBe(1);
    await page.getByTestId('baseline-card').first().waitFor();
    await screenshot(page, 'room-trend');
  });
});
