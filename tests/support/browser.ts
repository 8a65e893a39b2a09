/** Debian's Chromium driven by playwright-core, with the flags this machine needs. */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { type Browser, type BrowserContext, chromium, type Page } from 'playwright-core';
import { inject } from 'vitest';
import { ensureChromium } from './system-packages';

export const screenshotDir = join(process.cwd(), 'test-results', 'screenshots');

export interface BrowserSession {
  browser: Browser;
  close(): Promise<void>;
}

/** playwright-core gives each launch a fresh temporary profile of its own. */
export async function launchBrowser(): Promise<BrowserSession> {
  const browser = await chromium.launch({
    executablePath: ensureChromium(),
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  mkdirSync(screenshotDir, { recursive: true });
  return {
    browser,
    async close() {
      await browser.close();
    },
  };
}

export async function newPage(browser: Browser): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({
    baseURL: inject('baseUrl'),
    viewport: { width: 1280, height: 860 },
  });
  const page = await context.newPage();
  return { context, page };
}

/** Signs in through the form, as a person would. */
export async function signInThroughForm(
  page: Page,
  email: string,
  password: string,
): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL('**/releases');
}
