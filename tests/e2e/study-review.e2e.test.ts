import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Study } from '../../server/models/study.model.ts';
import { phantomDicom, scratchDir, writeFile } from '../helpers/dicom-files.ts';
import { linkIn, waitForMail } from '../helpers/mailbox.ts';
import {
  buildDetector,
  buildGrid,
  buildRoom,
} from '../helpers/study-factories.ts';
import {
  launchBrowser,
  newPage,
  screenshot,
  signIn,
} from './helpers/browser.ts';
import { startE2eServer, type E2eServer } from './helpers/e2e-server.ts';
import { ConditionAnalysis } from '../../server/models/condition-analysis.model.ts';

let server: E2eServer;
let browser: Browser;
/** Waits until the in-process worker has finished every condition. */
async function resultsSettled(studyId: number): Promise<void> {
  await expect
    .poll(
      () =>
        ConditionAnalysis.count({
          where: { studyId, status: ['queued', 'running'] },
        }),
      { timeout: 60_000, interval: 500 },
    )
    .toBe(0);
}

beforeAll(async () => {
  server = await startE2eServer({}, { workers: 1 });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/** Two exposures of one condition: the grid in, then out (invented headers). */
function sessionFiles(): string[] {
  const dir = scratchDir('e2e-study-session');
  const common = {
    KVP: 70,
    BodyPartThickness: 200,
    AcquisitionDate: '20261130',
    StationName: 'SGH-RAD1',
  };
  return [
    writeFile(
      dir,
      'wall-grid.dcm',
      phantomDicom({
        seed: 3,
        attributes: {
          ...common,
          Grid: ['FOCUSED'],
          AcquisitionTime: '100000',
          ExposureInuAs: 16_000,
        },
      }),
    ),
    writeFile(
      dir,
      'wall-no-grid.dcm',
      phantomDicom({
        seed: 4,
        attributes: {
          ...common,
          Grid: ['NONE'],
          AcquisitionTime: '100200',
          ExposureInuAs: 5_000,
        },
      }),
    ),
  ];
}

const stateOf = (page: Page) => page.getByTestId('review-state').textContent();

describe('a study from plan to signature in the browser', () => {
  it('is planned and submitted by a resident, returned and signed by a physicist, and read by the committee', async () => {
    const room = await buildRoom(`Wall stand room ${Date.now()}`);
    await buildDetector(room.id);
    const grid = await buildGrid(12, room.id);
    const title = `Wall stand 12:1 check ${room.id}`;

    const resident = await newPage(browser);
    await signIn(resident, server.baseUrl, 'resident');
    const physicistPage = await newPage(browser);
    const physicist = await signIn(physicistPage, server.baseUrl, 'physicist');

    // Resident plans the study from the form.
    await resident.getByRole('link', { name: 'Studies', exact: true }).click();
    await resident.getByRole('link', { name: 'Plan a new study' }).click();
    await resident.getByLabel('Title').fill(title);
    await resident
      .getByLabel('Purpose')
      .fill('Is the wall-stand grid worth its dose at 20 cm PMMA?');
    await resident
      .getByLabel('Room')
      .selectOption({ label: `${room.name} (${room.site})` });
    await resident
      .getByRole('checkbox', { name: new RegExp(grid.label) })
      .check();
    await resident.getByLabel('Thicknesses (cm)').fill('20');
    await resident
      .getByTestId('beam-row-1')
      .getByRole('button', { name: 'Remove' })
      .click();
    await resident.getByLabel('Replicates per arm').fill('1');
    await expect(
      resident.getByTestId('planned-count').textContent(),
    ).resolves.toMatch(/^2 exposures/);
    await screenshot(resident, 'study-new-plan');
    await resident.getByRole('button', { name: 'Create the study' }).click();
    await resident.waitForURL(/\/studies\/\d+$/);
    const studyId = Number(resident.url().split('/').pop());
    await resident.getByRole('heading', { name: title }).waitFor();
    await expect(
      resident.getByTestId('expected-count').textContent(),
    ).resolves.toBe('2');

    // The checklist prints without the app's frame.
    await resident
      .getByRole('link', { name: 'Checklist for the room' })
      .click();
    await resident.getByTestId('checklist').waitFor();
    await expect(
      resident
        .getByRole('table', { name: 'Expected acquisitions' })
        .locator('tbody tr')
        .count(),
    ).resolves.toBe(2);
    await resident.emulateMedia({ media: 'print' });
    expect(await resident.locator('header').first().isVisible()).toBe(false);
    await screenshot(resident, 'study-checklist-print');
    await resident.emulateMedia({ media: 'screen' });
    await resident.getByRole('link', { name: 'Back to the study' }).click();

    // Upload the session, let Lamella propose the pairing, and save it.
    await resident
      .getByLabel('Choose DICOM files or zips')
      .setInputFiles(sessionFiles());
    await expect
      .poll(() => resident.getByTestId('upload-outcome').allTextContents(), {
        timeout: 30_000,
      })
      .toEqual(['Stored', 'Stored']);
    const pairing = resident.getByTestId('pairing-section');
    await pairing.getByText('2 images · 0 placed · 2 unassigned').waitFor();
    await pairing.getByRole('button', { name: 'Propose from headers' }).click();
    await pairing.getByText('2 images · 2 placed · 0 unassigned').waitFor();
    await expect(pairing.getByText('confident').count()).resolves.toBe(2);
    await pairing.getByRole('button', { name: 'Save pairing' }).click();
    await pairing.getByText('Pairing saved.').waitFor();
    await screenshot(resident, 'study-pairing');

    // Saving the pairing queues a recomputation; submitting waits for it.
    await resultsSettled(studyId);
    await resident.getByRole('button', { name: 'Submit for review' }).click();
    await expect.poll(() => stateOf(resident)).toMatch(/^Waiting for review/);

    // Physicist follows the e-mail and returns it with a comment.
    const mail = await waitForMail(physicist.email);
    await physicistPage.goto(linkIn(mail, `/studies/${studyId}`).href);
    await physicistPage
      .getByRole('button', { name: 'Return with comments' })
      .click();
    await physicistPage
      .getByLabel('What must change (sent to the author)')
      .fill('State the AEC chamber in the purpose.');
    await physicistPage
      .getByRole('button', { name: 'Send back to the author' })
      .click();
    await expect
      .poll(() => stateOf(physicistPage))
      .toMatch(/^Returned for changes/);
    await screenshot(physicistPage, 'study-returned');

    // Resident fixes the purpose and submits again.
    await resident.reload();
    await resident
      .getByTestId('comments-section')
      .getByText('State the AEC chamber in the purpose.')
      .waitFor();
    await resident.getByRole('link', { name: 'Change the plan' }).click();
    await resident
      .getByLabel('Purpose')
      .fill(
        'Is the wall-stand grid worth its dose at 20 cm PMMA? AEC centre chamber.',
      );
    await resident.getByRole('button', { name: 'Save the plan' }).click();
    await resident.waitForURL(`${server.baseUrl}/studies/${studyId}`);
    await resultsSettled(studyId);
    await resident.getByRole('button', { name: 'Submit for review' }).click();
    await expect.poll(() => stateOf(resident)).toMatch(/^Waiting for review/);

    // Physicist signs.
    await physicistPage.reload();
    await physicistPage.getByRole('button', { name: 'Sign off' }).click();
    await physicistPage
      .getByRole('button', { name: 'Sign revision 1' })
      .click();
    await expect.poll(() => stateOf(physicistPage)).toMatch(/^Signed/);
    await physicistPage.getByRole('link', { name: 'Read as signed' }).waitFor();
    await screenshot(physicistPage, 'study-signed');
    expect((await Study.findByPk(studyId))?.status).toBe('signed');

    // Committee member finds it on their home and reads it, without controls.
    const committee = await newPage(browser);
    await signIn(committee, server.baseUrl, 'committee');
    await committee.getByRole('link', { name: title }).first().click();
    await committee.getByRole('heading', { name: title }).waitFor();
    await committee.getByText('Read-only', { exact: true }).waitFor();
    for (const control of [
      'Submit for review',
      'Sign off',
      'Return with comments',
      'Post comment',
      'Propose from headers',
    ]) {
      expect(
        await committee.getByRole('button', { name: control }).count(),
      ).toBe(0);
    }
    expect(
      await committee.getByRole('link', { name: 'Change the plan' }).count(),
    ).toBe(0);
    expect(
      await committee.getByLabel('Choose DICOM files or zips').count(),
    ).toBe(0);
    await screenshot(committee, 'study-committee-read-only');

    await committee.getByRole('link', { name: 'Read as signed' }).click();
    await committee
      .getByTestId('revision-snapshot')
      .getByText('wall-grid.dcm')
      .waitFor();
    await screenshot(committee, 'study-revision-1');

    await committee.getByRole('link', { name: 'Studies', exact: true }).click();
    await committee.getByTestId(`study-row-${studyId}`).waitFor();
    await screenshot(committee, 'studies-list-committee');

    for (const page of [resident, physicistPage, committee])
      await page.context().close();
  });
});
