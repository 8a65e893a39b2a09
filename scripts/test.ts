/**
 * `npm test`: the whole suite, in the order a reviewer would want to stop at the first
 * problem: formatting and lint (biome), types (astro check), a build of the app when the
 * sources changed, Chromium for the browser tests (installed from Debian's packages when we
 * are root, otherwise a clear failure), then every vitest project: unit, audio, integration
 * and browser. Extra arguments go to vitest (e.g. `npm test -- --project unit`).
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { ensureChromium } from '../tests/support/system-packages';
import { buildApp, needsBuild, projectRoot } from './lib/runtime';

const bin = (name: string) => join(projectRoot, 'node_modules', '.bin', name);

function step(title: string, command: string, args: string[]): void {
  console.log(`\n▶ ${title}`);
  const result = spawnSync(command, args, {
    cwd: projectRoot,
    stdio: 'inherit',
    env: { ...process.env, ASTRO_TELEMETRY_DISABLED: '1' },
  });
  if (result.status !== 0) {
    console.error(`\n✖ ${title} failed (exit ${result.status ?? result.signal}).`);
    process.exit(result.status ?? 1);
  }
}

async function main() {
  step('Format and lint (biome)', bin('biome'), ['check', '.']);
  step('Types (astro check)', bin('astro'), ['check', '--minimumSeverity', 'warning']);
  if (await needsBuild()) {
    console.log('\n▶ Build (astro build)');
    await buildApp();
  }
  console.log('\n▶ Chromium for the browser tests');
  console.log(`  using ${ensureChromium()}`);
  step('Tests (vitest: unit, audio, integration, browser)', bin('vitest'), [
    'run',
    ...process.argv.slice(2),
  ]);
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
