/**
 * A second server process running the built app with the test server's environment (same
 * database, S3 and mail fakes), for tests that must stop a server abruptly.
 */
import { type ChildProcess, spawn } from 'node:child_process';
import { inject } from 'vitest';
import { freePort } from '../../scripts/lib/runtime';

const started: ChildProcess[] = [];

/**
 * Starts `scripts/serve.mjs` in its own process.
 * `env` overrides the test server's settings, e.g. another database or S3 endpoint.
 */
export async function startServerProcess(
  options: { env?: Record<string, string> } = {},
): Promise<{ child: ChildProcess; url: string; output: () => string }> {
  const port = await freePort();
  const url = `http://localhost:${port}`;
  const child = spawn(process.execPath, ['scripts/serve.mjs'], {
    env: {
      ...process.env,
      ...inject('serverEnv'),
      ...options.env,
      PORT: String(port),
      BETTER_AUTH_URL: url,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  started.push(child);
  // What the server printed, for tests that check its logs or explain its failure.
  const printed: Buffer[] = [];
  child.stdout?.on('data', (chunk: Buffer) => printed.push(chunk));
  child.stderr?.on('data', (chunk: Buffer) => printed.push(chunk));
  const output = () => Buffer.concat(printed).toString('utf8');
  for (let i = 0; i < 150; i++) {
    const ok = await fetch(`${url}/sign-in`)
      .then((r) => r.ok)
      .catch(() => false);
    if (ok) return { child, url, output };
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('the second server did not start');
}

/** Stops a server process at once, as a crash would. */
export function killServerProcess(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once('exit', () => resolve());
    child.kill('SIGKILL');
  });
}

/** Kills every server process this test file started (for afterAll). */
export async function killAllServerProcesses(): Promise<void> {
  await Promise.all(started.map(killServerProcess));
}
