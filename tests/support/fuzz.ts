/**
 * One knob for every fuzz test: a fixed seed and a bounded number of cases by default (fast
 * enough for CI), many more in the long run (`npm run fuzz`).
 *
 * - `FUZZ_RUNS=20` (or `20x`) multiplies each target's default count by 20;
 *   `FUZZ_RUNS==5000` runs exactly 5000 cases per target.
 * - `FUZZ_SEED=123` replays one seed; `FUZZ_SEED=random` draws one (printed with the counts).
 * - `FUZZ_REPORT=<file>` appends one JSON line per target (name, cases, seed, milliseconds),
 *   which scripts/fuzz.ts reads to print its summary.
 *
 * A failure prints fast-check's report: the seed, the path and the shrunk counterexample, so
 * `FUZZ_SEED=<seed>` reproduces it.
 */
import { appendFileSync } from 'node:fs';
import fc from 'fast-check';

/** The seed used when FUZZ_SEED is not set, so CI runs the same cases every time. */
export const DEFAULT_FUZZ_SEED = 20_260_102;

function readRunsSetting(raw: string | undefined): { kind: 'times' | 'exactly'; value: number } {
  const text = (raw ?? '').trim();
  if (text === '') return { kind: 'times', value: 1 };
  const exactly = /^=(\d+)$/.exec(text);
  if (exactly) return { kind: 'exactly', value: Math.max(1, Number(exactly[1])) };
  const times = /^(\d+(?:\.\d+)?)x?$/i.exec(text);
  if (times && Number(times[1]) > 0) return { kind: 'times', value: Number(times[1]) };
  throw new Error(`FUZZ_RUNS=${raw} is not a multiplier (e.g. 20 or 20x) or a count (=5000).`);
}

function readSeedSetting(raw: string | undefined): number {
  const text = (raw ?? '').trim();
  if (text === '') return DEFAULT_FUZZ_SEED;
  if (text === 'random') return Math.floor(Math.random() * 2 ** 31);
  if (/^-?\d+$/.test(text)) return Number(text) | 0;
  throw new Error(`FUZZ_SEED=${raw} is not an integer or "random".`);
}

const runsSetting = readRunsSetting(process.env.FUZZ_RUNS);
// Drawn once per test file, so every target of a file reports the same seed.
const seed = readSeedSetting(process.env.FUZZ_SEED);

/** Cases for a target whose CI default is `base`, after FUZZ_RUNS. */
export function fuzzRuns(base: number): number {
  return runsSetting.kind === 'exactly'
    ? runsSetting.value
    : Math.max(1, Math.round(base * runsSetting.value));
}

/** The multiplier in force (1 by default; for budgets that scale with the run count). */
export function fuzzScale(): number {
  return runsSetting.kind === 'exactly' ? 1 : runsSetting.value;
}

/** A test timeout for a fuzz test that needs `baseMs` at the default count. */
export function fuzzTimeout(baseMs: number): number {
  return Math.round(baseMs * Math.max(1, fuzzScale()));
}

/** The seed in force: FUZZ_SEED, or the fixed default. */
export function fuzzSeed(): number {
  return seed;
}

function report(name: string, details: fc.RunDetails<unknown>, ms: number): void {
  const line = {
    name,
    cases: details.numRuns,
    skipped: details.numSkips,
    seed: details.seed,
    ms: Math.round(ms),
    failed: details.failed,
  };
  if (process.env.FUZZ_REPORT) appendFileSync(process.env.FUZZ_REPORT, `${JSON.stringify(line)}\n`);
  if (process.env.FUZZ_VERBOSE) {
    console.info(`[fuzz] ${name}: ${line.cases} cases, seed ${line.seed}, ${line.ms} ms`);
  }
}

/**
 * Runs `property` for `fuzzRuns(baseRuns)` cases with the seed in force, records how many ran,
 * and throws fast-check's own report on failure. Answers the number of cases run.
 */
export async function runFuzz<T>(
  name: string,
  property: fc.IProperty<T> | fc.IAsyncProperty<T>,
  baseRuns: number,
  parameters: Omit<fc.Parameters<T>, 'numRuns' | 'seed'> = {},
): Promise<number> {
  const started = performance.now();
  const details = await fc.check(property as fc.IAsyncProperty<T>, {
    ...parameters,
    numRuns: fuzzRuns(baseRuns),
    seed,
  });
  report(name, details as fc.RunDetails<unknown>, performance.now() - started);
  if (details.failed) {
    const cause = details.errorInstance;
    const why = cause instanceof Error ? cause.message : String(cause);
    throw new Error(`${fc.defaultReportMessage(details)}\n\nThe property failed with: ${why}`, {
      cause,
    });
  }
  return details.numRuns;
}
