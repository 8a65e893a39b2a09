/**
 * The long fuzz run: every fuzz target with many more cases than CI runs, then how many
 * cases each target ran, with which seed and how long it took.
 *
 *   npm run fuzz                     # FUZZ_RUNS=20 (×20 the CI counts), a new random seed
 *   npm run fuzz -- --runs 5         # ×5
 *   npm run fuzz -- --runs =3000     # exactly 3000 cases per target
 *   npm run fuzz -- --seed 1234      # replay a seed printed by an earlier run
 *
 * FUZZ_RUNS and FUZZ_SEED in the environment work too. The HTTP target runs against a
 * freshly built server, like every integration test (QUAYSIDE_BUILD_DIR is passed on).
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const projectRoot = fileURLToPath(new URL('..', import.meta.url));

const targets = [
  'tests/unit/metadata/csv-fuzz.test.ts',
  'tests/unit/upload/hostile-names.test.ts',
  'tests/audio/malformed-files.test.ts',
  'tests/integration/http-fuzz.test.ts',
];

function option(name: string): string | undefined {
  const at = process.argv.indexOf(name);
  return at >= 0 ? process.argv[at + 1] : undefined;
}

const runs = option('--runs') ?? process.env.FUZZ_RUNS ?? '20';
const seed =
  option('--seed') ?? process.env.FUZZ_SEED ?? String(Math.floor(Math.random() * 2 ** 31));
const reportDir = mkdtempSync(join(tmpdir(), 'quayside-fuzz-'));
const report = join(reportDir, 'report.jsonl');

console.info(`Fuzzing with FUZZ_RUNS=${runs} FUZZ_SEED=${seed}`);
const started = Date.now();
const child = spawn(
  process.execPath,
  [
    join(projectRoot, 'node_modules/vitest/vitest.mjs'),
    'run',
    // One file at a time: the targets bound each case's time, and the machine is shared.
    '--no-file-parallelism',
    '--project',
    'unit',
    '--project',
    'audio',
    '--project',
    'integration',
    ...targets,
  ],
  {
    cwd: projectRoot,
    stdio: 'inherit',
    env: { ...process.env, FUZZ_RUNS: runs, FUZZ_SEED: seed, FUZZ_REPORT: report },
  },
);
const code: number = await new Promise((resolve) => child.once('exit', (c) => resolve(c ?? 1)));

interface Line {
  name: string;
  cases: number;
  seed: number;
  ms: number;
  failed: boolean;
}
let lines: Line[] = [];
try {
  lines = readFileSync(report, 'utf8')
    .trim()
    .split('\n')
    .filter(Boolean)
    .map((l) => JSON.parse(l) as Line);
} catch {
  // No target reported: vitest failed before running any.
}
rmSync(reportDir, { recursive: true, force: true });

const width = Math.max(10, ...lines.map((l) => l.name.length));
console.info(`\nFuzz targets (FUZZ_RUNS=${runs}, FUZZ_SEED=${seed}):`);
for (const l of lines) {
  const cases = String(l.cases).padStart(8);
  const seconds = (l.ms / 1000).toFixed(1).padStart(7);
  console.info(
    `  ${l.name.padEnd(width)} ${cases} cases ${seconds} s${l.failed ? '  FAILED' : ''}`,
  );
}
const total = lines.reduce((n, l) => n + l.cases, 0);
console.info(
  `  ${'total'.padEnd(width)} ${String(total).padStart(8)} cases in ${((Date.now() - started) / 1000).toFixed(0)} s`,
);
if (code !== 0)
  console.info(`\nA target failed: replay it with FUZZ_SEED=${seed} FUZZ_RUNS=${runs}.`);
process.exit(code);
