/** Finding markers drawn above the waveform, derived from a file's measurements. Pure. */
import type { AudioMeasurements } from '@/lib/audio/types';

// Shorter silence (a sine starting at zero, a single quiet sample) is not worth a marker.
const MIN_SILENCE_SECONDS = 0.001;

export type MarkerKind = 'true-peak' | 'clipping' | 'silence';

export interface Marker {
  kind: MarkerKind;
  atSeconds: number;
  /** One line for the list and the marker's accessible name. */
  label: string;
  /** True when it breaks a limit of the release's profiles (an over, a clipped run). */
  problem: boolean;
}

/** Time as mm:ss.mmm (DESIGN.md: times as mm:ss.mmm). */
export function formatTime(seconds: number): string {
  const safe = Math.max(0, seconds);
  const minutes = Math.floor(safe / 60);
  const rest = safe - minutes * 60;
  return `${String(minutes).padStart(2, '0')}:${rest.toFixed(3).padStart(6, '0')}`;
}

export function formatLevel(value: number | null, unit: string): string {
  return value === null ? `– ${unit}` : `${value.toFixed(1)} ${unit}`;
}

/**
 * Markers for the worst true peak, clipped runs (merged across channels, at most 50) and
 * head/tail silence. `ceilingDbtp` marks the peak as a problem when it is over.
 */
export function collectMarkers(m: AudioMeasurements, ceilingDbtp: number | null): Marker[] {
  const markers: Marker[] = [];
  const peak = m.loudness.truePeakDbtp;
  const peakAt = m.loudness.truePeakAtSeconds;
  if (peak !== null && peakAt !== null) {
    const over = ceilingDbtp !== null && peak > ceilingDbtp;
    markers.push({
      kind: 'true-peak',
      atSeconds: peakAt,
      label: `Highest true peak ${peak.toFixed(1)} dBTP${over ? `, over the ${ceilingDbtp?.toFixed(1)} dBTP ceiling` : ''}`,
      problem: over || peak > 0,
    });
  }
  const runs = new Map<number, { lengthSamples: number; channels: number[] }>();
  m.channels.forEach((channel, index) => {
    for (const run of channel.clipping.runs) {
      const key = Math.round(run.atSeconds * 1000);
      const entry = runs.get(key) ?? { lengthSamples: 0, channels: [] };
      entry.lengthSamples = Math.max(entry.lengthSamples, run.lengthSamples);
      entry.channels.push(index + 1);
      runs.set(key, entry);
    }
  });
  for (const [ms, run] of [...runs].sort((a, b) => a[0] - b[0]).slice(0, 50)) {
    markers.push({
      kind: 'clipping',
      atSeconds: ms / 1000,
      label: `Clipped run of ${run.lengthSamples} samples (channel ${run.channels.join(', ')})`,
      problem: true,
    });
  }
  if (m.silence.headSeconds >= MIN_SILENCE_SECONDS) {
    markers.push({
      kind: 'silence',
      atSeconds: 0,
      label: `Silence at the start: ${m.silence.headSeconds.toFixed(3)} s below ${m.silence.thresholdDbfs} dBFS`,
      problem: false,
    });
  }
  if (m.silence.tailSeconds >= MIN_SILENCE_SECONDS) {
    markers.push({
      kind: 'silence',
      atSeconds: Math.max(0, m.format.durationSeconds - m.silence.tailSeconds),
      label: `Silence at the end: ${m.silence.tailSeconds.toFixed(3)} s below ${m.silence.thresholdDbfs} dBFS`,
      problem: false,
    });
  }
  return markers.sort((a, b) => a.atSeconds - b.atSeconds);
}

export const markerShapes: Record<MarkerKind, string> = {
  'true-peak': '▼',
  clipping: '■',
  silence: '○',
};

/** Each kind of marker has its own lane above the waveform, so markers at one time stay apart. */
export const markerLanes: Record<MarkerKind, number> = {
  'true-peak': 0,
  clipping: 1,
  silence: 2,
};
