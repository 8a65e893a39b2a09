import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  type BrowserSession,
  launchBrowser,
  newPage,
  screenshotDir,
  signInThroughForm,
} from '../support/browser';
import { demoEmails, demoPassword } from '../support/http';

let session: BrowserSession;

beforeAll(async () => {
  session = await launchBrowser();
});

afterAll(async () => {
  await session?.close();
});

describe('checks in the release workspace', () => {
  it('the engineer runs the checks and reads the CD sample-rate failure with value and limit', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    await page.goto('/releases/rel-night-ferries');
    const panel = page.getByTestId('checks-panel');
    await panel.waitFor();
    await panel.getByRole('button', { name: /Run checks/ }).click();
    await page.getByTestId('verdict-grid').waitFor();
    await expect
      .poll(() => page.getByTestId('check-summary').textContent())
      .toMatch(/^\d+ failures? · \d+ warnings? · \d+ checks clear$/);

    // The cell for track 2 on the CD profile says Failure in words, not only in colour.
    const cell = page.getByRole('button', {
      name: /^2\. Customs House, Compact Disc production master: failure/,
    });
    expect(await cell.textContent()).toContain('Failure');
    await cell.click();

    const finding = page.getByTestId('finding').and(page.locator('[data-rule="sampleRate"]'));
    await finding.first().waitFor();
    const text = await finding.first().textContent();
    expect(text).toContain('Customs House');
    expect(text).toContain('measured 48000 Hz');
    expect(text).toContain('limit');
    await page.screenshot({ path: join(screenshotDir, 'checks-engineer.png'), fullPage: true });

    // Filtering to failures only never shows a pass.
    await page.getByRole('combobox', { name: 'Show', exact: true }).selectOption('failure');
    await page.getByRole('combobox', { name: 'Track', exact: true }).selectOption('');
    await page.getByRole('combobox', { name: 'Profile', exact: true }).selectOption('');
    const verdicts = await page.getByTestId('finding').locator(':scope > span').allTextContents();
    expect(verdicts.length).toBeGreaterThan(0);
    for (const v of verdicts) expect(v).toContain('Failure');
    await context.close();
  });

  it('a distributor sees no checks section', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.distributor, demoPassword);
    await page.goto('/releases/rel-signal-hill');
    await page.getByTestId('release-title').waitFor();
    expect(await page.getByTestId('checks-panel').count()).toBe(0);
    await context.close();
  });
});

describe('profile editor', () => {
  it('an admin copies the CD profile, tightens the true-peak ceiling, sees a bad value refused, and saves', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.admin, demoPassword);
    await page.getByRole('link', { name: 'Profiles' }).click();
    const cdRow = page
      .getByTestId('profile-row')
      .filter({ hasText: 'Compact Disc production master' })
      .first();
    await cdRow.getByRole('button', { name: 'Copy' }).click();
    await page.getByLabel('Name of the copy').fill('Plant C, CD');
    await page.getByRole('button', { name: 'Make copy' }).click();
    await page.waitForURL(/\/profiles\/custom-/);

    const truePeak = page.locator('[data-rule="truePeak"]');
    await truePeak.waitFor();
    await truePeak.getByRole('checkbox').check();
    const ceiling = truePeak.getByLabel('Ceiling', { exact: true });
    await ceiling.fill('loud');
    await page.getByRole('button', { name: 'Save profile' }).click();
    await expect.poll(() => truePeak.locator('.text-fail').count()).toBeGreaterThan(0);

    await ceiling.fill('-1.5');
    await page.getByRole('button', { name: 'Save profile' }).click();
    await page.getByText('Saved as version 2.').waitFor();
    await page.screenshot({
      path: join(screenshotDir, 'profile-editor-admin.png'),
      fullPage: true,
    });

    await page.reload();
    await page.locator('[data-rule="truePeak"]').getByLabel('Ceiling', { exact: true }).waitFor();
    expect(
      await page
        .locator('[data-rule="truePeak"]')
        .getByLabel('Ceiling', { exact: true })
        .inputValue(),
    ).toBe('-1.5');
    await context.close();
  });

  it('an engineer reads profiles but cannot change them', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    await page.goto('/profiles/cd-master');
    await page.locator('[data-rule="sampleRate"]').waitFor();
    expect(await page.getByRole('button', { name: 'Save profile' }).count()).toBe(0);
    expect(await page.getByLabel('Sample rates', { exact: true }).inputValue()).toBe('44100');
    expect(await page.getByLabel('Sample rates', { exact: true }).isDisabled()).toBe(true);
    await context.close();
  });
});
