import { join } from 'node:path';
import { eq, inArray } from 'drizzle-orm';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createDatabase } from '@/lib/db/client';
import { recordings, releases, tracks } from '@/lib/db/schema';
import { createFixtureRelease } from '../integration/metadata-fixtures';
import {
  type BrowserSession,
  launchBrowser,
  newPage,
  screenshotDir,
  signInThroughForm,
} from '../support/browser';
import { demoEmails, demoPassword, signedIn } from '../support/http';

const db = createDatabase(inject('databaseUrl'));
let session: BrowserSession;

beforeAll(async () => {
  session = await launchBrowser();
  await createFixtureRelease(db, 'rel-meta-e2e', {
    tracks: [{ title: 'First Light' }, { title: 'Second Wind' }, { title: 'Third Rail' }],
  });
  await createFixtureRelease(db, 'rel-meta-e2e-order', {
    tracks: [{ title: 'Alpha' }, { title: 'Bravo' }, { title: 'Charlie' }],
  });
});

afterAll(async () => {
  await session?.close();
});

async function openAs(role: keyof typeof demoEmails, releaseId: string) {
  const { context, page } = await newPage(session.browser);
  await signInThroughForm(page, demoEmails[role], demoPassword);
  await page.goto(`/releases/${releaseId}`);
  await page.getByTestId('track-table').waitFor();
  return { context, page };
}

async function titlesInTable(page: Page): Promise<string[]> {
  return page
    .getByTestId('track-row')
    .evaluateAll((rows) =>
      rows.map(
        (r) =>
          (r.querySelector('[data-testid="inline-title"]') as HTMLInputElement | null)?.value ??
          r.querySelector('[data-testid="track-title"]')?.textContent ??
          '',
      ),
    );
}

async function titlesInDatabase(releaseId: string): Promise<string[]> {
  const rows = await db
    .select({ title: recordings.title, position: tracks.position })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .where(eq(tracks.releaseId, releaseId))
    .orderBy(tracks.position);
  return rows.map((r) => r.title);
}

describe('coordinator: release form', () => {
  it('fills in the release, sees a plain error beside a wrong barcode, fixes it and saves', async () => {
    const { context, page } = await openAs('coordinator', 'rel-meta-e2e');
    const edit = page.getByRole('button', { name: 'Edit release details' });
    await expect.poll(() => edit.isEnabled()).toBe(true);
    await edit.click();
    await page.getByLabel('UPC/EAN').fill('2001234500028');
    await page.getByLabel('Genre').fill('Ambient');
    await page.getByLabel('℗ line').fill('2027 Brackwater Sound');
    await page.getByLabel('Release date', { exact: true }).fill('2027-09-03');
    await page.getByLabel('Compact Disc production master').check();
    await page.getByRole('button', { name: 'Save release details' }).click();
    await expect
      .poll(() => page.getByTestId('release-upcEan-error').textContent())
      .toMatch(/check digit for the first 12 digits is 9/);
    const [unchanged] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-e2e'));
    expect(unchanged?.upcEan).toBeNull();

    await page.getByLabel('UPC/EAN').fill('2001234500029');
    await page.getByRole('button', { name: 'Save release details' }).click();
    await expect.poll(() => page.getByTestId('fact-upc').textContent()).toBe('2001234500029');
    await expect.poll(() => page.getByTestId('fact-genre').textContent()).toBe('Ambient');
    const [row] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-e2e'));
    expect(row).toMatchObject({
      upcEan: '2001234500029',
      genre: 'Ambient',
      pLine: '2027 Brackwater Sound',
    });
    await page.screenshot({
      path: join(screenshotDir, 'metadata-release-form.png'),
      fullPage: true,
    });
    await context.close();
  });

  it('a stale save shows who won, reloads their changes and keeps what the coordinator typed', async () => {
    const { context, page } = await openAs('coordinator', 'rel-meta-e2e');
    const edit = page.getByRole('button', { name: 'Edit release details' });
    await expect.poll(() => edit.isEnabled()).toBe(true);
    await edit.click();
    await page.getByLabel('Catalogue number').fill('BWS-200');

    // Meanwhile an admin changes the genre.
    const [current] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-e2e'));
    const admin = await signedIn(demoEmails.admin);
    const other = await admin.request('PATCH', '/api/releases/rel-meta-e2e/metadata', {
      version: current!.version,
      genre: 'Jazz',
    });
    expect(other.status).toBe(200);

    await page.getByRole('button', { name: 'Save release details' }).click();
    await expect
      .poll(() => page.getByTestId('metadata-error').textContent())
      .toMatch(/Someone else changed this release/);
    await page.getByRole('button', { name: /Load their changes/ }).click();
    await expect.poll(() => page.getByTestId('their-changes').textContent()).toMatch(/Genre: Jazz/);
    expect(await page.getByLabel('Catalogue number').inputValue()).toBe('BWS-200');
    await page.getByRole('button', { name: 'Save release details' }).click();
    await page.getByRole('button', { name: 'Edit release details' }).waitFor();
    const [row] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-e2e'));
    // Both survive: the admin's genre (untouched in the form) and the coordinator's typing.
    expect(row).toMatchObject({ catalogueNumber: 'BWS-200', genre: 'Jazz' });
    await context.close();
  });
});

