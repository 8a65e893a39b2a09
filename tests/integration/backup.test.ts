/**
 * `npm run backup` and `npm run restore`, run as the commands a user types, against the
 * test server's live database: a backup taken while the server runs and another connection
 * keeps writing is a sound, self-contained file; a restore puts it back, keeps the file it
 * replaced, and a server started on the result serves the backed-up state; damaged backups
 * and existing targets are refused without touching anything.
 */
import { execFile } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { readdir, readFile, rm, truncate, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, inject, it } from 'vitest';
import { checkDatabaseFile } from '@/lib/db/backup';
import { createDatabase } from '@/lib/db/client';
import { releases } from '@/lib/db/schema';
import { demoEmails, signedIn } from '../support/http';
import { killAllServerProcesses, startServerProcess } from '../support/server-process';
import { createFixtureRelease, removeFixtureRelease } from './upload-support';

const dir = mkdtempSync(join(tmpdir(), 'quayside-backup-'));
const liveUrl = inject('databaseUrl');
const live = createDatabase(liveUrl);
const releaseId = 'rel-backup-fixture';

function run(script: string, args: string[], databaseUrl: string) {
  return new Promise<{ code: number; out: string }>((resolve) => {
    execFile(
      process.execPath,
      ['--import', 'tsx', `scripts/${script}.ts`, ...args],
      { env: { ...process.env, DATABASE_URL: databaseUrl } },
      (error, stdout, stderr) =>
        resolve({ code: error ? Number(error.code ?? 1) : 0, out: stdout + stderr }),
    );
  });
}

async function titleIn(url: string) {
  const db = createDatabase(url);
  const [row] = await db.select().from(releases).where(eq(releases.id, releaseId));
  return row?.title;
}

afterAll(async () => {
  await killAllServerProcesses();
  await removeFixtureRelease(releaseId);
  await rm(dir, { recursive: true, force: true });
});

describe('backup and restore of the live database', () => {
  it('copies while the server runs and a writer writes; restores and serves the copy', async () => {
    await createFixtureRelease(releaseId);
    await live
      .update(releases)
      .set({ title: 'Before the backup' })
      .where(eq(releases.id, releaseId));

    // Another connection writes all through the backup (WAL lets both go on).
    let writes = 0;
    let writing = true;
    const writer = (async () => {
      while (writing) {
        await live
          .update(releases)
          .set({ updatedAt: new Date() })
          .where(eq(releases.id, 'rel-backup-fixture'));
        writes++;
        // libSQL runs statements on this thread: let the backup command's events through.
        await new Promise((r) => setImmediate(r));
      }
    })();
    const backupFile = join(dir, 'snapshot.db');
    const made = await run('backup', [backupFile], liveUrl);
    writing = false;
    await writer;
    expect(made.code, made.out).toBe(0);
    expect(made.out).toMatch(/integrity ok/);
    expect(writes).toBeGreaterThan(0);
    const check = await checkDatabaseFile(backupFile);
    expect(check.migrations).toBeGreaterThan(0);
    expect(await titleIn(pathToFileURL(backupFile).href)).toBe('Before the backup');
    // A backup is one self-contained file: no -wal beside it.
    expect((await readdir(dir)).filter((f) => f.startsWith('snapshot.db'))).toEqual([
      'snapshot.db',
    ]);

    // Refuses to overwrite an existing backup.
    const again = await run('backup', [backupFile], liveUrl);
    expect(again.code).not.toBe(0);
    expect(again.out).toMatch(/already exists/);

    // The live database moves on; a second backup stands in for the database to replace.
    await live
      .update(releases)
      .set({ title: 'After the backup' })
      .where(eq(releases.id, releaseId));
    const current = join(dir, 'current.db');
    expect((await run('backup', [current], liveUrl)).code).toBe(0);
    const currentUrl = pathToFileURL(current).href;
    expect(await titleIn(currentUrl)).toBe('After the backup');

    const restored = await run('restore', [backupFile], currentUrl);
    expect(restored.code, restored.out).toBe(0);
    expect(restored.out).toMatch(/kept as/);
    expect(await titleIn(currentUrl)).toBe('Before the backup');
    const kept = (await readdir(dir)).find((f) => f.startsWith('current.db.replaced-'));
    expect(kept, 'the replaced database is kept').toBeTruthy();
    expect(await titleIn(pathToFileURL(join(dir, kept ?? '')).href)).toBe('After the backup');

    // A server started on the restored file serves the backed-up state.
    const server = await startServerProcess({ env: { DATABASE_URL: currentUrl } });
    const coordinator = await signedIn(demoEmails.coordinator, server.url);
    const answer = await coordinator.get(`/api/releases/${releaseId}`);
    expect(answer.status).toBe(200);
    expect(JSON.stringify(await answer.json())).toContain('Before the backup');
  });

  it('refuses a damaged backup and leaves the database as it was', async () => {
    const good = join(dir, 'good.db');
    expect((await run('backup', [good], liveUrl)).code).toBe(0);
    const damaged = join(dir, 'damaged.db');
    await writeFile(damaged, await readFile(good));
    await truncate(damaged, 4096 * 3);
    const target = join(dir, 'target.db');
    expect((await run('backup', [target], liveUrl)).code).toBe(0);
    const before = await readFile(target);

    const refused = await run('restore', [damaged], pathToFileURL(target).href);
    expect(refused.code).not.toBe(0);
    expect(refused.out).toMatch(
      /Restore failed: .*(not a sound SQLite database|malformed|not a Quayside)/,
    );
    expect((await readFile(target)).equals(before)).toBe(true);
    expect((await readdir(dir)).some((f) => f.startsWith('target.db.replaced-'))).toBe(false);

    const notSqlite = join(dir, 'notes.txt');
    await writeFile(notSqlite, 'this is not a database\n'.repeat(100));
    const refusedText = await run('restore', [notSqlite], pathToFileURL(target).href);
    expect(refusedText.code).not.toBe(0);
    expect((await readFile(target)).equals(before)).toBe(true);
  });
});
