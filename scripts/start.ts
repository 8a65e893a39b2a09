/**
 * `npm start`: everything a new machine needs to run Quayside locally — migrated database,
 * demo data, the S3 and mail fakes (unless S3_ENDPOINT / SMTP_URL are set), a build when
 * the sources changed, and the server on http://localhost:4321. Ctrl-C stops it all.
 */
import { join } from 'node:path';
import {
  buildApp,
  migrateDatabase,
  needsBuild,
  prepareEnvironment,
  projectRoot,
  seedDemoData,
  startAppServer,
} from './lib/runtime';

const port = Number(process.env.PORT ?? 4321);
const host = process.env.HOST ?? '127.0.0.1';
const dataDir = process.env.QUAYSIDE_DATA_DIR ?? join(projectRoot, 'data');

async function main() {
  const fakes = await prepareEnvironment({
    dataDir,
    port,
    s3Port: Number(process.env.S3_FAKE_PORT ?? 4569),
    smtpPort: Number(process.env.SMTP_FAKE_PORT ?? 2525),
    mailHttpPort: Number(process.env.MAIL_FAKE_HTTP_PORT ?? 4570),
  });
  let stopping = false;
  let app: Awaited<ReturnType<typeof startAppServer>> | null = null;
  const stop = async (signal: string, code = 0) => {
    if (stopping) return;
    stopping = true;
    console.log(`\n${signal}: stopping Quayside…`);
    await app?.close();
    await fakes.close();
    process.exit(code);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));

  if (fakes.s3)
    console.log(
      `S3 fake       ${fakes.s3.endpoint} (bucket ${fakes.s3.bucket}, files in ${join(dataDir, 's3')})`,
    );
  if (fakes.mail)
    console.log(`Mail fake     ${fakes.mail.smtpUrl} (messages at ${fakes.mail.httpUrl}/messages)`);

  await migrateDatabase();
  console.log(`Database      ${process.env.DATABASE_URL} (migrated)`);
  const seeded = await seedDemoData();
  console.log(
    `Demo data     ${seeded.created ? 'created' : 'already present'}${seeded.uploaded ? `, ${seeded.uploaded} audio files uploaded` : ''}`,
  );

  if (await needsBuild()) {
    console.log('Building      astro build (sources changed since the last build)…');
    await buildApp();
  }
  app = await startAppServer({ port, host });
  const { url } = app;
  app.child.once('exit', (code) => void stop(`The server stopped (exit ${code})`, 1));
  const publicUrl = process.env.BETTER_AUTH_URL ?? url;
  console.log(`\nQuayside is running at ${publicUrl}\n`);
  console.log('Demo sign-ins (password for all: %s)', seeded.password);
  for (const u of seeded.users)
    console.log(`  ${u.role.padEnd(12)} ${u.email.padEnd(30)} ${u.name}`);
  if (fakes.mail) console.log(`\nSent mail:    ${publicUrl}/dev/mail`);
  console.log('\nPress Ctrl-C to stop.');
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
