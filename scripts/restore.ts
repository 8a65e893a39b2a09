/**
 * `npm run restore -- <backup file>`: puts a backup made by `npm run backup` in place of
 * the database. Stop the server first. The database it replaces is kept beside it as
 * `quayside.db.replaced-<time>`; objects in S3 are not part of this backup.
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { restoreDatabase } from '../src/lib/db/backup';
import { projectRoot } from './lib/runtime';

const dataDir = process.env.QUAYSIDE_DATA_DIR ?? join(projectRoot, 'data');
const databaseUrl = process.env.DATABASE_URL ?? pathToFileURL(join(dataDir, 'quayside.db')).href;
const backup = process.argv[2];

if (!backup) {
  console.error('Usage: npm run restore -- <backup file>   (stop the server first)');
  process.exit(2);
}

restoreDatabase(backup, databaseUrl)
  .then(({ restored, keptAs }) => {
    console.log(`Restored ${backup} (${restored.bytes} bytes, integrity ok) to ${databaseUrl}`);
    if (keptAs) console.log(`The database it replaced is kept as ${keptAs}`);
  })
  .catch((error) => {
    console.error(`Restore failed: ${error instanceof Error ? error.message : error}`);
    process.exit(1);
  });
