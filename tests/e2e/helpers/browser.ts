import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { fromRoot } from '../../../server/config/paths.ts';
import type { Role } from '../../../shared/permissions.ts';
import { buildUser, TEST_PASSWORD } from '../../helpers/factories.ts';

export const SCREENSHOT_DIR = fromRoot('test-output/screenshots');

/**
 * Debian's chromium, headless. The background-networking flags keep it from
 * reaching for the internet, which this machine does not have.
 */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
}

/** A fresh page with its own cookies, sized like a laptop screen. */
export async function newPage(browser: Browser): Promise<Page> {
  const context = await browser.newContext({
    viewport: { width: 1360, height: 900 },
  });
  return context.newPage();
}

/** Signs in through the form as a newly built user of the role. */
export async function signIn(page: Page, baseUrl: string, role: Role) {
  const user = await buildUser({ role });
  await signInAs(page, baseUrl, user.email, TEST_PASSWORD);
  return user;
}

/** Signs in through the form with the given credentials. */
export async function signInAs(
  page: Page,
  baseUrl: string,
  email: string,
  password: string,
): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByTestId('signed-in-as').waitFor();
}

/** Saves a full-page screenshot under test-output/screenshots/. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
