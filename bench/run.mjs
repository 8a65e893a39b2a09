// `npm run bench`: our command-line analysis against ffmpeg's ebur128 (loudness + true peak)
// on 10-minute stereo files, run alternately; prints wall time, × real time, peak RSS and the
// median ratio ours/ffmpeg per file. Files are generated once into the OS temp directory.
import { spawnSync } from 'node:child_process';
import { createWriteStream, existsSync, mkdirSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const cli = join(root, 'bin', 'quayside-analyze.mjs');
const dir = join(tmpdir(), 'quayside-bench');
const DURATION_SECONDS = 600;
const RUNS = Number(process.env.BENCH_RUNS ?? 5);
const FILES = [
  { name: 'stereo-16bit-44k1.wav', sampleRateHz: 44_100, bits: 16 },
  { name: 'stereo-24bit-44k1.wav', sampleRateHz: 44_100, bits: 24 },
  { name: 'stereo-24bit-96k.wav', sampleRateHz: 96_000, bits: 24 },
];

function wavHeader(sampleRateHz, bits, frames) {
  const channels = 2;
  const blockAlign = channels * (bits / 8);
  const dataBytes = frames * blockAlign;
  const header = Buffer.alloc(44);
  header.write('RIFF', 0);
  header.writeUInt32LE(36 + dataBytes, 4);
  header.write('WAVE', 8);
  header.write('fmt ', 12);
  header.writeUInt32LE(16, 16);
  header.writeUInt16LE(1, 20);
  header.writeUInt16LE(channels, 22);
  header.writeUInt32LE(sampleRateHz, 24);
  header.writeUInt32LE(sampleRateHz * blockAlign, 28);
  header.writeUInt16LE(blockAlign, 32);
  header.writeUInt16LE(bits, 34);
  header.write('data', 36);
  header.writeUInt32LE(dataBytes, 40);
  return header;
}

/** Stereo pink noise (Paul Kellet's filter, common practice) about −14.6 dBFS RMS, with a 1 kHz sine burst every 10 s. */
async function generate(path, sampleRateHz, bits) {
  const frames = DURATION_SECONDS * sampleRateHz;
  const out = createWriteStream(path);
  const write = (buffer) =>
    new Promise((resolve, reject) =>
      out.write(buffer, (error) => (error ? reject(error) : resolve())),
    );
  await write(wavHeader(sampleRateHz, bits, frames));
  const bytesPerSample = bits / 8;
  const chunkFrames = 65_536;
  const state = [new Float64Array(7), new Float64Array(7)];
  let seed = 0x1234567;
  const random = () => {
    seed = (Math.imul(seed, 1_103_515_245) + 12_345) >>> 0;
    return seed / 2 ** 31 - 1;
  };
  const full = 2 ** (bits - 1) - 1;
  for (let start = 0; start < frames; start += chunkFrames) {
    const n = Math.min(chunkFrames, frames - start);
    const buffer = Buffer.alloc(n * 2 * bytesPerSample);
    for (let i = 0; i < n; i++) {
      const t = (start + i) / sampleRateHz;
      const burst = t % 10 < 0.5 ? 0.3 * Math.sin(2 * Math.PI * 1000 * t) : 0;
      for (let c = 0; c < 2; c++) {
        const b = state[c];
        const white = random();
        b[0] = 0.99886 * b[0] + white * 0.0555179;
        b[1] = 0.99332 * b[1] + white * 0.0750759;
        b[2] = 0.969 * b[2] + white * 0.153852;
        b[3] = 0.8665 * b[3] + white * 0.3104856;
        b[4] = 0.55 * b[4] + white * 0.5329522;
        b[5] = -0.7616 * b[5] - white * 0.016898;
        const pink = (b[0] + b[1] + b[2] + b[3] + b[4] + b[5] + b[6] + white * 0.5362) * 0.07;
        b[6] = white * 0.115926;
        const value = Math.max(-1, Math.min(1, pink + burst));
        const code = Math.round(value * full);
        const offset = (i * 2 + c) * bytesPerSample;
        if (bits === 16) buffer.writeInt16LE(code, offset);
        else buffer.writeIntLE(code, offset, 3);
      }
    }
    await write(buffer);
  }
  await new Promise((resolve) => out.end(resolve));
}

const timeBinary = existsSync('/usr/bin/time') ? '/usr/bin/time' : null;

/** Runs a command once; wall time in seconds and peak RSS in MiB (null without /usr/bin/time). */
function measure(command, args) {
  const started = process.hrtime.bigint();
  const result = timeBinary
    ? spawnSync(timeBinary, ['-f', '%M', command, ...args], {
        encoding: 'utf8',
        maxBuffer: 64 << 20,
      })
    : spawnSync(command, args, { encoding: 'utf8', maxBuffer: 64 << 20 });
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  if (result.status !== 0) {
    throw new Error(`${command} ${args.join(' ')} failed (${result.status}):\n${result.stderr}`);
  }
  const lines = result.stderr.trim().split('\n');
  const rssMiB = timeBinary ? Number(lines[lines.length - 1]) / 1024 : null;
  return { seconds, rssMiB };
}

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

const ffmpeg = spawnSync('ffmpeg', ['-version']).status === 0 ? 'ffmpeg' : null;
if (!ffmpeg) {
  console.error(
    'ffmpeg is not installed (apt-get install -y ffmpeg); it is the reference the bench compares with.',
  );
  process.exit(1);
}
mkdirSync(dir, { recursive: true });
for (const file of FILES) {
  const path = join(dir, file.name);
  const expected = 44 + DURATION_SECONDS * file.sampleRateHz * 2 * (file.bits / 8);
  if (!existsSync(path) || statSync(path).size !== expected) {
    process.stderr.write(`generating ${path}…\n`);
    await generate(path, file.sampleRateHz, file.bits);
  }
}

const ours = (path) => ['node', [cli, path]];
const theirs = (path) => [
  ffmpeg,
  ['-hide_banner', '-nostats', '-i', path, '-af', 'ebur128=peak=true', '-f', 'null', '-'],
];
const rows = [];
for (const file of FILES) {
  const path = join(dir, file.name);
  // Warm-up: page cache, and the CLI bundle built on first use.
  measure(...ours(path));
  measure(...theirs(path));
  const runs = { ours: [], theirs: [], ratios: [] };
  for (let run = 0; run < RUNS; run++) {
    const a = measure(...ours(path));
    const b = measure(...theirs(path));
    runs.ours.push(a);
    runs.theirs.push(b);
    runs.ratios.push(a.seconds / b.seconds);
  }
  const row = {
    file: file.name,
    megabytes: statSync(path).size / 1e6,
    oursSeconds: median(runs.ours.map((r) => r.seconds)),
    ffmpegSeconds: median(runs.theirs.map((r) => r.seconds)),
    oursRssMiB: Math.max(...runs.ours.map((r) => r.rssMiB ?? 0)),
    ffmpegRssMiB: Math.max(...runs.theirs.map((r) => r.rssMiB ?? 0)),
    ratio: median(runs.ratios),
  };
  rows.push(row);
  process.stderr.write(`${file.name}: ratios ${runs.ratios.map((r) => r.toFixed(2)).join(' ')}\n`);
}

const rss = (v) => (timeBinary ? `${v.toFixed(0)} MiB` : 'n/a');
console.log(
  `\n${RUNS} alternating runs per file after one warm-up; medians; ×RT = ${DURATION_SECONDS} s of audio ÷ wall time.`,
);
console.log(
  '| file | size | ours wall | ours ×RT | ours peak RSS | ffmpeg wall | ffmpeg ×RT | ffmpeg peak RSS | ratio ours/ffmpeg |',
);
console.log('|---|---|---|---|---|---|---|---|---|');
for (const r of rows) {
  console.log(
    `| ${r.file} | ${r.megabytes.toFixed(0)} MB | ${r.oursSeconds.toFixed(2)} s | ${(DURATION_SECONDS / r.oursSeconds).toFixed(0)}× | ${rss(r.oursRssMiB)} | ${r.ffmpegSeconds.toFixed(2)} s | ${(DURATION_SECONDS / r.ffmpegSeconds).toFixed(0)}× | ${rss(r.ffmpegRssMiB)} | **${r.ratio.toFixed(2)}** |`,
  );
}
