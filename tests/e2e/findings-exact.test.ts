/**
 * Releases whose generated masters each break one specific rule show exactly those findings
 * in the browser, and no others: every other rule of their profiles passes.
 */
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
let session: BrowserSession;

const cd = { sampleRateHz: 44_100, bitsPerSample: 16 as const };

/** fs/4 sine at 45° phase: samples sit at ±0.707 of the amplitude, the true peak is the
 * amplitude itself (EBU Tech 3341 case 19 uses the same construction). */
function interSampleOver(amplitude: number, seconds: number): WavSpec {
  const frames = Math.round(seconds * 44_100);
  const fade = 2205;
  return {
    ...cd,
    channels: 2,
    frames,
    sample: (i, ch) => {
      const envelope = Math.min(1, i / fade, (frames - 1 - i) / fade);
      return (
        envelope * amplitude * (ch === 0 ? 1 : 0.9) * Math.sin((Math.PI / 2) * i + Math.PI / 4)
      );
    },
  };
}

/** Fades in, then ends on a crest (no fade-out): the next file must join it smoothly. */
function endsOnACrest(seconds: number): WavSpec {
  const frames = Math.round(seconds * 44_100);
  const w = (2 * Math.PI * 441) / 44_100;
  const phase = Math.PI / 2 - w * (frames - 1);
  return {
    ...cd,
    channels: 2,
    frames,
    sample: (i, ch) => Math.min(1, i / 2205) * (ch === 0 ? 0.5 : 0.45) * Math.sin(w * i + phase),
  };
}

beforeAll(async () => {
  session = await launchBrowser();
  await createFixtureRelease(db, {
    id: 'rel-breaks-cd',
    title: 'Rule Breakers (CD)',
    profiles: ['cd-master'],
    upcEan: '2001234500043',
    artwork: false,
    tracks: [
      {
        title: 'Wrong Rate',
        isrc: 'XQFXT2690001',
        gapBeforeFrames: 150,
        audio: cleanTone({ sampleRateHz: 48_000, bitsPerSample: 16, seconds: 6, peakDbfs: -3 }),
      },
      {
        title: 'Over the Top',
        isrc: 'XQFXT2690002',
        gapBeforeFrames: 150,
        audio: interSampleOver(1.3, 6),
      },
      {
        title: 'Short Piece',
        isrc: 'XQFXT2690003',
        gapBeforeFrames: 150,
        audio: cleanTone({ ...cd, seconds: 3, peakDbfs: -3 }),
      },
      {
        title: 'Twice Told',
        recording: 'twice',
        isrc: 'XQFXT2690004',
        gapBeforeFrames: 150,
        audio: cleanTone({ ...cd, seconds: 5, peakDbfs: -3 }),
      },
      {
        title: 'Twice Told',
        recording: 'twice',
        isrc: 'XQFXT2690004',
        gapBeforeFrames: 150,
        audio: cleanTone({ ...cd, seconds: 5, peakDbfs: -3 }),
      },
      { title: 'Run Up', isrc: 'XQFXT2690005', gapBeforeFrames: 150, audio: endsOnACrest(6) },
      {
        title: 'Hard Join',
        isrc: 'XQFXT2690006',
        gapBeforeFrames: 0,
        audio: cleanTone({ ...cd, seconds: 6, peakDbfs: -3 }),
      },
    ],
  });
  await createFixtureRelease(db, {
    id: 'rel-breaks-hires',
    title: 'Rule Breakers (high resolution)',
    profiles: ['streaming-hires'],
    upcEan: '2001234500050',
    artwork: true,
    tracks: [
      {
        title: 'Padded Sixteen',
        isrc: 'XQFXT2690007',
        gapBeforeFrames: 150,
        // 24-bit container, 16-bit content: the low 8 bits of every sample are zero.
        audio: cleanTone({
          sampleRateHz: 48_000,
          bitsPerSample: 24,
          contentBits: 16,
          seconds: 5,
          peakDbfs: -3,
        }),
      },
      {
        title: 'True Twenty-Four',
        isrc: 'XQFXT2690008',
        gapBeforeFrames: 150,
        audio: cleanTone({ sampleRateHz: 48_000, bitsPerSample: 24, seconds: 5, peakDbfs: -3 }),
      },
    ],
  });
  await createFixtureRelease(db, {
    id: 'rel-breaks-vinyl',
    title: 'Rule Breakers (7-inch)',
    profiles: ['vinyl-7-45'],
    upcEan: '2001234500067',
    artwork: false,
    storeAudio: false,
    tracks: [
      {
        title: 'Long Side',
        isrc: 'XQFXT2690009',
        gapBeforeFrames: 0,
        side: 'A',
        // 6.5 minutes on one side of a 7-inch at 45 rpm: past the 6-minute limit
        // (REFERENCES.md §9, common practice).
        audio: cleanTone({ ...cd, bitsPerSample: 24, seconds: 390, peakDbfs: -20, fadeSeconds: 1 }),
      },
      {
        title: 'Flip',
        isrc: 'XQFXT2690010',
        gapBeforeFrames: 0,
        side: 'B',
        audio: cleanTone({ ...cd, bitsPerSample: 24, seconds: 30, peakDbfs: -20 }),
      },
    ],
  });
}, 180_000);

