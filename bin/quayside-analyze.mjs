#!/usr/bin/env node
// Command-line entry. Runs a bundle of src/lib/audio built with esbuild into
// node_modules/.cache/quayside-cli (rebuilt when a source file is newer), so a run pays no
// TypeScript start-up cost; falls back to tsx when esbuild is not installed.
import { mkdirSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const sourceDir = join(root, 'src', 'lib', 'audio');
const cacheDir = join(root, 'node_modules', '.cache', 'quayside-cli');
const cliBundle = join(cacheDir, 'cli.mjs');
const workerBundle = join(cacheDir, 'analysis-worker.mjs');

function newestSourceMs() {
  let newest = statSync(fileURLToPath(import.meta.url)).mtimeMs;
  for (const name of readdirSync(sourceDir))
    newest = Math.max(newest, statSync(join(sourceDir, name)).mtimeMs);
  return newest;
}

function bundleAgeMs(file) {
  try {
    return statSync(file).mtimeMs;
  } catch {
    return -1;
  }
}

async function ensureBundles() {
  const newest = newestSourceMs();
  if (bundleAgeMs(cliBundle) >= newest && bundleAgeMs(workerBundle) >= newest) return true;
  let esbuild;
  try {
    esbuild = await import('esbuild');
  } catch {
    return false;
  }
  // Built beside the cache and renamed into place, so a concurrent first run never loads a
  // half-written bundle.
  const buildDir = `${cacheDir}.build-${process.pid}`;
  mkdirSync(cacheDir, { recursive: true });
  try {
    await esbuild.build({
      entryPoints: {
        cli: join(sourceDir, 'cli.ts'),
        'analysis-worker': join(sourceDir, 'analysis-worker.ts'),
      },
      outdir: buildDir,
      outExtension: { '.js': '.mjs' },
      bundle: true,
      format: 'esm',
      platform: 'node',
      target: 'node20',
      // Resolved from the project's node_modules at run time; piscina finds its own worker file.
      external: ['piscina', 'music-metadata'],
      logLevel: 'error',
    });
    renameSync(join(buildDir, 'analysis-worker.mjs'), workerBundle);
    renameSync(join(buildDir, 'cli.mjs'), cliBundle);
  } finally {
    rmSync(buildDir, { recursive: true, force: true });
  }
  return true;
}

// `quayside-analyze … | head` closes the pipe early; that is not an error.
process.stdout.on('error', (error) => {
  if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw error;
});

let runCli;
let workerUrl;
if (await ensureBundles()) {
  ({ runCli } = await import(pathToFileURL(cliBundle).href));
  workerUrl = pathToFileURL(workerBundle).href;
} else {
  const { tsImport } = await import('tsx/esm/api');
  ({ runCli } = await tsImport(pathToFileURL(join(sourceDir, 'cli.ts')).href, import.meta.url));
  workerUrl = pathToFileURL(join(sourceDir, 'analysis-worker-tsx.mjs')).href;
}
process.exitCode = await runCli(process.argv.slice(2), workerUrl);