describe('coordinator: ISRCs, track form and CSV', () => {
  it('allocates ISRCs from the label prefix the admin set on the settings page', async () => {
    const admin = await newPage(session.browser);
    await signInThroughForm(admin.page, demoEmails.admin, demoPassword);
    await admin.page.getByRole('link', { name: 'ISRC' }).click();
    await admin.page.waitForURL('**/settings/isrc');
    const prefix = admin.page.getByLabel('Registrant prefix');
    await prefix.fill('XQ-BRK');
    await admin.page.getByRole('button', { name: 'Save prefix' }).click();
    await expect
      .poll(() => admin.page.getByTestId('registrant-status').textContent())
      .toMatch(/Next code: XQ-BRK-\d\d-\d{5}/);
    await admin.context.close();

    const { context, page } = await openAs('coordinator', 'rel-meta-e2e');
    await page.getByRole('button', { name: 'Allocate ISRCs to 3 tracks without one' }).click();
    await expect
      .poll(async () =>
        (
          await page
            .getByTestId('inline-isrc')
            .evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value))
        ).every((v) => /^XQ-BRK-\d\d-\d{5}$/.test(v)),
      )
      .toBe(true);
    const rows = await db
      .select({ isrc: recordings.isrc })
      .from(recordings)
      .where(
        inArray(recordings.id, ['rec-rel-meta-e2e-1', 'rec-rel-meta-e2e-2', 'rec-rel-meta-e2e-3']),
      );
    const numbers = rows.map((r) => Number(r.isrc!.slice(7))).sort((a, b) => a - b);
    expect(numbers[2]! - numbers[0]!).toBe(2);
    await context.close();
  });

  it('edits credits in the track form, with a plain error for a bad ISNI', async () => {
    const { context, page } = await openAs('coordinator', 'rel-meta-e2e');
    await page.getByRole('button', { name: 'Edit “Second Wind”' }).click();
    const editor = page.getByTestId('track-editor');
    await editor.getByLabel('Version').fill('Radio Edit');
    await editor.getByRole('button', { name: 'Add credit' }).click();
    await editor.getByLabel('Name').nth(1).fill('Bo Reed');
    await editor.getByLabel('Role').nth(1).selectOption('producer');
    await editor.getByLabel('ISNI (optional)').nth(1).fill('0000 0001 2103 2684');
    await editor.getByRole('button', { name: 'Save track' }).click();
    await expect
      .poll(() => page.getByTestId('credit-1-isni-error').textContent())
      .toMatch(/check character for the first 15 digits is "3"/);
    await editor.getByLabel('ISNI (optional)').nth(1).fill('0000 0001 2103 2683');
    await editor.getByRole('button', { name: 'Save track' }).click();
    await expect.poll(() => page.getByTestId('track-editor').count()).toBe(0);
    const [rec] = await db.select().from(recordings).where(eq(recordings.id, 'rec-rel-meta-e2e-2'));
    expect(rec?.versionTitle).toBe('Radio Edit');
    expect(rec?.credits).toEqual([
      { name: 'Fixture Composer', role: 'composer' },
      { name: 'Bo Reed', role: 'producer', isni: '0000000121032683' },
    ]);
    await context.close();
  });

  it('imports a CSV with an error (nothing written, error shown), fixes it and imports again', async () => {
    const { context, page } = await openAs('coordinator', 'rel-meta-e2e');
    const exported = await page.evaluate(async () =>
      (await fetch('/api/releases/rel-meta-e2e/metadata.csv')).text(),
    );
    const lines = exported
      .replace(/^\uFEFF/, '')
      .trim()
      .split('\r\n');
    const bad = [
      lines[0],
      lines[1]!.replace('First Light', 'First Light (CSV)'),
      lines[2]!.replace(/XQ-BRK-(\d\d)-(\d{5})/, 'XQ-BRK-$1-$2X'),
      lines[3],
    ].join('\r\n');
    await page.getByTestId('csv-file').setInputFiles({
      name: 'tracks.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(bad),
    });
    await expect
      .poll(() => page.getByTestId('csv-errors').textContent())
      .toMatch(/Line 3 \(Second Wind\), isrc: An ISRC has 12 characters/);
    expect(await page.getByRole('button', { name: /^Import \d+ change/ }).isDisabled()).toBe(true);
    expect(await titlesInDatabase('rel-meta-e2e')).toContain('First Light');

    const good = [
      lines[0],
      lines[1]!.replace('First Light', 'First Light (CSV)'),
      lines[2],
      lines[3],
    ].join('\r\n');
    await page.getByTestId('csv-file').setInputFiles({
      name: 'tracks-fixed.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(good),
    });
    await expect
      .poll(() => page.getByTestId('csv-summary').textContent())
      .toMatch(/1 change on 1 track/);
    await page.getByRole('button', { name: 'Import 1 change' }).click();
    await expect
      .poll(() => page.getByTestId('csv-done').textContent())
      .toMatch(/Imported 1 change/);
    expect(await titlesInDatabase('rel-meta-e2e')).toContain('First Light (CSV)');
    await page.screenshot({ path: join(screenshotDir, 'metadata-csv.png'), fullPage: true });
    await context.close();
  });
});

