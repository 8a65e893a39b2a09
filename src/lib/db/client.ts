import { createClient } from '@libsql/client';
import { drizzle } from 'drizzle-orm/libsql';
import { getEnv } from '../server/env';
import * as schema from './schema';

export type Database = ReturnType<typeof createDatabase>;
/** A transaction handle, as passed to `db.transaction(async (tx) => …)`. */
export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];

/** Opens the database named by `url` (file:, libsql:, http:) with our schema attached. */
export function createDatabase(url: string, authToken?: string) {
  // Wait for a writer in another process (a second server, a test) rather than fail at once.
  const client = createClient({ url, authToken, timeout: 10_000 });
  return drizzle(client, { schema });
}

let instance: Database | undefined;

/** The process-wide database handle, opened on first use from DATABASE_URL. */
export function getDb(): Database {
  if (!instance) {
    const env = getEnv();
    instance = createDatabase(env.DATABASE_URL, env.DATABASE_AUTH_TOKEN);
  }
  return instance;
}

/** Whether `db` is the process-wide handle (not a script's or test's own, nor a transaction). */
export function isAppDatabase(db: unknown): boolean {
  return instance !== undefined && db === instance;
}
