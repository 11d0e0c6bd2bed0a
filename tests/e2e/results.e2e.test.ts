import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AnalyzeJson } from '../../server/cli/analyze.command.ts';
import { fromRoot } from '../../server/config/paths.ts';
import { jobQueue, QUEUES, stopJobQueue } from '../../server/jobs/queue.ts';
import { settleDeferredEnqueues } from '../../server/jobs/recompute-study.job.ts';
import { startRecomputeWorkers } from '../../server/jobs/recompute-study.worker.ts';
import { createDiskImageStore } from '../../server/services/image-storage.service.ts';
import { runLamella } from '../helpers/dicom-cli.ts';
import { scratchDir } from '../helpers/dicom-files.ts';
import { TEST_PASSWORD } from '../helpers/factories.ts';
import {
  buildSyntheticStudy,
  DISC_LAYOUT,
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

const UPLOADS = 'test-output/e2e-results/uploads';
let server: E2eServer;
let browser: Browser;
let study: SyntheticStudy;
let email: string;

beforeAll(async () => {
  scratchDir('e2e-results');
  server = await startE2eServer({ uploadsDir: UPLOADS });
  browser = await launchBrowser();
  const physicist = await signedInApiAgent(server, 'physicist');
  const { agent } = physicist;
  email = physicist.email;
  await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
  study = await buildSyntheticStudy(
    agent,
    fromRoot('test-output/e2e-results/session'),
  );
  await agent
    .put(`/api/studies/${study.studyId}/layout`)
    .send({ layout: DISC_LAYOUT, referenceImageId: null })
    .expect(200);
  await settleDeferredEnqueues();
});

afterAll(async () => {
  await browser?.close();
  await stopJobQueue();
  await server?.close();
});

describe('study results in the browser', () => {
  it('shows the progress, then every figure as lamella analyze prints it for the same files and layout', async () => {
    const page = await newPage(browser);
    await signInAs(page, server.baseUrl, email, TEST_PASSWORD);
    await page.goto(`${server.baseUrl}/studies/${study.studyId}/results`);
    // No worker runs yet, so the queued conditions show as waiting.
    const progress = page.getByTestId('results-progress');
    await progress.waitFor();
    await expect(progress.textContent()).resolves.toMatch(
      /0 of 2 conditions finished, 2 waiting/,
    );
    await screenshot(page, 'study-results-progress');

    await startRecomputeWorkers(
      1,
      { store: createDiskImageStore(fromRoot(UPLOADS)) },
      { pollingIntervalSeconds: 0.5 },
    );
    await progress.waitFor({ state: 'detached', timeout: 60_000 });
    const run = runLamella([
      'analyze',
      study.folder,
      '--layout',
      study.layoutFile,
      '--json',
    ]);
    expect(run.status, run.stderr).toBe(0);
    const cli = JSON.parse(run.stdout) as AnalyzeJson;
    for (const condition of cli.conditions) {
      const figures = condition.analysis!.objects[0]!.figures;
      const card = page.getByTestId(`condition-${condition.key.kvp}-20`);
      await card.getByTestId('value-contrast_improvement_factor').waitFor();
      // The browser shows the stored figures to 4 significant digits.
      const shown = async (key: string) =>
        Number(await card.getByTestId(`value-${key}`).textContent());
      const cliValue = (v: number) => Number(v.toPrecision(4));
      expect(await shown('contrast_improvement_factor')).toBe(
        cliValue(figures.contrastImprovementFactor.value),
      );
      expect(await shown('snr_improvement_factor')).toBe(
        cliValue(figures.snrImprovementFactor!.value),
      );
      expect(await shown('bucky_factor')).toBe(
        cliValue(figures.buckyFactor!.value),
      );
      await expect(card.getByTestId('verdict').textContent()).resolves.toBe(
        figures.verdict!.sentence,
      );
    }
    const chart = page.getByTestId('chart-contrast_improvement_factor');
    await expect(
      chart.locator('.recharts-errorBar').count(),
    ).resolves.toBeGreaterThan(0);
    await expect(
      page
        .getByTestId('chart-snr_improvement_factor')
        .locator('.recharts-line')
        .count(),
    ).resolves.toBe(1);
    await screenshot(page, 'study-results');
    await page.context().close();
  });
});