describe('engineer: running order', () => {
  it('reorders by keyboard (space, arrow, space) and the order is saved', async () => {
    const { context, page } = await openAs('engineer', 'rel-meta-e2e-order');
    expect(await titlesInTable(page)).toEqual(['Alpha', 'Bravo', 'Charlie']);
    const handle = page.getByRole('button', { name: 'Move “Alpha” (position 1)' });
    await expect.poll(() => handle.isEnabled()).toBe(true);
    await handle.focus();
    await page.keyboard.press('Space');
    await page.waitForTimeout(150);
    await page.keyboard.press('ArrowDown');
    await page.waitForTimeout(150);
    await page.keyboard.press('Space');
    await expect
      .poll(() => titlesInDatabase('rel-meta-e2e-order'))
      .toEqual(['Bravo', 'Alpha', 'Charlie']);
    await expect.poll(() => titlesInTable(page)).toEqual(['Bravo', 'Alpha', 'Charlie']);
    await context.close();
  });

  it('reorders by dragging with the mouse', async () => {
    const { context, page } = await openAs('engineer', 'rel-meta-e2e-order');
    const before = await titlesInDatabase('rel-meta-e2e-order');
    const [first, , last] = before as [string, string, string];
    const handle = page.getByRole('button', { name: new RegExp(`Move “${last}”`) });
    await expect.poll(() => handle.isEnabled()).toBe(true);
    await page.getByTestId('track-table').scrollIntoViewIfNeeded();
    const from = (await handle.boundingBox())!;
    const target = (await page
      .getByRole('button', { name: new RegExp(`Move “${first}”`) })
      .boundingBox())!;
    const x = from.x + from.width / 2;
    await page.mouse.move(x, from.y + from.height / 2);
    await page.mouse.down();
    for (let step = 1; step <= 10; step += 1) {
      const y = from.y + from.height / 2 + ((target.y - from.y) * step) / 10;
      await page.mouse.move(x, y);
      await page.waitForTimeout(20);
    }
    await page.mouse.up();
    const expected = [last, ...before.slice(0, 2)];
    await expect.poll(() => titlesInDatabase('rel-meta-e2e-order')).toEqual(expected);
    await expect.poll(() => titlesInTable(page)).toEqual(expected);
    await context.close();
  });

  it('sets a gap in seconds, stored as CD frames; has no ISRC or metadata controls', async () => {
    const { context, page } = await openAs('engineer', 'rel-meta-e2e-order');
    const gap = page.getByLabel('Gap before track 2, seconds');
    await expect.poll(() => gap.isEditable()).toBe(true);
    await gap.fill('1.5');
    await gap.press('Enter');
    await expect
      .poll(async () => {
        const rows = await db
          .select()
          .from(tracks)
          .where(eq(tracks.releaseId, 'rel-meta-e2e-order'));
        return rows.find((t) => t.position === 2)?.gapBeforeFrames;
      })
      .toBe(113); // 1.5 s × 75 frames/s = 112.5, rounded to the nearest frame
    expect(await page.getByTestId('inline-isrc').count()).toBe(0);
    expect(await page.getByRole('button', { name: /Allocate ISRC/ }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Edit release details' }).count()).toBe(0);
    expect(await page.getByTestId('csv-file').count()).toBe(0);
    await context.close();
  });
});
