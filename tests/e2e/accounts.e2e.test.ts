import { statSync } from 'node:fs';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../shared/permissions.ts';
import { uniqueEmail } from '../helpers/factories.ts';
import { linkIn, waitForMail } from '../helpers/mailbox.ts';
import {
  launchBrowser,
  newPage,
  screenshot,
  signIn,
  signInAs,
} from './helpers/browser.ts';
import { startE2eServer, type E2eServer } from './helpers/e2e-server.ts';

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

const NAV: Record<Role, string[]> = {
  admin: ['Users', 'Sent mail'],
  physicist: [],
  resident: [],
  committee: [],
};

describe('accounts in the browser', () => {
  it('shows the sign-in page with Lexend and no requests off this machine', async () => {
    const page = await newPage(browser);
    const foreign: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(server.baseUrl) && !r.url().startsWith('data:'))
        foreign.push(r.url());
    });
    await page.goto(`${server.baseUrl}/`);
    await page.getByRole('heading', { name: 'Lamella' }).waitFor();
    expect(page.url()).toBe(`${server.baseUrl}/sign-in`);
    await page.evaluate(() => document.fonts.ready);
    expect(
      await page.evaluate(() => document.fonts.check('600 16px Lexend')),
    ).toBe(true);
    const file = await screenshot(page, 'sign-in');
    expect(statSync(file).size).toBeGreaterThan(10_000);
    expect(foreign).toEqual([]);
    await page.context().close();
  });

  it.each(['admin', 'physicist', 'resident', 'committee'] as const)(
    'signs in a %s, shows their navigation and home, and signs out',
    async (role) => {
      const page = await newPage(browser);
      const user = await signIn(page, server.baseUrl, role);
      await expect(
        page.getByTestId('signed-in-as').textContent(),
      ).resolves.toContain(role);
      const nav = page.getByRole('navigation', { name: 'Main' });
      for (const label of NAV[role])
        await nav.getByRole('link', { name: label }).waitFor();
      if (role !== 'admin')
        expect(await nav.getByRole('link', { name: 'Users' }).count()).toBe(0);
      if (role === 'admin') {
        await page.waitForURL(`${server.baseUrl}/admin/users`);
        await page.getByTestId(`user-row-${user.email}`).waitFor();
        await screenshot(page, 'admin-users');
      } else {
        await page.getByTestId('role-home').waitFor();
      }
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.getByRole('button', { name: 'Sign in' }).waitFor();
      await page.goto(`${server.baseUrl}/account`);
      await page.waitForURL(`${server.baseUrl}/sign-in`);
      await page.context().close();
    },
  );

  it('lets an admin invite a user who follows the e-mailed link, sets a password and signs in', async () => {
    const admin = await newPage(browser);
    await signIn(admin, server.baseUrl, 'admin');
    const email = uniqueEmail('browser-invitee');
    await admin.getByLabel('Name').fill('Wren Halloran');
    await admin.getByLabel('E-mail address').fill(email);
    await admin.getByLabel('Role', { exact: true }).selectOption('resident');
    await admin.getByRole('button', { name: 'Send invitation' }).click();
    await admin.getByText(`Invitation sent to ${email}.`).waitFor();
    await admin.getByRole('link', { name: 'Sent mail' }).click();
    const item = admin.getByTestId('sent-mail-item').filter({ hasText: email });
    await item.waitFor();
    await screenshot(admin, 'sent-mail');
    const link = linkIn(await waitForMail(email), '/welcome/');

    const invitee = await newPage(browser);
    await invitee.goto(link.href);
    await invitee.getByText(`Wren Halloran (${email})`).waitFor();
    await invitee.getByLabel('New password').fill('wren chooses this');
    await invitee.getByLabel('Repeat the password').fill('wren chooses this');
    await invitee.getByRole('button', { name: 'Set password' }).click();
    await invitee.getByRole('link', { name: 'Sign in' }).click();
    await signInAs(invitee, server.baseUrl, email, 'wren chooses this');
    await expect(
      invitee.getByTestId('signed-in-as').textContent(),
    ).resolves.toContain('Wren Halloran');
    await admin.context().close();
    await invitee.context().close();
  });
});
