/**
 * Serves the built app (`QUAYSIDE_BUILD_DIR`, default dist/) with the environment as given:
 * no fakes, no migrations, no seed. Plain JavaScript on purpose: the server process runs
 * without a TypeScript loader, whose module hooks would otherwise sit on every request
 * (Astro imports each page module per request). `npm start` and the tests start it as a
 * child process; deployments run `npm run serve` after `npm run build` and migrations.
 */
import { createServer } from 'node:http';
import { join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = fileURLToPath(new URL('../', import.meta.url));
const buildDir = resolve(root, process.env.QUAYSIDE_BUILD_DIR ?? 'dist');
const port = Number(process.env.PORT ?? 4321);
const host = process.env.HOST ?? '127.0.0.1';

process.env.ASTRO_NODE_AUTOSTART = 'disabled';

try {
  const { handler } = await import(pathToFileURL(join(buildDir, 'server/entry.mjs')).href);
  const server = createServer((req, res) => handler(req, res));
  // Uploads of several GB stream for minutes: no whole-request timeout, only for headers.
  server.requestTimeout = 0;
  server.headersTimeout = 60_000;
  server.keepAliveTimeout = 5_000;
  await new Promise((done, fail) => {
    server.once('error', fail);
    server.listen(port, host, () => done(undefined));
  });
  const address = server.address();
  const bound = typeof address === 'object' && address ? address.port : port;
  // One request of our own before saying we are ready: it loads the app's modules and starts
  // its background work (mail retries, recovery of interrupted builds), which the middleware
  // starts on the first request, so a restarted server with no visitors still sends its mail.
  const self = host === '0.0.0.0' || host === '::' ? '127.0.0.1' : host;
  const selfUrl = `http://${self.includes(':') ? `[${self}]` : self}:${bound}/sign-in`;
  const warm = await fetch(selfUrl).catch((error) => error);
  if (warm instanceof Error || !warm.ok) {
    throw new Error(`the app did not answer its first request: ${warm.message ?? warm.status}`);
  }
  console.log(`Quayside is serving at http://localhost:${bound}`);
  const stop = () => {
    server.closeAllConnections();
    server.close(() => process.exit(0));
  };
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
}
