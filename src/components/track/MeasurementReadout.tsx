import type { ReactNode } from 'react';
import type { AudioMeasurements } from '@/lib/audio/types';
import { formatLevel, formatTime } from './markers';

function Row({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="flex justify-between gap-4 border-b border-mist py-1 last:border-0">
      <dt className="text-slate">{label}</dt>
      <dd className="figures text-right">{children}</dd>
    </div>
  );
}

function formatCorrelation(value: number | null): string {
  return value === null ? '– (mono)' : value.toFixed(2);
}

/** The main measurements of a file, units always shown, one decimal for levels. */
export function MeasurementReadout({ measurements: m }: { measurements: AudioMeasurements }) {
  const f = m.format;
  const dc = Math.max(...m.channels.map((c) => Math.abs(c.dcOffset)));
  const effectiveBits = Math.max(...m.channels.map((c) => c.effectiveBitDepth));
  const clippedRuns = m.channels.reduce((n, c) => n + c.clipping.runCount, 0);
  return (
    <dl className="grid gap-x-8 text-sm md:grid-cols-2" data-testid="measurement-readout">
      <div>
        <Row label="Integrated loudness">{formatLevel(m.loudness.integratedLufs, 'LUFS')}</Row>
        <Row label="Loudness range">{formatLevel(m.loudness.rangeLu, 'LU')}</Row>
        <Row label="Max short-term">{formatLevel(m.loudness.maxShortTermLufs, 'LUFS')}</Row>
        <Row label="Max momentary">{formatLevel(m.loudness.maxMomentaryLufs, 'LUFS')}</Row>
        <Row label="True peak">
          {formatLevel(m.loudness.truePeakDbtp, 'dBTP')}
          {m.loudness.truePeakAtSeconds !== null &&
            ` at ${formatTime(m.loudness.truePeakAtSeconds)}`}
        </Row>
        <Row label="Sample peak">{formatLevel(m.loudness.samplePeakDbfs, 'dBFS')}</Row>
        <Row label="Clipped runs (all channels)">{clippedRuns}</Row>
        <Row label="DC offset (largest)">{(dc * 100).toFixed(3)} % FS</Row>
      </div>
      <div>
        <Row label="Format">
          {f.container.toUpperCase()} · {(f.sampleRateHz / 1000).toFixed(1)} kHz · {f.bitsPerSample}
          -bit {f.encoding === 'pcm-float' ? 'float' : 'PCM'} · {f.channels} ch
        </Row>
        <Row label="Length">{formatTime(f.durationSeconds)}</Row>
        <Row label="Effective bit depth">{effectiveBits} bits</Row>
        <Row label="Silence head / tail">
          {m.silence.headSeconds.toFixed(3)} s / {m.silence.tailSeconds.toFixed(3)} s
        </Row>
        <Row label="Correlation (full / low band)">
          {formatCorrelation(m.correlation.fullBand)} / {formatCorrelation(m.correlation.lowBand)}
        </Row>
        <Row label="CD frames">
          {m.cdFrames.frames}
          {m.cdFrames.remainderSamples > 0
            ? ` + ${m.cdFrames.remainderSamples} samples (not frame-aligned)`
            : ' (frame-aligned)'}
        </Row>
        {m.correlation.identicalChannels && <Row label="Channels">identical (dual mono)</Row>}
        {m.correlation.invertedChannels && <Row label="Channels">one is inverted</Row>}
      </div>
    </dl>
  );
}
