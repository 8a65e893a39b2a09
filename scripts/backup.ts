/**
 * `npm run backup [-- <file>]`: a consistent copy of the SQLite database, safe while the
 * server runs. Without a file name it writes `<data>/backups/quayside-<time>.db`.
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { backupDatabase } from '../src/lib/db/backup';
import { projectRoot } from './lib/runtime';

const dataDir = process.env.QUAYSIDE_DATA_DIR ?? join(projectRoot, 'data');
const databaseUrl = process.env.DATABASE_URL ?? pathToFileURL(join(dataDir, 'quayside.db')).href;
const stamp = new Date().toISOString().replace(/[:.]/g, '-');
const destination = process.argv[2] ?? join(dataDir, 'backups', `quayside-${stamp}.db`);

backupDatabase(databaseUrl, destination)
  .then((copy) => {
    console.log(
      `Backed up ${databaseUrl}\n       to ${copy.path} (${copy.bytes} bytes, ${copy.migrations} migrations, integrity ok)`,
    );
  })
  .catch((error) => {
    console.error(`Backup failed: ${error instanceof Error ? error.message : error}`);
    process.exit(1);
  });
