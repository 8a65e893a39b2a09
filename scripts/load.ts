/**
 * `npm run load`: the load measurement on a stack of its own. A fresh temporary data folder
 * (never data/), the S3 and mail fakes on free ports, migrations, the demo seed, a build when
 * the sources changed, and the built server in a child process. Then `runLoad` (see
 * scripts/lib/load.ts): several demo users read the release list, release pages and checks
 * over 50 connections for 30 s while a long master is analysed in the background. Prints
 * requests/s and p50/p95/p99 latency; exits 1 on connection errors, non-2xx answers or wrong
 * JSON (speed is reported, not asserted). Everything is removed at the end, also on Ctrl-C.
 *
 *   npm run load -- [--connections 50] [--duration 30] [--long-file-minutes 60] [--no-analysis]
 *                    [--writes-per-second 0] [--no-read-cache] [--cpu-prof DIR]
 *
 * `--writes-per-second N` has the engineer run the checks of a release up to N times a second
 * during the load (default 0, none): each run is a commit, after which every cached answer is
 * recomputed.
 *
 * `--no-read-cache` starts the server with QUAYSIDE_READ_CACHE=off, so every request reads the
 * database (to see what the read caches are worth).
 *
 * `--cpu-prof DIR` writes a V8 CPU profile of the server process into DIR when it stops
 * (open it in Chrome DevTools or speedscope).
 *
 * The same settings as environment variables: LOAD_CONNECTIONS, LOAD_DURATION,
 * LOAD_LONG_FILE_MINUTES, LOAD_NO_ANALYSIS=1. Set QUAYSIDE_BUILD_DIR to build elsewhere.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { formatLoadReport, longMasterBytes, runLoad, stopLoadClients } from './lib/load';
import {
  buildApp,
  type Fakes,
  freePort,
  migrateDatabase,
  needsBuild,
  prepareEnvironment,
  seedDemoData,
  startAppServer,
} from './lib/runtime';

const { values } = parseArgs({
  options: {
    connections: { type: 'string' },
    duration: { type: 'string' },
    'long-file-minutes': { type: 'string' },
    'no-analysis': { type: 'boolean' },
    'no-read-cache': { type: 'boolean' },
    'writes-per-second': { type: 'string' },
    'cpu-prof': { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  },
});

if (values.help) {
  console.log(
    'npm run load -- [--connections 50] [--duration 30] [--long-file-minutes 60] [--no-analysis] [--writes-per-second 0] [--no-read-cache] [--cpu-prof DIR]',
  );
  process.exit(0);
}

function positiveNumber(name: string, raw: string | undefined, fallback: number): number {
  if (raw === undefined || raw === '') return fallback;
  const value = Number(raw);
  if (!Number.isFinite(value) || value <= 0) {
    console.error(`${name} must be a positive number, not "${raw}"`);
    process.exit(2);
  }
  return value;
}

const connections = Math.round(
  positiveNumber('--connections', values.connections ?? process.env.LOAD_CONNECTIONS, 50),
);
const durationSeconds = positiveNumber(
  '--duration',
  values.duration ?? process.env.LOAD_DURATION,
  30,
);
// An hour (1.04 GB). Idle, the engine reads it in a few seconds, but while 50 connections
// keep the server's event loop busy the analysis advances far more slowly (its audio is
// forwarded to the worker through that loop), so it outlasts a 30 s load; the report says
// whether it did.
const longFileMinutes = positiveNumber(
  '--long-file-minutes',
  values['long-file-minutes'] ?? process.env.LOAD_LONG_FILE_MINUTES,
  60,
);
const cpuProfileDir = values['cpu-prof'] ? resolve(values['cpu-prof']) : null;
const withAnalysis = !(values['no-analysis'] || process.env.LOAD_NO_ANALYSIS === '1');
const readCache = values['no-read-cache'] ? 'off' : 'on';
const writesRaw = values['writes-per-second'] ?? process.env.LOAD_WRITES_PER_SECOND;
const writesPerSecond =
  writesRaw === undefined || writesRaw === '0'
    ? 0
    : positiveNumber('--writes-per-second', writesRaw, 0);
if (withAnalysis) {
  try {
    longMasterBytes(longFileMinutes);
  } catch (error) {
    console.error(error instanceof Error ? error.message : error);
    process.exit(2);
  }
}

let dataDir: string | null = null;
let fakes: Fakes | null = null;
let server: Awaited<ReturnType<typeof startAppServer>> | null = null;
const serverOutput: string[] = [];

function stopServer(): Promise<void> {
  const running = server;
  server = null;
  return running ? running.close() : Promise.resolve();
}

let cleaning: Promise<void> | null = null;
function cleanUp(): Promise<void> {
  cleaning ??= (async () => {
    stopLoadClients();
    await stopServer();
    await fakes?.close();
    if (dataDir) rmSync(dataDir, { recursive: true, force: true });
  })();
  return cleaning;
}

let interrupted = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => {
    interrupted = true;
    console.error(`\n${signal}: stopping the load run and removing its data…`);
    void cleanUp().finally(() => process.exit(130));
  });
}

/** Starts the built server in its own process, keeping its last 40 lines of output. */
async function startServer(port: number): Promise<string> {
  server = await startAppServer({
    port,
    host: '127.0.0.1',
    env: { BETTER_AUTH_URL: `http://localhost:${port}`, QUAYSIDE_READ_CACHE: readCache },
    // serve.mjs exits normally on SIGTERM, which is when V8 writes the profile.
    nodeArgs: cpuProfileDir ? ['--cpu-prof', '--cpu-prof-dir', cpuProfileDir] : [],
    onOutput: (text) => {
      serverOutput.push(...text.split('\n').filter(Boolean));
      serverOutput.splice(0, Math.max(0, serverOutput.length - 40));
    },
  });
  return server.url;
}

