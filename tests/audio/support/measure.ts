import { writeFileSync } from 'node:fs';
import { analyzeStreamInThread } from '../../../src/lib/audio/analyze-in-thread.ts';
import type { AnalysisOptions } from '../../../src/lib/audio/segment-analyzer.ts';
import type { AudioMeasurements } from '../../../src/lib/audio/types.ts';
import { type Channels, type SampleFormat, toReadable, writeWav } from './signals.ts';

/** Measures channels written as a WAV (float32 unless said), streamed through the real reader. */
export function measureChannels(
  channels: Channels,
  sampleRateHz: number,
  options: AnalysisOptions & { format?: SampleFormat } = {},
): Promise<AudioMeasurements> {
  const { format, ...analysis } = options;
  const bytes = writeWav(channels, sampleRateHz, { format: format ?? 'float32' });
  return analyzeStreamInThread(toReadable(bytes), bytes.length, analysis);
}

export function saveWav(
  path: string,
  channels: Channels,
  sampleRateHz: number,
  format: SampleFormat,
): string {
  writeFileSync(path, writeWav(channels, sampleRateHz, { format }));
  return path;
}
