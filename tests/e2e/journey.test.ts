/**
 * The approval journey in the browser with three roles: the engineer runs the checks, waives
 * a warning with a reason and signs off the audio; the coordinator signs off the metadata,
 * approves and shares; the distributor gets the e-mail, downloads the package and
 * acknowledges it. Screenshots of each step land in test-results/screenshots/.
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createDatabase } from '@/lib/db/client';
import {
  type BrowserSession,
  launchBrowser,
  newPage,
  screenshotDir,
  signInThroughForm,
} from '../support/browser';
import { demoEmails, demoPassword } from '../support/http';
import { cleanTone, createFixtureRelease } from '../support/release-fixtures';
import type { WavSpec } from '../support/wav-stream';

const db = createDatabase(inject('databaseUrl'));
const releaseId = 'rel-journey';
let session: BrowserSession;

/** True peak 3 dB over its samples (EBU Tech 3341 case 19’s construction), at −0.5 dBTP. */
function warmMaster(): WavSpec {
  const frames = 5 * 44_100;
  const amplitude = 10 ** (-0.5 / 20);
  return {
    sampleRateHz: 44_100,
    bitsPerSample: 16,
    channels: 2,
    frames,
    sample: (i, ch) =>
      Math.min(1, i / 2205, (frames - 1 - i) / 2205) *
      amplitude *
      (ch === 0 ? 1 : 0.9) *
      Math.sin((Math.PI / 2) * i + Math.PI / 4),
  };
}

beforeAll(async () => {
  session = await launchBrowser();
  await createFixtureRelease(db, {
    id: releaseId,
    title: 'Lantern Quay',
    profiles: ['cd-master'],
    upcEan: '2001234500104',
    artwork: false,
    tracks: [
      {
        title: 'Mooring Lines',
        isrc: 'XQFXT2660001',
        gapBeforeFrames: 150,
        audio: cleanTone({ sampleRateHz: 44_100, bitsPerSample: 16, seconds: 5, peakDbfs: -3 }),
      },
      { title: 'High Water Mark', isrc: 'XQFXT2660002', gapBeforeFrames: 150, audio: warmMaster() },
    ],
  });
}, 60_000);

afterAll(async () => {
  await session?.close();
});

async function shot(page: Page, name: string) {
  await page.screenshot({ path: join(screenshotDir, `journey-${name}.png`), fullPage: true });
}

describe('approval journey', () => {
  it('engineer: run checks, waive the warning with a reason, sign off the audio', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    await page.goto(`/releases/${releaseId}`);
    await page.getByTestId('checks-panel').getByRole('button', { name: 'Run checks' }).click();
    await page.getByTestId('verdict-grid').waitFor();

    const warning = page.getByTestId('finding').and(page.locator('[data-rule="truePeak"]'));
    await warning.getByRole('button', { name: /Waive/ }).click();
    await warning
      .getByLabel(/Why is this warning acceptable/)
      .fill('The inter-sample peak is part of the sound; the plant was told.');
    await warning.getByRole('button', { name: 'Waive warning' }).click();
    await warning.getByTestId('waiver').waitFor();
    expect(await warning.getByTestId('waiver').textContent()).toContain('Waived by Eli Stroud');
    // The grid counts a waived warning as settled, and says so.
    const cell = page.getByRole('button', {
      name: /^2\. High Water Mark, Compact Disc production master:/,
    });
    await expect.poll(() => cell.getAttribute('data-verdict')).toBe('pass');
    expect(await cell.textContent()).toContain('1 waived');

    // The finding's time opens the track page, which plays from there behind the caution.
    const at = warning.locator('a[href*="/tracks/"]');
    const seconds = Number(
      new URL((await at.getAttribute('href')) ?? '', 'http://x').searchParams.get('t'),
    );
    expect(seconds).toBeGreaterThan(0);
    await at.click();
    await page
      .getByTestId('finding-position')
      .getByRole('button', { name: 'Play from there' })
      .click();
    await page.getByRole('button', { name: 'I have turned the level down' }).click();
    await expect
      .poll(() => page.getByTestId('player').evaluate((a: HTMLAudioElement) => a.currentTime), {
        timeout: 15_000,
      })
      .toBeGreaterThanOrEqual(seconds - 0.05);
    await shot(page, '1b-engineer-track');
    await page.goto(`/releases/${releaseId}`);

    await page.getByRole('button', { name: 'Sign off audio' }).click();
    await expect
      .poll(() => page.getByTestId('signoff-audio').textContent())
      .toContain('signed off by Eli Stroud');
    expect(await page.getByRole('button', { name: 'Approve' }).count()).toBe(0);
    await shot(page, '1-engineer');
    await context.close();
  });

  it('coordinator: sign off the metadata, approve, watch the package build, share', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.coordinator, demoPassword);
    await page.goto(`/releases/${releaseId}`);
    await page.getByRole('button', { name: 'Sign off metadata' }).click();
    await expect
      .poll(() => page.getByTestId('readiness').textContent())
      .toContain('ready to approve');
    await page.getByRole('button', { name: 'Approve' }).click();
    await page.getByTestId('package-row').first().waitFor();
    await expect
      .poll(() => page.getByTestId('package-row').first().getAttribute('data-state'), {
        timeout: 20_000,
      })
      .toBe('ready');
    await page
      .getByLabel('Share with')
      .selectOption({ label: 'Dev Okafor (distributor@northpier.test)' });
    await page.getByRole('button', { name: 'Share', exact: true }).click();
    await page.getByTestId('shares').getByText('Dev Okafor').waitFor();
    await shot(page, '2-coordinator');
    await context.close();
  });

  it('distributor: reads the e-mail, downloads the package, acknowledges', async () => {
    const { context, page } = await newPage(session.browser);
    await page.goto('/dev/mail');
    const mail = page.getByTestId('mail-item').filter({ hasText: 'Package ready: Lantern Quay' });
    await mail.first().waitFor({ timeout: 15_000 });
    expect(await mail.first().textContent()).toContain('distributor@northpier.test');
    await mail
      .first()
      .getByRole('link', { name: /\/deliveries$/ })
      .click();
    await page.waitForURL('**/sign-in?next=%2Fdeliveries');
    await page.getByLabel('E-mail').fill(demoEmails.distributor);
    await page.getByLabel('Password').fill(demoPassword);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/deliveries');

    const card = page.locator(`[data-release="${releaseId}"]`);
    await card.waitFor();
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      card.getByRole('button', { name: 'Download' }).click(),
    ]);
    expect(download.suggestedFilename()).toMatch(/-v1\.zip$/);
    const path = join(screenshotDir, '..', download.suggestedFilename());
    await download.saveAs(path);
    expect(execFileSync('unzip', ['-t', path], { encoding: 'utf8' })).toMatch(/No errors detected/);
    const sha = createHash('sha256')
      .update(await readFile(path))
      .digest('hex');
    expect(await card.textContent()).toContain(sha);

    await page.reload();
    await expect.poll(() => card.textContent()).toContain('downloaded 1×');
    await card.getByRole('button', { name: 'Acknowledge delivery' }).click();
    await expect.poll(() => card.textContent()).toContain('Acknowledged');
    await shot(page, '3-distributor');
    await context.close();
  });
});
