// Loads the TypeScript worker through tsx where no build step ran (vitest, `astro dev`).
// `astro build` emits a compiled worker instead (see vite-node-worker.ts).
import { tsImport } from 'tsx/esm/api';

const worker = await tsImport('./analysis-worker.ts', import.meta.url);

export default worker.default;
