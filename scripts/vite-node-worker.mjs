// @ts-check
import { existsSync } from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import { pathToFileURL } from 'node:url';

const SUFFIX = '?nodeworker';
const PREFIX = '\0nodeworker:';

/**
 * `import url from './some-worker.ts?nodeworker'` gives the URL of a Node worker-thread module.
 * On `vite build` / `astro build` the worker is emitted as its own chunk and the URL points at
 * it (next to the server bundle, wherever the server is started from). In dev it points at
 * `some-worker-tsx.mjs` beside the source, which loads the TypeScript through tsx.
 * @returns {import('vite').Plugin}
 */
export function nodeWorkerPlugin() {
  let isBuild = false;
  return {
    name: 'quayside-node-worker',
    enforce: 'pre',
    configResolved(config) {
      isBuild = config.command === 'build';
    },
    async resolveId(source, importer) {
      if (!source.endsWith(SUFFIX)) return null;
      const resolved = await this.resolve(source.slice(0, -SUFFIX.length), importer, {
        skipSelf: true,
      });
      return resolved ? PREFIX + resolved.id : null;
    },
    load(id) {
      if (!id.startsWith(PREFIX)) return null;
      const file = id.slice(PREFIX.length);
      if (isBuild) {
        const ref = this.emitFile({ type: 'chunk', id: file, name: basename(file, extname(file)) });
        return `export default import.meta.ROLLUP_FILE_URL_${ref};`;
      }
      const loader = join(dirname(file), `${basename(file, extname(file))}-tsx.mjs`);
      const target = existsSync(loader) ? loader : file;
      return `export default ${JSON.stringify(pathToFileURL(target).href)};`;
    },
  };
}
