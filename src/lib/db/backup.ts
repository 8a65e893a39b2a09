/**
 * Consistent copies of the SQLite database while the server runs, and putting one back.
 *
 * A copy is made with `VACUUM INTO`, which reads the database inside one read transaction:
 * in WAL mode writers carry on meanwhile and the copy holds exactly the data committed when
 * it began (SQLite documentation, "VACUUM INTO"). The copy is written under a temporary
 * name and renamed once checked, so a crash mid-backup never leaves a half file under the
 * final name. Restoring keeps the database it replaces beside it, with its WAL, so nothing
 * is lost by restoring the wrong file.
 */
import { existsSync } from 'node:fs';
import { mkdir, rename, rm, stat } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { createClient } from '@libsql/client';

export interface DatabaseCheck {
  /** Tables of our schema found in the file. */
  tables: number;
  /** Rows in the migrations journal. */
  migrations: number;
  bytes: number;
}

/** The file path of a `file:` database URL; anything else cannot be copied this way. */
export function databaseFilePath(url: string): string {
  if (!url.startsWith('file:')) {
    throw new Error(
      `Only a local SQLite file can be backed up this way (DATABASE_URL is ${url.split(':')[0]}:).`,
    );
  }
  return url.startsWith('file://') ? fileURLToPath(url) : resolve(url.slice('file:'.length));
}

/**
 * Opens `path` (reading only) and checks it is a whole Quayside database: SQLite's own
 * integrity check passes and the migrations journal and core tables are there. Throws a
 * readable error otherwise.
 */
export async function checkDatabaseFile(path: string): Promise<DatabaseCheck> {
  if (!existsSync(path)) throw new Error(`${path} does not exist.`);
  const client = createClient({ url: pathToFileURL(path).href });
  try {
    const integrity = await client
      .execute('PRAGMA integrity_check')
      .catch((error: Error) => ({ rows: [{ integrity_check: error.message }] }));
    const verdict = String(Object.values(integrity.rows[0] ?? {})[0] ?? '');
    if (verdict !== 'ok') {
      throw new Error(`${path} is not a sound SQLite database: ${verdict}`);
    }
    const tables = await client.execute(
      "SELECT name FROM sqlite_master WHERE type = 'table' AND name IN ('releases', 'tracks', 'user', 'audio_files', '__drizzle_migrations')",
    );
    const names = new Set(tables.rows.map((r) => String(r.name)));
    for (const needed of ['__drizzle_migrations', 'releases', 'tracks']) {
      if (!names.has(needed)) throw new Error(`${path} is not a Quayside database (no ${needed}).`);
    }
    const migrations = await client.execute('SELECT count(*) AS n FROM __drizzle_migrations');
    return {
      tables: names.size,
      migrations: Number(migrations.rows[0]?.n ?? 0),
      bytes: (await stat(path)).size,
    };
  } finally {
    client.close();
  }
}

/** Copies the live database at `databaseUrl` to `destination` (which must not exist). */
export async function backupDatabase(
  databaseUrl: string,
  destination: string,
): Promise<DatabaseCheck & { path: string }> {
  const source = databaseFilePath(databaseUrl);
  const target = resolve(destination);
  if (existsSync(target)) throw new Error(`${target} already exists; choose a new name.`);
  await mkdir(dirname(target), { recursive: true });
  const partial = `${target}.partial`;
  await rm(partial, { force: true });
  const client = createClient({ url: pathToFileURL(source).href, timeout: 10_000 });
  try {
    await client.execute({ sql: 'VACUUM INTO ?', args: [partial] });
  } finally {
    client.close();
  }
  try {
    const check = await checkDatabaseFile(partial);
    await rename(partial, target);
    return { ...check, path: target };
  } catch (error) {
    await rm(partial, { force: true });
    throw error;
  }
}

/**
 * Puts the backup at `backup` in place of the database at `databaseUrl`. The server must be
 * stopped. The replaced file (and its -wal/-shm) is moved to `<name>.replaced-<time>`.
 */
export async function restoreDatabase(
  backup: string,
  databaseUrl: string,
  now: Date = new Date(),
): Promise<{ restored: DatabaseCheck; keptAs: string | null }> {
  const restored = await checkDatabaseFile(resolve(backup));
  const target = databaseFilePath(databaseUrl);
  await mkdir(dirname(target), { recursive: true });
  const incoming = `${target}.restoring`;
  await rm(incoming, { force: true });
  // A fresh copy through SQLite (not a byte copy) so the result is one self-contained file.
  const client = createClient({ url: pathToFileURL(resolve(backup)).href });
  try {
    await client.execute({ sql: 'VACUUM INTO ?', args: [incoming] });
  } finally {
    client.close();
  }
  let keptAs: string | null = null;
  if (existsSync(target)) {
    keptAs = `${target}.replaced-${now.toISOString().replace(/[:.]/g, '-')}`;
    for (const suffix of ['', '-wal', '-shm']) {
      if (existsSync(target + suffix)) await rename(target + suffix, keptAs + suffix);
    }
  }
  await rename(incoming, target);
  // VACUUM INTO writes a rollback-journal file; the server runs in WAL mode.
  const restoredClient = createClient({ url: pathToFileURL(target).href });
  try {
    await restoredClient.execute('PRAGMA journal_mode = WAL');
  } finally {
    restoredClient.close();
  }
  return { restored, keptAs };
}
