import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fromRoot } from '../../server/config/paths.ts';
import { jobQueue, QUEUES, stopJobQueue } from '../../server/jobs/queue.ts';
import { startRecomputeWorkers } from '../../server/jobs/recompute-study.worker.ts';
import { createDiskImageStore } from '../../server/services/image-storage.service.ts';
import { scratchDir } from '../helpers/dicom-files.ts';
import { TEST_PASSWORD } from '../helpers/factories.ts';
import {
  buildSyntheticStudy,
  DISC,
  imageIdOf,
  type SyntheticStudy,
} from '../server/jobs/synthetic-study.ts';
import {
  launchBrowser,
  newPage,
  screenshot,
  signInAs,
} from './helpers/browser.ts';
import {
  signedInApiAgent,
  startE2eServer,
  type E2eServer,
} from './helpers/e2e-server.ts';

const UPLOADS = 'test-output/e2e-regions/uploads';
/** Size of the synthetic images and the canvas height the editor uses. */
const IMAGE = { columns: 200, rows: 160 };
const CANVAS_HEIGHT = 560;

let server: E2eServer;
let browser: Browser;
let study: SyntheticStudy;
let email: string;

/** Screen position of an image point on the fitted canvas. */
async function at(
  page: Page,
  x: number,
  y: number,
): Promise<{ x: number; y: number }> {
  const box = (await page.getByTestId('region-canvas').boundingBox())!;
  const zoom = Math.min(box.width / IMAGE.columns, CANVAS_HEIGHT / IMAGE.rows);
  const ox = (box.width - IMAGE.columns * zoom) / 2;
  const oy = (CANVAS_HEIGHT - IMAGE.rows * zoom) / 2;
  return { x: box.x + ox + x * zoom, y: box.y + oy + y * zoom };
}

async function dragOnImage(
  page: Page,
  from: [number, number],
  to: [number, number],
) {
  const a = await at(page, ...from);
  const b = await at(page, ...to);
  await page.mouse.move(a.x, a.y);
  await page.mouse.down();
  await page.mouse.move(b.x, b.y, { steps: 8 });
  await page.mouse.up();
}

const meanIn = (text: string | null): number =>
  Number(/mean ([-\d.]+)/.exec(text ?? '')?.[1]);

beforeAll(async () => {
  scratchDir('e2e-regions');
  server = await startE2eServer({ uploadsDir: UPLOADS });
  browser = await launchBrowser();
  const physicist = await signedInApiAgent(server, 'physicist');
  const { agent } = physicist;
  email = physicist.email;
  await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
  study = await buildSyntheticStudy(
    agent,
    fromRoot('test-output/e2e-regions/session'),
  );
  await startRecomputeWorkers(
    1,
    { store: createDiskImageStore(fromRoot(UPLOADS)) },
    { pollingIntervalSeconds: 0.5 },
  );
});

afterAll(async () => {
  await browser?.close();
  await stopJobQueue();
  await server?.close();
});

describe('the region editor in the browser', () => {
  it('draws regions with live statistics, saves and applies the layout, and shows the results', async () => {
    const page = await newPage(browser);
    await signInAs(page, server.baseUrl, email, TEST_PASSWORD);
    await page.goto(`${server.baseUrl}/studies/${study.studyId}`);
    await page.getByRole('link', { name: 'Regions' }).click();
    await page.getByRole('link', { name: '70kV-grid-1.dcm' }).click();
    await page.getByTestId('region-canvas').waitFor();
    expect(page.url()).toContain(
      `/regions/${imageIdOf(study, '70kV-grid-1.dcm')}`,
    );

    const centre = await at(page, DISC.cx + 0.5, DISC.cy + 0.5);
    await page.mouse.move(centre.x, centre.y);
    await expect
      .poll(() => page.getByTestId('cursor-readout').textContent())
      .toMatch(/^x 100, y 80: \d+/);

    await page.getByRole('radio', { name: 'Circle' }).click();
    await dragOnImage(page, [DISC.cx, DISC.cy], [DISC.cx + 14, DISC.cy]);
    await page.getByRole('radio', { name: 'Ring' }).click();
    await dragOnImage(page, [DISC.cx, DISC.cy], [DISC.cx + 50, DISC.cy]);
    const objectStats = page.getByTestId('stats-object 1');
    await expect.poll(() => objectStats.textContent()).toMatch(/n \d+ · mean/);
    await expect
      .poll(() => page.getByTestId('figures-object 1').textContent())
      .toMatch(/contrast \d/);
    await screenshot(page, 'region-editor-drawn');

    // Drag the circle off the disc: its statistics follow while the button is down.
    const before = meanIn(await objectStats.textContent());
    await page.getByRole('radio', { name: 'Select' }).click();
    await page.mouse.move(centre.x, centre.y);
    await page.mouse.down();
    const away = await at(page, 30, 30);
    await page.mouse.move(away.x, away.y, { steps: 6 });
    await expect
      .poll(async () => meanIn(await objectStats.textContent()))
      .toBeGreaterThan(before);
    await screenshot(page, 'region-editor-dragging');
    await page.mouse.move(centre.x, centre.y, { steps: 6 });
    await page.mouse.up();
    await expect
      .poll(async () => meanIn(await objectStats.textContent()))
      .toBeLessThan(before * 1.01);

    await page.getByLabel('Width').fill('4000');
    await page
      .getByLabel('Layout name')
      .fill('Disc phantom (drawn in the browser)');
    await page
      .getByRole('button', { name: "Save as the study's layout" })
      .click();
    await page.getByText("Saved as the study's layout.").waitFor();

    await page.getByRole('button', { name: 'Find objects' }).click();
    await page.getByText(/Proposed 1 object/).waitFor();
    await expect(
      page.getByTestId('region-row-object 1 (2)').count(),
    ).resolves.toBe(1);
    await page
      .getByTestId('region-row-object 1 (2)')
      .getByRole('button', { name: 'Remove' })
      .click();
    await page
      .getByTestId('region-row-background 1 (2)')
      .getByRole('button', { name: 'Remove' })
      .click();

    await page
      .getByRole('button', { name: 'Apply to every image of the study' })
      .click();
    const applied = page.getByTestId('apply-result');
    await applied.waitFor();
    await expect(applied.getByRole('row').count()).resolves.toBe(9);
    await screenshot(page, 'region-editor-applied');

    await page.getByRole('link', { name: 'Results' }).click();
    const card = page.getByTestId('condition-70-20');
    await card
      .getByTestId('value-contrast_improvement_factor')
      .waitFor({ timeout: 60_000 });
    await card.getByTestId('value-snr_improvement_factor').waitFor();
    await expect(card.getByTestId('verdict').textContent()).resolves.toMatch(
      /SIF \d/,
    );
    await page.getByTestId('chart-contrast_improvement_factor').waitFor();
    await page.getByTestId('chart-snr_improvement_factor').waitFor();
    await screenshot(page, 'study-results-after-editing');
    await page.context().close();
  });
});
