/**
 * Everything `npm start` and the test harness share: configuration with defaults, the
 * local fakes, migrations, demo data, the build and the HTTP server. Paths are resolved
 * from this file, never from the current directory.
 */
import { type ChildProcess, spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { readdir, stat } from 'node:fs/promises';
import { createServer as createNetServer } from 'node:net';
import { join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { migrate } from 'drizzle-orm/libsql/migrator';
import { type MailFake, startMailFake } from '../../fakes/mail/index';
import { type S3Fake, startS3Fake } from '../../fakes/s3/index';

export const projectRoot = fileURLToPath(new URL('../../', import.meta.url));

/** Where `astro build` writes (QUAYSIDE_BUILD_DIR, as in astro.config.mjs). */
export const buildDir = resolve(projectRoot, process.env.QUAYSIDE_BUILD_DIR ?? 'dist');

export interface Fakes {
  s3?: S3Fake;
  mail?: MailFake;
  close(): Promise<void>;
}

/** A TCP port on 127.0.0.1 that nothing listens on right now. */
export function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const probe = createNetServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const address = probe.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      probe.close(() => resolvePort(port));
    });
  });
}

/** Reads the secret kept in the data folder, creating it on first use. */
function loadOrCreateSecret(dataDir: string): string {
  const file = join(dataDir, 'auth-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  const secret = randomBytes(32).toString('base64url');
  writeFileSync(file, `${secret}\n`, { mode: 0o600 });
  return secret;
}

/**
 * Fills in the environment for a local run: database under `dataDir`, a persistent auth
 * secret, and our S3 and mail fakes unless S3_ENDPOINT / SMTP_URL point elsewhere.
 */
export async function prepareEnvironment(options: {
  dataDir: string;
  port: number;
  s3Port?: number;
  smtpPort?: number;
  mailHttpPort?: number;
}): Promise<Fakes> {
  const { dataDir } = options;
  mkdirSync(dataDir, { recursive: true });
  const env = process.env;
  env.DATABASE_URL ??= pathToFileURL(join(dataDir, 'quayside.db')).href;
  env.BETTER_AUTH_SECRET ??= loadOrCreateSecret(dataDir);
  env.BETTER_AUTH_URL ??= `http://localhost:${options.port}`;
  env.S3_BUCKET ??= 'quayside';
  env.ASTRO_TELEMETRY_DISABLED = '1';

  const fakes: Fakes = {
    async close() {
      await Promise.allSettled([fakes.s3?.close(), fakes.mail?.close()]);
    },
  };
  if (!env.S3_ENDPOINT) {
    fakes.s3 = await startS3Fake({
      directory: join(dataDir, 's3'),
      bucket: env.S3_BUCKET,
      port: options.s3Port,
    });
    env.S3_ENDPOINT = fakes.s3.endpoint;
    env.S3_ACCESS_KEY_ID = 'S3RVER';
    env.S3_SECRET_ACCESS_KEY = 'S3RVER';
  }
  if (!env.SMTP_URL) {
    fakes.mail = await startMailFake({
      directory: join(dataDir, 'mail'),
      smtpPort: options.smtpPort,
      httpPort: options.mailHttpPort,
    });
    env.SMTP_URL = fakes.mail.smtpUrl;
    env.MAIL_FAKE_URL = fakes.mail.httpUrl;
  }
  return fakes;
}

/** Applies the committed drizzle migrations to DATABASE_URL. */
export async function migrateDatabase(): Promise<void> {
  const { createDatabase } = await import('../../src/lib/db/client');
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set');
  const db = createDatabase(url, process.env.DATABASE_AUTH_TOKEN);
  if (url.startsWith('file:')) await db.run('PRAGMA journal_mode = WAL');
  await migrate(db, { migrationsFolder: join(projectRoot, 'drizzle') });
}

/** Seeds the demo scenario (idempotent) and returns the demo sign-ins. */
export async function seedDemoData() {
  const [{ getDb }, { createAuth }, { getS3 }, { seedDemo, demoPassword }] = await Promise.all([
    import('../../src/lib/db/client'),
    import('../../src/lib/auth/auth'),
    import('../../src/lib/storage/s3'),
    import('../../seeds/demo'),
  ]);
  const db = getDb();
  const result = await seedDemo({ db, auth: createAuth(db), s3: getS3() });
  return { ...result, password: demoPassword };
}

async function newestMtime(dir: string): Promise<number> {
  let newest = 0;
  for (const entry of await readdir(dir, { withFileTypes: true, recursive: true })) {
    if (!entry.isFile()) continue;
    const path = join(entry.parentPath, entry.name);
    newest = Math.max(newest, (await stat(path)).mtimeMs);
  }
  return newest;
}

/** True when dist/ is missing or older than any source the build reads. */
export async function needsBuild(): Promise<boolean> {
  const entry = join(buildDir, 'server/entry.mjs');
  if (!existsSync(entry)) return true;
  const built = statSync(entry).mtimeMs;
  const inputs = ['src', 'public', 'astro.config.mjs', 'package-lock.json'];
  for (const input of inputs) {
    const path = join(projectRoot, input);
    if (!existsSync(path)) continue;
    const mtime = statSync(path).isDirectory() ? await newestMtime(path) : statSync(path).mtimeMs;
    if (mtime > built) return true;
  }
  return false;
}

/** Runs `astro build` in the project root, streaming its output. */
export function buildApp(): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(
      process.execPath,
      [join(projectRoot, 'node_modules/astro/astro.js'), 'build'],
      {
        cwd: projectRoot,
        stdio: ['ignore', 'inherit', 'inherit'],
        env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
      },
    );
    child.once('error', reject);
    child.once('exit', (code) =>
      code === 0 ? resolve() : reject(new Error(`astro build exited with ${code}`)),
    );
  });
}

