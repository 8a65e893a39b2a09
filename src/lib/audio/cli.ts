import { basename } from 'node:path';
import { isAudioAnalysisError } from './errors.ts';
import { createAudioAnalysisPool } from './pool.ts';
import type { AudioMeasurements } from './types.ts';

const USAGE = `Usage: quayside-analyze [--json] [--silence-threshold DBFS] [--threads N] FILE...

Measures WAV/BWF/RF64/AIFF masters: loudness (BS.1770 / EBU R 128), true peak, loudness
range, clipping, silence, DC offset, bit depth, phase. Prints a table, or JSON with --json.`;

interface CliArguments {
  files: string[];
  json: boolean;
  silenceThresholdDbfs: number | undefined;
  threads: number | undefined;
  help: boolean;
}

function parseArguments(argv: string[]): CliArguments | string {
  const parsed: CliArguments = {
    files: [],
    json: false,
    silenceThresholdDbfs: undefined,
    threads: undefined,
    help: false,
  };
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i]!;
    if (arg === '--json') parsed.json = true;
    else if (arg === '--help' || arg === '-h') parsed.help = true;
    else if (arg === '--silence-threshold' || arg === '--threads') {
      const value = Number(argv[++i]);
      if (!Number.isFinite(value)) return `${arg} needs a number`;
      if (arg === '--threads') parsed.threads = Math.max(1, Math.floor(value));
      else parsed.silenceThresholdDbfs = value;
    } else if (arg.startsWith('--')) return `unknown option ${arg}`;
    else parsed.files.push(arg);
  }
  return parsed;
}

function formatNumber(value: number | null, unit: string, places = 1): string {
  return value === null ? `—` : `${value.toFixed(places)} ${unit}`;
}

function formatTime(seconds: number | null): string {
  if (seconds === null) return '—';
  const minutes = Math.floor(seconds / 60);
  return `${minutes}:${(seconds - minutes * 60).toFixed(3).padStart(6, '0')}`;
}

function channelName(index: number, count: number): string {
  if (count === 1) return 'Mono';
  if (count === 2) return index === 0 ? 'L' : 'R';
  return `Ch ${index + 1}`;
}

/** The readable table for one file. */
export function formatMeasurementsTable(file: string, m: AudioMeasurements): string {
  const f = m.format;
  const l = m.loudness;
  const rows: [string, string][] = [
    [
      'Format',
      `${f.container.toUpperCase()} ${f.encoding === 'pcm-float' ? 'float' : 'PCM'} ${f.bitsPerSample}-bit, ${f.sampleRateHz / 1000} kHz, ${f.channels} ch`,
    ],
    [
      'Duration',
      `${formatTime(f.durationSeconds)} (${f.durationSamples} samples; ${m.cdFrames.frames} CD frames + ${m.cdFrames.remainderSamples})`,
    ],
    ['Integrated', formatNumber(l.integratedLufs, 'LUFS')],
    ['Loudness range', formatNumber(l.rangeLu, 'LU')],
    ['Max momentary', formatNumber(l.maxMomentaryLufs, 'LUFS')],
    ['Max short-term', formatNumber(l.maxShortTermLufs, 'LUFS')],
    [
      'True peak',
      `${formatNumber(l.truePeakDbtp, 'dBTP', 2)} at ${formatTime(l.truePeakAtSeconds)}`,
    ],
    ['Sample peak', formatNumber(l.samplePeakDbfs, 'dBFS', 2)],
    [
      'Silence',
      `head ${m.silence.headSeconds.toFixed(3)} s, tail ${m.silence.tailSeconds.toFixed(3)} s (below ${m.silence.thresholdDbfs} dBFS)`,
    ],
  ];
  if (m.correlation.fullBand !== null || m.correlation.identicalChannels) {
    const c = m.correlation;
    const flags = c.identicalChannels
      ? ' — channels identical'
      : c.invertedChannels
        ? ' — channels polarity-inverted'
        : '';
    rows.push([
      'Correlation',
      `${formatNumber(c.fullBand, '', 2).trim()} full band, ${formatNumber(c.lowBand, '', 2).trim()} below ${c.lowBandHz} Hz${flags}`,
    ]);
  }
  for (const [index, ch] of m.channels.entries()) {
    const clip = ch.clipping;
    const clipText =
      clip.runCount === 0
        ? 'no clipping'
        : `${clip.runCount} clipped run${clip.runCount === 1 ? '' : 's'} (longest ${clip.longestRunSamples}, first at ${formatTime(clip.runs[0]?.atSeconds ?? null)})`;
    rows.push([
      channelName(index, m.channels.length),
      `TP ${formatNumber(ch.truePeakDbtp, 'dBTP', 2)}, peak ${formatNumber(ch.samplePeakDbfs, 'dBFS', 2)}, DC ${(ch.dcOffset * 100).toFixed(4)} %, ${ch.effectiveBitDepth}-bit in use, ${clipText}, first/last sample ${formatNumber(ch.firstSampleDbfs, '', 1).trim()}/${formatNumber(ch.lastSampleDbfs, '', 1).trim()} dBFS`,
    ]);
  }
  if (m.tags.isrc) rows.push(['ISRC', m.tags.isrc]);
  if (m.tags.bext?.description) rows.push(['BWF description', m.tags.bext.description]);
  const width = Math.max(...rows.map(([k]) => k.length));
  return [basename(file), ...rows.map(([k, v]) => `  ${k.padEnd(width)}  ${v}`)].join('\n');
}

/** Runs the command line; resolves to the exit code. */
export async function runCli(argv: string[], workerUrl: string): Promise<number> {
  const args = parseArguments(argv);
  if (typeof args === 'string') {
    process.stderr.write(`quayside-analyze: ${args}\n${USAGE}\n`);
    return 2;
  }
  if (args.help || args.files.length === 0) {
    process.stdout.write(`${USAGE}\n`);
    return args.help ? 0 : 2;
  }
  const pool = createAudioAnalysisPool({
    workerUrl,
    ...(args.threads ? { maxThreads: args.threads } : {}),
  });
  const results: (
    | { file: string; measurements: AudioMeasurements }
    | { file: string; error: { code: string; message: string } }
  )[] = [];
  let failed = false;
  try {
    for (const file of args.files) {
      try {
        const measurements = await pool.analyzeFile(file, {
          ...(args.silenceThresholdDbfs !== undefined
            ? { silenceThresholdDbfs: args.silenceThresholdDbfs }
            : {}),
        });
        results.push({ file, measurements });
        if (!args.json) process.stdout.write(`${formatMeasurementsTable(file, measurements)}\n\n`);
      } catch (error) {
        failed = true;
        const detail = isAudioAnalysisError(error)
          ? { code: error.code, message: error.message }
          : { code: 'internal', message: error instanceof Error ? error.message : String(error) };
        results.push({ file, error: detail });
        if (!args.json)
          process.stderr.write(`${basename(file)}: ${detail.message} [${detail.code}]\n\n`);
      }
    }
  } finally {
    await pool.destroy();
  }
  if (args.json)
    process.stdout.write(
      `${JSON.stringify(results.length === 1 ? results[0] : results, null, 2)}\n`,
    );
  return failed ? 1 : 0;
}
