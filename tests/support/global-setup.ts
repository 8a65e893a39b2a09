/**
 * Starts the real thing once for the integration and browser tests: a fresh temporary data
 * folder (SQLite file, S3 fake, mail fake), migrations, the demo seed and the built server
 * on a free port. Tests reach it over HTTP and read the same database file.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { TestProject } from 'vitest/node';
import {
  buildApp,
  freePort,
  migrateDatabase,
  needsBuild,
  prepareEnvironment,
  seedDemoData,
  startAppServer,
} from '../../scripts/lib/runtime';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    databaseUrl: string;
    mailUrl: string;
    s3: { endpoint: string; bucket: string };
    dataDir: string;
    /** The environment the server runs with, for tests that start a second server process. */
    serverEnv: Record<string, string>;
  }
}

export default async function setup(project: TestProject) {
  const dataDir = mkdtempSync(join(tmpdir(), 'quayside-test-'));
  for (const key of [
    'DATABASE_URL',
    'S3_ENDPOINT',
    'SMTP_URL',
    'BETTER_AUTH_URL',
    'BETTER_AUTH_SECRET',
  ]) {
    delete process.env[key];
  }
  const port = await freePort();
  const fakes = await prepareEnvironment({ dataDir, port });
  await migrateDatabase();
  await seedDemoData();
  if (await needsBuild()) await buildApp();
  const app = await startAppServer({ port, host: '127.0.0.1' });
  const { url } = app;

  project.provide('baseUrl', url);
  project.provide('databaseUrl', process.env.DATABASE_URL ?? '');
  project.provide('mailUrl', process.env.MAIL_FAKE_URL ?? '');
  project.provide('s3', {
    endpoint: process.env.S3_ENDPOINT ?? '',
    bucket: process.env.S3_BUCKET ?? '',
  });
  project.provide('dataDir', dataDir);
  const serverEnv: Record<string, string> = {};
  for (const key of [
    'DATABASE_URL',
    'BETTER_AUTH_SECRET',
    'S3_ENDPOINT',
    'S3_BUCKET',
    'S3_REGION',
    'S3_ACCESS_KEY_ID',
    'S3_SECRET_ACCESS_KEY',
    'SMTP_URL',
    'MAIL_FAKE_URL',
    'QUAYSIDE_BUILD_DIR',
  ]) {
    const value = process.env[key];
    if (value) serverEnv[key] = value;
  }
  project.provide('serverEnv', serverEnv);

  return async () => {
    await app.close();
    await fakes.close();
    if (!process.env.KEEP_TEST_DATA) rmSync(dataDir, { recursive: true, force: true });
  };
}
