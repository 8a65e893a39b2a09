/**
 * A second server process running the built app with the test server's environment (same
 * database, S3 and mail fakes), for tests that must stop a server abruptly.
 */
import type { ChildProcess } from 'node:child_process';
import { inject } from 'vitest';
import { freePort, startAppServer } from '../../scripts/lib/runtime';

const started: ChildProcess[] = [];

/**
 * Starts `scripts/serve.mjs` in its own process. `env` overrides the test server's settings,
 * e.g. another database or S3 endpoint. `output()` is everything it printed so far, for
 * tests that check its logs or explain its failure.
 */
export async function startServerProcess(
  options: { env?: Record<string, string> } = {},
): Promise<{ child: ChildProcess; url: string; output: () => string }> {
  const port = await freePort();
  const url = `http://localhost:${port}`;
  let printed = '';
  const app = await startAppServer({
    port,
    host: '127.0.0.1',
    env: { ...inject('serverEnv'), ...options.env, BETTER_AUTH_URL: url },
    onOutput: (text) => {
      printed += text;
    },
  });
  started.push(app.child);
  return { child: app.child, url, output: () => printed };
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
