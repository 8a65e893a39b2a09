/**
 * Serves an already built app with the environment as given: no fakes, no migrations, no
 * seed. For deployments (after `npm run build` and migrations) and for tests that need a
 * second server process they can stop abruptly.
 */
import { startAppServer } from './lib/runtime';

const port = Number(process.env.PORT ?? 4321);
const host = process.env.HOST ?? '127.0.0.1';

startAppServer({ port, host })
  .then(({ url }) => console.log(`Quayside is serving at ${url}`))
  .catch((error) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  });