async function main(): Promise<number> {
  // A stack of our own: never the user's database, bucket, mail server or secret.
  for (const key of [
    'DATABASE_URL',
    'DATABASE_AUTH_TOKEN',
    'S3_ENDPOINT',
    'SMTP_URL',
    'BETTER_AUTH_URL',
    'BETTER_AUTH_SECRET',
  ])
    delete process.env[key];
  dataDir = mkdtempSync(join(tmpdir(), 'quayside-load-'));
  const port = await freePort();
  fakes = await prepareEnvironment({ dataDir, port });
  await migrateDatabase();
  await seedDemoData();
  console.log(`Data          ${dataDir} (removed at the end)`);
  if (await needsBuild()) {
    console.log('Building      astro build (sources changed since the last build)…');
    await buildApp();
  }
  const url = await startServer(port);
  console.log(`Server        ${url} (its own process; read caches ${readCache})`);

  if (cpuProfileDir)
    console.log(`CPU profile   of the server, into ${cpuProfileDir} when it stops`);
  const result = await runLoad({
    baseUrl: url,
    connections,
    durationSeconds,
    analysis: withAnalysis ? { minutes: longFileMinutes, releaseId: 'rel-tideline' } : null,
    writesPerSecond,
    serverPid: server?.child.pid,
    log: (line) => console.log(line),
  });
  console.log(formatLoadReport(result));
  if (!result.ok && serverOutput.length) {
    console.log('\nLast server output:');
    for (const line of serverOutput.slice(-20)) console.log(`  ${line}`);
  }
  return result.ok ? 0 : 1;
}

main()
  .then(async (code) => {
    await cleanUp();
    process.exit(code);
  })
  .catch(async (error: unknown) => {
    // Stopping on a signal kills the children, which fails the run: the handler exits.
    if (interrupted) return;
    console.error(error instanceof Error ? (error.stack ?? error.message) : error);
    if (serverOutput.length) console.error(`\nLast server output:\n  ${serverOutput.join('\n  ')}`);
    await cleanUp();
    process.exit(1);
  });
