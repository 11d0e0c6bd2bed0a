import { statSync } from 'node:fs';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Image } from '../../server/models/image.model.ts';
import { phantomDicom, scratchDir, writeFile } from '../helpers/dicom-files.ts';
import {
  launchBrowser,
  newPage,
  screenshot,
  signIn,
} from './helpers/browser.ts';
import { startE2eServer, type E2eServer } from './helpers/e2e-server.ts';

let server: E2eServer;
let browser: Browser;
beforeAll(async () => {
  scratchDir('upload-e2e/uploads');
  server = await startE2eServer({
    uploadsDir: 'test-output/upload-e2e/uploads',
  });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

const rowOf = (name: string) => `[data-testid="upload-row-${name}"]`;

describe('uploading images in the browser', () => {
  it('lets a resident upload three files, one broken, see each outcome, and retry a failed one alone', async () => {
    const dir = scratchDir('upload-e2e/sources');
    const files = [
      writeFile(
        dir,
        'IM0001.dcm',
        phantomDicom({ seed: 71, rows: 300, columns: 400 }),
      ),
      writeFile(
        dir,
        'IM0002',
        phantomDicom({ seed: 72, rows: 300, columns: 400 }),
      ),
      writeFile(dir, 'IM0003.dcm', 'This export was cut short.\n'.repeat(40)),
    ];
    const page = await newPage(browser);
    const user = await signIn(page, server.baseUrl, 'resident');

    // The first request for IM0002 fails as if the network dropped; the
    // retry must send that file alone.
    const sent: string[] = [];
    let dropped = false;
    await page.route('**/api/images', async (route) => {
      const body = route.request().postDataBuffer()?.toString('latin1') ?? '';
      const name = /filename="([^"]+)"/.exec(body)?.[1] ?? '?';
      sent.push(name);
      if (name === 'IM0002' && !dropped) {
        dropped = true;
        await route.abort('connectionreset');
        return;
      }
      await route.continue();
    });

    await page
      .getByRole('navigation', { name: 'Main' })
      .getByRole('link', { name: 'Upload' })
      .click();
    await page.getByRole('heading', { name: 'Upload images' }).waitFor();
    await page.getByText('No files chosen yet.').waitFor();
    await page.getByLabel('Choose DICOM files or zips').setInputFiles(files);

    await page.locator(`${rowOf('IM0001.dcm')}[data-status="done"]`).waitFor();
    await page.locator(`${rowOf('IM0003.dcm')}[data-status="done"]`).waitFor();
    await page.locator(`${rowOf('IM0002')}[data-status="failed"]`).waitFor();
    expect(
      await page
        .locator(rowOf('IM0001.dcm'))
        .getByTestId('upload-outcome')
        .textContent(),
    ).toBe('Stored');
    const broken = page.locator(rowOf('IM0003.dcm'));
    expect(await broken.getByTestId('upload-outcome').textContent()).toBe(
      'Rejected',
    );
    await broken.getByText('not_dicom').waitFor();
    await screenshot(page, 'upload-with-failure');

    await page
      .locator(rowOf('IM0002'))
      .getByRole('button', { name: 'Retry' })
      .click();
    await page.locator(`${rowOf('IM0002')}[data-status="done"]`).waitFor();
    expect(
      await page
        .locator(rowOf('IM0002'))
        .getByTestId('upload-outcome')
        .textContent(),
    ).toBe('Stored');
    expect(sent.sort()).toEqual([
      'IM0001.dcm',
      'IM0002',
      'IM0002',
      'IM0003.dcm',
    ]);
    expect(
      await page
        .getByRole('progressbar', { name: 'Overall upload progress' })
        .getAttribute('aria-valuenow'),
    ).toBe('100');
    await page
      .getByTestId('upload-counts')
      .getByText('2 stored · 1 rejected')
      .waitFor();

    const cards = page.getByRole('article');
    await expect(cards.count()).resolves.toBe(2);
    await cards.first().getByText('81 kV').waitFor();
    await page.waitForFunction(() =>
      [...document.querySelectorAll('article img')].every(
        (img) =>
          (img as HTMLImageElement).complete &&
          (img as HTMLImageElement).naturalWidth > 0,
      ),
    );
    const file = await screenshot(page, 'upload');
    expect(statSync(file).size).toBeGreaterThan(20_000);

    const rows = await Image.findAll({ where: { uploadedBy: user.id } });
    expect(rows.map((r) => r.originalName).sort()).toEqual([
      'IM0001.dcm',
      'IM0002',
    ]);
    await page.context().close();
  });

  it('does not offer Upload to the committee', async () => {
    const page = await newPage(browser);
    await signIn(page, server.baseUrl, 'committee');
    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Home' }).waitFor();
    expect(await nav.getByRole('link', { name: 'Upload' }).count()).toBe(0);
    await page.context().close();
  });
});
