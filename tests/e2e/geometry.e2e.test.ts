import { statSync } from 'node:fs';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  launchBrowser,
  newPage,
  screenshot,
  signIn,
} from './helpers/browser.ts';
import { startE2eServer, type E2eServer } from './helpers/e2e-server.ts';
import {
  buildGrid,
  buildRoom,
  SMALL_PLAN,
} from '../helpers/study-factories.ts';

let server: E2eServer;
let browser: Browser;
beforeAll(async () => {
  server = await startE2eServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe('the geometry page in the browser', () => {
  it('plans r 10, f0 100 at 80 cm over 40 cm: edge loss 0.50 and the out-of-range warning', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'resident');
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Geometry' })
      .click();
    await page.waitForURL(`${server.baseUrl}/geometry`);
    const planner = page.getByRole('form', { name: 'Geometry planner' });
    await planner.getByLabel('Grid ratio').fill('10');
    await planner.getByLabel('Focusing distance f0 (cm)').fill('100');
    await planner.getByLabel('SID (cm)').fill('80');
    await planner.getByLabel('Field width (cm)').fill('40');
    await planner.getByRole('button', { name: 'Plan' }).click();

    // PHYSICS.md §5 check values (derived): r 10, f0 100, f1 80, c 20 → 0.50.
    await expect(
      page.getByTestId('edge-loss').textContent(),
    ).resolves.toContain('0.50');
    // PHYSICS.md §5 check values: limits at c = 20 cm, r 10 → 83.3–125.0 cm.
    await expect(
      page.getByTestId('focusing-range').textContent(),
    ).resolves.toBe('83.3 cm – 125.0 cm');
    await expect(page.getByTestId('within-range').textContent()).resolves.toBe(
      'No',
    );
    const warning = page
      .getByTestId('plan-warnings')
      .locator('[data-code="outside_focusing_range"]');
    await expect(warning.textContent()).resolves.toContain(
      'outside the focusing range 83.3–125.0 cm',
    );
    await page
      .getByTestId('loss-profile-chart')
      .locator('path.recharts-line-curve')
      .first()
      .waitFor();
    const file = await screenshot(page, 'geometry-planner');
    expect(statSync(file).size).toBeGreaterThan(10_000);
    await page.context().close();
  });

  it('shows a bad value next to its field', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'committee');
    await page.goto(`${server.baseUrl}/geometry`);
    const planner = page.getByRole('form', { name: 'Geometry planner' });
    await planner.getByLabel('Grid ratio').fill('-3');
    await planner.getByLabel('Focusing distance f0 (cm)').fill('100');
    await planner.getByLabel('SID (cm)').fill('100');
    await planner.getByLabel('Field width (cm)').fill('40');
    await planner.getByRole('button', { name: 'Plan' }).click();
    await planner.getByText('Grid ratio must be positive.').waitFor();
    await page.context().close();
  });

  it('predicts Tp 0.7061 for N 40, t 36 µm, r 12, aluminium at 60 keV', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'physicist');
    await page.goto(`${server.baseUrl}/geometry`);
    const form = page.getByRole('form', { name: 'Predicted transmission' });
    await form.getByLabel('Beam', { exact: true }).selectOption('energy');
    await form.getByLabel('Energy (keV)').fill('60');
    await form.getByRole('button', { name: 'Predict' }).click();
    // PHYSICS.md §6 check values (derived, μ from xraylib): Tp 0.7061.
    await expect(
      page.getByTestId('predicted-primaryTransmission').textContent(),
    ).resolves.toBe('0.7061');
    await page
      .getByTestId('predicted-figures')
      .getByText('scatter-to-primary ratio of 4 without the grid (assumed')
      .waitFor();
    await screenshot(page, 'geometry-predicted-transmission');
    await page.context().close();
  });

  it('shows the geometry warning on a study planned outside the focusing range', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'physicist');
    const room = await buildRoom();
    // The factory's grid: r 12 focused at 115 cm.
    const grid = await buildGrid(12, room.id);
    const created = await page.request.post(`${server.baseUrl}/api/studies`, {
      headers: { Origin: server.baseUrl },
      data: {
        title: 'Bedside at 80 cm',
        purpose: 'A 115 cm grid on a bedside unit.',
        roomId: room.id,
        detectorId: null,
        gridIds: [grid.id],
        plan: {
          ...SMALL_PLAN,
          geometry: { sidCm: 80, fieldWidthCm: 40, fieldHeightCm: 30 },
        },
      },
    });
    expect(created.status()).toBe(201);
    const { data } = (await created.json()) as { data: { id: number } };
    await page.goto(`${server.baseUrl}/studies/${data.id}`);
    const warnings = page.getByTestId('study-geometry-warnings');
    // PHYSICS.md §5 formula, r 12 f0 115 at c = 20 cm:
    // 1/(1/115 ± 0.4/240) → 96.5–142.3 cm.
    await expect(warnings.textContent()).resolves.toContain(
      'the planned SID is 80 cm, outside its focusing range 96.5–142.3 cm',
    );
    await screenshot(page, 'study-geometry-warning');
    await page.context().close();
  });

  it('sets predicted figures beside the results of a study', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'physicist');
    const room = await buildRoom();
    const grid = await buildGrid(12, room.id);
    // N 40, t 36 µm, r 12 with an aluminium interspace: PHYSICS.md §6.
    await grid.update({
      stripThicknessUm: 36,
      interspaceMaterial: 'aluminium',
    });
    const created = await page.request.post(`${server.baseUrl}/api/studies`, {
      headers: { Origin: server.baseUrl },
      data: {
        title: 'Predicted beside measured',
        purpose: 'What the 12:1 grid should do at 70 and 81 kV.',
        roomId: room.id,
        detectorId: null,
        gridIds: [grid.id],
        plan: SMALL_PLAN,
      },
    });
    expect(created.status()).toBe(201);
    const { data } = (await created.json()) as { data: { id: number } };
    await page.goto(`${server.baseUrl}/studies/${data.id}/results`);
    const section = page.getByRole('region', { name: 'Predicted figures' });
    const panels = section.getByTestId('predicted-figures');
    await panels.first().waitFor();
    expect(await panels.count()).toBe(2);
    await expect(panels.first().textContent()).resolves.toContain(
      'hardened by 20 cm PMMA',
    );
    await section.getByLabel('Scatter-to-primary ratio (assumed)').fill('2');
    await section
      .getByText('scatter-to-primary ratio of 2 without the grid')
      .first()
      .waitFor();
    await screenshot(page, 'study-results-predicted');
    await page.context().close();
  });
});
