import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { audioFiles, recordings, tracks } from '@/lib/db/schema';
import {
  clippedWav,
  createFixtureRelease,
  db,
  removeFixtureRelease,
  sineWav,
} from '../integration/upload-support';
import {
  type BrowserSession,
  launchBrowser,
  newPage,
  screenshotDir,
  signInThroughForm,
} from '../support/browser';
import { demoEmails, demoPassword } from '../support/http';

const releaseId = 'rel-upload-browser';
let session: BrowserSession;
let folder: string;
const files: string[] = [];

beforeAll(async () => {
  session = await launchBrowser();
  await createFixtureRelease(releaseId, ['streaming-standard']);
  folder = mkdtempSync(join(tmpdir(), 'quayside-upload-e2e-'));
  const masters: [string, Buffer][] = [
    ['01 First Light.wav', clippedWav({ seconds: 8, clipAtSeconds: [2.5, 5.25] })],
    // Large enough (about 35 MB) for the progress bar to be seen moving.
    ['02 Low Water.wav', sineWav({ seconds: 120, sampleRateHz: 48_000, bits: 24, peakDbfs: -14 })],
    ['03 Harbour Wall.wav', sineWav({ seconds: 6, sampleRateHz: 44_100, bits: 16, peakDbfs: -9 })],
  ];
  for (const [name, bytes] of masters) {
    const path = join(folder, name);
    writeFileSync(path, bytes);
    files.push(path);
  }
});

afterAll(async () => {
  await session?.close();
  await removeFixtureRelease(releaseId);
  if (folder) rmSync(folder, { recursive: true, force: true });
});

describe('an engineer uploads an album in the browser', () => {
  it('sees progress, the analyses finish, a finding plays from its time, behind the caution', async () => {
    const { context, page } = await newPage(session.browser);
    // Record every progress value the bars show, to prove they moved rather than jumped.
    await page.addInitScript(() => {
      const seen: number[] = [];
      (window as unknown as { __progress: number[] }).__progress = seen;
      new MutationObserver((records) => {
        for (const r of records) {
          const el = r.target as Element;
          if (el.getAttribute?.('role') === 'progressbar') {
            seen.push(Number(el.getAttribute('aria-valuenow')));
          }
        }
      }).observe(document, { subtree: true, attributes: true, attributeFilter: ['aria-valuenow'] });
    });
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    // Slow the uplink so the 35 MB file takes a few seconds.
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: 0,
      downloadThroughput: -1,
      uploadThroughput: 12 * 1024 * 1024,
    });
    await page.goto(`/releases/${releaseId}`);
    await expect
      .poll(() => page.getByText('No tracks yet. Drop the album').isVisible(), { timeout: 15_000 })
      .toBe(true);

    await page.getByTestId('upload-input').setInputFiles(files);
    await page.getByRole('button', { name: 'Upload 3 files' }).click();
    await expect
      .poll(() => page.locator('[data-testid="upload-item"][data-state="stored"]').count(), {
        timeout: 60_000,
      })
      .toBe(3);
    const progress = await page.evaluate(
      () => (window as unknown as { __progress: number[] }).__progress,
    );
    expect(progress.some((v) => v > 0 && v < 100)).toBe(true);
    expect(progress).toContain(100);

    await expect
      .poll(() => page.getByTestId('analysis-state').allTextContents(), { timeout: 60_000 })
      .toEqual(['● Analysed', '● Analysed', '● Analysed']);
    await page.screenshot({
      path: join(screenshotDir, 'upload-release-panel.png'),
      fullPage: true,
    });
    const rows = await page.getByTestId('file-row').allTextContents();
    expect(rows[0]).toContain('First Light');
    expect(rows[2]).toContain('Harbour Wall');

    await page.getByRole('link', { name: 'First Light' }).first().click();
    await page.waitForURL(`**/releases/${releaseId}/tracks/**`);
    await expect.poll(() => page.getByTestId('track-title').textContent()).toBe('First Light');
    await expect.poll(() => page.getByTestId('waveform-canvas').count()).toBe(1);
    await expect.poll(() => page.locator('[data-testid="loudness-chart"] canvas').count()).toBe(1);
    const clipMarkers = page.locator('[data-testid="finding-marker"][data-kind="clipping"]');
    expect(await clipMarkers.count()).toBe(2);
    expect(await page.getByTestId('measurement-readout').textContent()).toContain('LUFS');

    // The caution comes before the first playback; a finding then plays from its time.
    expect(await page.getByTestId('listening-caution').isVisible()).toBe(true);
    expect(await page.getByTestId('player').isVisible()).toBe(false);
    const second = clipMarkers.nth(1);
    const at = Number(await second.getAttribute('data-seconds'));
    expect(at).toBeCloseTo(5.25, 2);
    await second.click();
    await page.getByRole('button', { name: 'I have turned the level down' }).click();
    expect(await page.getByTestId('player').isVisible()).toBe(true);
    await expect
      .poll(() => page.getByTestId('player').evaluate((a: HTMLAudioElement) => a.currentTime), {
        timeout: 15_000,
      })
      .toBeGreaterThanOrEqual(at - 0.05);
    const played = await page.getByTestId('player').evaluate((a: HTMLAudioElement) => ({
      time: a.currentTime,
      error: a.error?.message ?? null,
    }));
    expect(played.error).toBeNull();
    expect(played.time).toBeLessThan(at + 3);
    await page.screenshot({ path: join(screenshotDir, 'upload-track-page.png'), fullPage: true });

    // The caution is shown once per session: a reload goes straight to the player.
    await page.reload();
    await expect.poll(() => page.getByTestId('player').isVisible(), { timeout: 15_000 }).toBe(true);
    expect(await page.getByTestId('listening-caution').count()).toBe(0);

    const [track] = await db
      .select({ id: tracks.id })
      .from(tracks)
      .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
      .where(eq(recordings.title, 'First Light'));
    const stored = await db
      .select()
      .from(audioFiles)
      .innerJoin(tracks, eq(tracks.recordingId, audioFiles.recordingId))
      .where(eq(tracks.id, track?.id ?? ''));
    expect(stored.map((r) => r.audio_files.analysisState)).toEqual(['done']);
    await context.close();
  });

  it('refuses a renamed text file in the browser before sending it', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    await page.goto(`/releases/${releaseId}`);
    await expect.poll(() => page.getByTestId('file-row').count(), { timeout: 15_000 }).toBe(3);
    const fake = join(folder, 'notes.wav');
    writeFileSync(fake, 'These are my mastering notes, not audio.\n');
    await page.getByTestId('upload-input').setInputFiles(fake);
    await page.getByRole('button', { name: 'Upload 1 file' }).click();
    await expect
      .poll(() => page.locator('[data-testid="upload-item"][data-state="failed"]').textContent())
      .toContain('not a WAV');
    expect(await page.getByTestId('file-row').count()).toBe(3);
    await context.close();
  });
});
