/**
 * Finds (or installs) the independent implementations the audio tests compare against:
 * Debian's ffmpeg (`ebur128` filter) and libebur128 through a tiny C program compiled here.
 * Missing tools are installed with apt-get when running as root; otherwise the tests fail
 * with a message saying what to install. They are never skipped.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const APT_PACKAGES = ['ffmpeg', 'libebur128-dev', 'libsndfile1-dev', 'gcc', 'libc6-dev'];

function hasCommand(command: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${command}`], { stdio: 'ignore' }).status === 0;
}

function hasHeaders(): boolean {
  return existsSync('/usr/include/ebur128.h') && existsSync('/usr/include/sndfile.h');
}

let ensured = false;

/** Makes sure ffmpeg, gcc and the libebur128/libsndfile headers are present. */
export function ensureReferenceTools(): void {
  if (ensured) return;
  const missing = !hasCommand('ffmpeg') || !hasCommand('gcc') || !hasHeaders();
  if (missing) {
    const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
    if (!isRoot || !hasCommand('apt-get')) {
      throw new Error(
        `The audio reference tests need ffmpeg, gcc, libebur128-dev and libsndfile1-dev. Install them with: apt-get install -y ${APT_PACKAGES.join(' ')}`,
      );
    }
    execFileSync('apt-get', ['update'], { stdio: 'ignore' });
    execFileSync('apt-get', ['install', '-y', '--no-install-recommends', ...APT_PACKAGES], {
      stdio: 'ignore',
      env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
    });
    if (!hasCommand('ffmpeg') || !hasCommand('gcc') || !hasHeaders()) {
      throw new Error(`apt-get could not provide ${APT_PACKAGES.join(', ')}.`);
    }
  }
  ensured = true;
}

// Reads any file libsndfile knows as float frames and prints libebur128's I, LRA, true peak
// and sample peak (maximum over channels, dB) as JSON.
const PROGRAM = `
#include <ebur128.h>
#include <math.h>
#include <sndfile.h>
#include <stdio.h>
#include <stdlib.h>

int main(int argc, char **argv) {
  SF_INFO info = {0};
  SNDFILE *file = sf_open(argv[1], SFM_READ, &info);
  if (!file) { fprintf(stderr, "cannot open %s\\n", argv[1]); return 1; }
  ebur128_state *st = ebur128_init((unsigned) info.channels, (unsigned long) info.samplerate,
      EBUR128_MODE_I | EBUR128_MODE_LRA | EBUR128_MODE_TRUE_PEAK | EBUR128_MODE_SAMPLE_PEAK);
  if (info.channels == 5) {
    ebur128_set_channel(st, 3, EBUR128_LEFT_SURROUND);
    ebur128_set_channel(st, 4, EBUR128_RIGHT_SURROUND);
  }
  float *buffer = malloc(sizeof(float) * 4096 * info.channels);
  sf_count_t got;
  while ((got = sf_readf_float(file, buffer, 4096)) > 0) ebur128_add_frames_float(st, buffer, (size_t) got);
  double integrated, range, peak, max_tp = 0, max_sp = 0;
  ebur128_loudness_global(st, &integrated);
  ebur128_loudness_range(st, &range);
  for (int c = 0; c < info.channels; c++) {
    ebur128_true_peak(st, (unsigned) c, &peak);
    if (peak > max_tp) max_tp = peak;
    ebur128_sample_peak(st, (unsigned) c, &peak);
    if (peak > max_sp) max_sp = peak;
  }
  printf("{\\"integratedLufs\\": %.6f, \\"rangeLu\\": %.6f, \\"truePeakDbtp\\": %.6f, \\"samplePeakDbfs\\": %.6f}\\n",
      integrated, range, 20 * log10(max_tp), 20 * log10(max_sp));
  sf_close(file);
  ebur128_destroy(&st);
  free(buffer);
  return 0;
}
`;

let compiled: string | null = null;

function compileLibebur128Program(): string {
  if (compiled) return compiled;
  const dir = mkdtempSync(join(tmpdir(), 'quayside-ebur128-'));
  const source = join(dir, 'measure.c');
  const binary = join(dir, 'measure');
  writeFileSync(source, PROGRAM);
  execFileSync('gcc', ['-O2', '-o', binary, source, '-lebur128', '-lsndfile', '-lm']);
  compiled = binary;
  return binary;
}

export interface ReferenceReading {
  integratedLufs: number;
  rangeLu: number;
  truePeakDbtp: number;
  samplePeakDbfs: number;
}

export function measureWithLibebur128(path: string): ReferenceReading {
  ensureReferenceTools();
  const output = execFileSync(compileLibebur128Program(), [path], { encoding: 'utf8' });
  return JSON.parse(output) as ReferenceReading;
}

/** ffmpeg's ebur128 summary (values printed to one decimal). */
export function measureWithFfmpeg(path: string): { integratedLufs: number; rangeLu: number } {
  ensureReferenceTools();
  const result = spawnSync(
    'ffmpeg',
    [
      '-hide_banner',
      '-nostats',
      '-i',
      path,
      '-af',
      'ebur128=peak=true:framelog=verbose',
      '-f',
      'null',
      '-',
    ],
    { encoding: 'utf8', maxBuffer: 256 << 20 },
  );
  if (result.status !== 0)
    throw new Error(`ffmpeg failed on ${path}: ${result.stderr.slice(-2000)}`);
  const summary = result.stderr.slice(result.stderr.lastIndexOf('Summary:'));
  const integrated = /I:\s+(-?[\d.]+) LUFS/u.exec(summary);
  const range = /LRA:\s+(-?[\d.]+) LU/u.exec(summary);
  if (!integrated || !range)
    throw new Error(`Could not read ffmpeg's ebur128 summary:\n${summary}`);
  return { integratedLufs: Number(integrated[1]), rangeLu: Number(range[1]) };
}

/** Runs ffmpeg to convert or encode a test file (e.g. make a FLAC for the refusal tests). */
export function runFfmpeg(args: string[]): void {
  ensureReferenceTools();
  execFileSync('ffmpeg', ['-hide_banner', '-loglevel', 'error', '-y', ...args]);
}