/**
 * Starts the built app in a child process (`scripts/serve.mjs`, plain JavaScript, so no
 * TypeScript loader sits on its requests) with this process's environment plus `env`, and
 * resolves once it listens. Its output goes to this process's, or to `onOutput`. `close()`
 * stops it (SIGTERM, then SIGKILL after 5 s); so does this process exiting.
 */
export async function startAppServer(options: {
  port: number;
  host: string;
  env?: Record<string, string>;
  /** Extra `node` flags, e.g. `--cpu-prof`. */
  nodeArgs?: string[];
  onOutput?: (text: string) => void;
}): Promise<{ url: string; child: ChildProcess; close(): Promise<void> }> {
  const child = spawn(
    process.execPath,
    [...(options.nodeArgs ?? []), join(projectRoot, 'scripts/serve.mjs')],
    {
      cwd: projectRoot,
      env: { ...process.env, ...options.env, PORT: String(options.port), HOST: options.host },
      stdio: ['ignore', 'pipe', options.onOutput ? 'pipe' : 'inherit'],
    },
  );
  const killOnExit = () => child.kill('SIGTERM');
  process.once('exit', killOnExit);
  child.once('exit', () => process.off('exit', killOnExit));
  const show = options.onOutput ?? ((text: string) => process.stdout.write(text));
  child.stderr?.on('data', (chunk: Buffer) => show(chunk.toString('utf8')));
  const url = await new Promise<string>((resolveUrl, reject) => {
    let pending = '';
    child.stdout?.on('data', (chunk: Buffer) => {
      const text = chunk.toString('utf8');
      show(text);
      pending += text;
      const found = pending.match(/Quayside is serving at (\S+)/);
      if (found?.[1]) resolveUrl(found[1]);
    });
    child.once('exit', (code) => reject(new Error(`the server stopped at start (exit ${code})`)));
  });
  const close = () =>
    new Promise<void>((done) => {
      if (child.exitCode !== null || child.signalCode !== null) return done();
      const force = setTimeout(() => child.kill('SIGKILL'), 5_000);
      child.once('exit', () => {
        clearTimeout(force);
        done();
      });
      child.kill('SIGTERM');
    });
  return { url, child, close };
}
