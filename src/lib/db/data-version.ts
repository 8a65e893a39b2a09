import { fileURLToPath } from 'node:url';
import Database from 'libsql';

/**
 * Tells whether anything was committed to a database file since the last look, by anyone: this
 * process's own connections, a script, a test or a second server. It keeps one connection of
 * its own and asks SQLite's `PRAGMA data_version`, which on that connection changes whenever
 * another connection commits (https://sqlite.org/pragma.html#pragma_data_version). One
 * prepared statement, a few microseconds per call. The read caches key on it, so a cached
 * answer is never served once the data it came from may have changed.
 */
export interface DataVersion {
  /** A number that stays the same exactly while nothing has been committed. */
  current(): number;
  close(): void;
}

/** The file a `file:` database URL names, or null for a remote or in-memory database. */
export function databaseFilePath(url: string): string | null {
  if (!url.startsWith('file:')) return null;
  const withoutQuery = url.split('?')[0]!;
  const path = withoutQuery.startsWith('file://')
    ? fileURLToPath(withoutQuery)
    : withoutQuery.slice('file:'.length);
  return path === '' || path === ':memory:' ? null : path;
}

/**
 * A watch on the database at `url`, or null when it is not a local file (then nothing can
 * be cached, as another client could change it unseen).
 */
export function watchDataVersion(url: string): DataVersion | null {
  const path = databaseFilePath(url);
  if (!path) return null;
  const connection = new Database(path, { timeout: 10_000 });
  const statement = connection.prepare('PRAGMA data_version').raw(true);
  return {
    current: () => Number((statement.get() as unknown[])[0]),
    close: () => connection.close(),
  };
}