afterAll(async () => {
  await session?.close();
});

/** Runs the checks in the browser and reads every failure and warning as shown. */
async function readProblems(page: Page, releaseId: string): Promise<string[]> {
  await page.goto(`/releases/${releaseId}`);
  await page
    .getByTestId('checks-panel')
    .getByRole('button', { name: /Run checks/ })
    .click();
  await page.getByTestId('verdict-grid').waitFor();
  const rows = page.getByTestId('finding');
  const problems: string[] = [];
  for (const row of await rows.all()) {
    const severity = (await row.locator(':scope > span').textContent())?.trim() ?? '';
    const track = (await row.locator('p span.font-medium').first().textContent())?.trim() ?? '';
    const channel = await row.getAttribute('data-channel');
    const rule = `${await row.getAttribute('data-rule')}${channel ? ` ch${channel}` : ''}`;
    problems.push(`${track} | ${rule} | ${severity.replace(/^[^A-Za-z]+/, '')}`);
  }
  return problems.sort();
}

describe('each broken rule shows, and nothing else', () => {
  it('CD master: a 48 kHz file, an inter-sample over, a 3-second track, a repeated ISRC, a click at a gapless join', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    const problems = await readProblems(page, 'rel-breaks-cd');
    await page.screenshot({ path: join(screenshotDir, 'findings-exact-cd.png'), fullPage: true });
    expect(problems).toEqual(
      [
        // IEC 60908 (Red Book): 44.1 kHz only.
        '1. Wrong Rate | sampleRate | Failure',
        // Above −1 dBTP (common practice for finished masters); an fs/4 sine at 45° peaks
        // between samples 3 dB above them (EBU Tech 3341 case 19's construction).
        '2. Over the Top | truePeak | Warning',
        // IEC 60908: a track is at least 4 s.
        '3. Short Piece | trackDuration | Failure',
        // ISO 3901: one ISRC, one recording; the same one twice on a release is flagged.
        '4. Twice Told | isrcUniqueInRelease | Failure',
        '5. Twice Told | isrcUniqueInRelease | Failure',
        // A gapless join from a crest at −6 dBFS into silence is a click (common practice).
        '7. Hard Join | gaplessJoin ch1 | Warning',
        '7. Hard Join | gaplessJoin ch2 | Warning',
      ].sort(),
    );
    await context.close();
  });

  it('high resolution: 16-bit audio padded into a 24-bit file', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    expect(await readProblems(page, 'rel-breaks-hires')).toEqual([
      '1. Padded Sixteen | effectiveBitDepth | Failure',
    ]);
    await context.close();
  });

  it('7-inch vinyl: a side longer than the disc holds', async () => {
    const { context, page } = await newPage(session.browser);
    await signInThroughForm(page, demoEmails.engineer, demoPassword);
    expect(await readProblems(page, 'rel-breaks-vinyl')).toEqual([
      'Whole release | runningTime | Failure',
    ]);
    await context.close();
  });
});
