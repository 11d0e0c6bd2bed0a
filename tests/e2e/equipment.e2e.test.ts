import { randomUUID } from 'node:crypto';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Detector } from '../../server/models/detector.model.ts';
import { Room } from '../../server/models/room.model.ts';
import {
  launchBrowser,
  newPage,
  SCREENSHOT_DIR,
  screenshot,
  signIn,
} from './helpers/browser.ts';
import { startE2eServer, type E2eServer } from './helpers/e2e-server.ts';

let server: E2eServer;
let browser: Browser;
let room: Room;
let detector: Detector;
beforeAll(async () => {
  server = await startE2eServer();
  browser = await launchBrowser();
  room = await Room.create({
    name: `Browser room ${randomUUID().slice(0, 8)}`,
    site: 'Saltmarsh General Hospital',
    modalityNotes: 'General radiography, wall stand and table.',
  });
  detector = await Detector.create({
    roomId: room.id,
    name: 'Browser panel',
    model: 'Saltmarsh DR-43 flat panel',
    detectorType: 'flat_panel_indirect',
    pixelPitchUm: 139,
    serial: null,
  });
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/**
 * The test database holds what every suite has made, so long lists are
 * captured as the visible part of the page rather than the whole page.
 */
const viewportShot = (page: Page, name: string) =>
  page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`) });

describe('equipment register in the browser', () => {
  it('lets a physicist add a grid by entering h and D, with r derived as they type', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'physicist');
    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Equipment' })
      .click();
    await page.getByRole('link', { name: 'Grid inventory' }).click();
    await page.getByRole('button', { name: 'Add a grid' }).click();

    const label = `Browser grid ${randomUUID().slice(0, 8)}`;
    const form = page.getByRole('form', { name: 'Add a grid' });
    await form.getByLabel('Label').fill(label);
    await form.getByLabel('Room').selectOption({ label: room.name });
    await form.getByLabel('Strip height h (µm)').fill('2000');
    await form.getByLabel('Interspace width D (µm)').fill('250');
    // PHYSICS.md §1 worked example: h 2 mm, D 0.25 mm → r 8.
    await expect(
      form.getByTestId('derived-ratio').textContent(),
    ).resolves.toContain('= 8');
    await form.getByLabel('Grid ratio r (h/D)').fill('10');
    await form
      .getByText(/Inconsistent construction/)
      .first()
      .waitFor();
    expect(
      await form.getByRole('button', { name: 'Add grid' }).isDisabled(),
    ).toBe(true);
    await form.getByLabel('Grid ratio r (h/D)').fill('');
    await form.getByLabel('Focusing distance f0 (cm)').fill('100');
    await form.screenshot({
      path: path.join(SCREENSHOT_DIR, 'equipment-grid-form.png'),
    });

    await form.getByRole('button', { name: 'Add grid' }).click();
    await page.getByText(`${label} was added.`).waitFor();
    const row = page.getByTestId(`grid-row-${label}`);
    await expect(row.getByRole('cell').nth(2).textContent()).resolves.toBe(
      '8:1derived',
    );
    await viewportShot(page, 'equipment-grid-inventory');

    await row.getByRole('link', { name: label }).click();
    await page.getByRole('heading', { name: label }).waitFor();
    await page.getByRole('button', { name: 'Change grid' }).waitFor();
    await screenshot(page, 'equipment-grid');
    await page.context().close();
  });

  it('lets a physicist record a detector calibration, choosing among the three fits', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'physicist');
    await page.goto(`${server.baseUrl}/equipment/detectors/${detector.id}`);
    await page
      .getByText('This detector has no calibration record yet.')
      .waitFor();
    await page.getByRole('button', { name: 'Record a calibration' }).click();
    const form = page.getByRole('form', { name: 'Record a calibration' });
    await form.getByLabel('Calibration date').fill('2026-11-30');
    await form
      .getByLabel('Beam quality')
      .fill('RQA5, air kerma at the detector plane');
    // Built on PV = 100 + 400·K exactly, so the linear fit has R² = 1.
    const kermas = [0.5, 1, 2, 5, 10];
    for (const [i, k] of kermas.entries()) {
      await form
        .getByLabel(`Air kerma of point ${i + 1} (µGy)`)
        .fill(String(k));
      await form
        .getByLabel(`Mean pixel value of point ${i + 1}`)
        .fill(String(100 + 400 * k));
    }
    await form.getByTestId('fit-power').waitFor();
    await expect(
      form.getByTestId('fit-linear').textContent(),
    ).resolves.toContain('1.000000');
    await form.getByLabel('Use the linear model').check();
    await form
      .getByTestId('calibration-chart')
      .locator('svg')
      .first()
      .waitFor();
    await screenshot(page, 'equipment-calibration-form');
    await form.getByRole('button', { name: 'Record calibration' }).click();

    const record = page.getByTestId('calibration-record');
    await record.waitFor();
    await expect(
      record.getByTestId('calibration-r-squared').textContent(),
    ).resolves.toBe('1.000000');
    await expect(record.textContent()).resolves.toContain('PV = 100 + 400·K');
    await screenshot(page, 'equipment-detector');
    await page.context().close();
  });

  it('shows a resident the register without any edit control', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'resident');
    await page.goto(`${server.baseUrl}/equipment`);
    await page.getByTestId(`room-card-${room.name}`).waitFor();
    await page.getByText('you can read it').waitFor();
    expect(await page.getByRole('button', { name: 'Add a room' }).count()).toBe(
      0,
    );
    await viewportShot(page, 'equipment-overview-resident');

    await page
      .getByTestId(`room-card-${room.name}`)
      .getByRole('link', { name: room.name })
      .click();
    await page.getByRole('heading', { name: room.name, level: 1 }).waitFor();
    await page.getByRole('link', { name: 'Browser panel' }).waitFor();
    for (const name of [
      'Change room',
      'Delete room',
      'Add unit',
      'Add detector',
    ]) {
      expect(await page.getByRole('button', { name }).count()).toBe(0);
    }
    await screenshot(page, 'equipment-room-resident');

    await page.goto(`${server.baseUrl}/equipment/grids`);
    await page.getByRole('table', { name: 'Grid inventory' }).waitFor();
    expect(await page.getByRole('button', { name: 'Add a grid' }).count()).toBe(
      0,
    );
    await page.goto(`${server.baseUrl}/equipment/detectors/${detector.id}`);
    await page.getByRole('heading', { name: 'Calibration records' }).waitFor();
    for (const name of [
      'Record a calibration',
      'Change detector',
      'Delete record',
    ]) {
      expect(await page.getByRole('button', { name }).count()).toBe(0);
    }
    await page.context().close();
  });
});
