/**
 * Synthesised demo audio: chords, a little noise and fades, written as WAV with wavefile.
 * Deterministic for a given seed, so re-seeding produces byte-identical files.
 */
import { createRequire } from 'node:module';
import type wavefileTypes from 'wavefile';

// wavefile is CommonJS; loading it with require behaves the same under tsx and Vite.
const { WaveFile } = createRequire(import.meta.url)('wavefile') as typeof wavefileTypes;

export interface SynthSpec {
  seconds: number;
  sampleRateHz: number;
  bitDepth: 16 | 24;
  /** Fundamental frequencies of the chord, Hz. */
  chordHz: number[];
  /** Peak level of the mix, dBFS. */
  peakDbfs: number;
  seed: number;
  fadeSeconds?: number;
}

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Renders a stereo WAV file for `spec` and returns its bytes. */
export function synthesizeWav(spec: SynthSpec): Buffer {
  const frames = Math.round(spec.seconds * spec.sampleRateHz);
  const random = mulberry32(spec.seed);
  const left = new Float64Array(frames);
  const right = new Float64Array(frames);
  const fade = Math.max(1, Math.round((spec.fadeSeconds ?? 0.5) * spec.sampleRateHz));
  const twoPi = 2 * Math.PI;
  const phases = spec.chordHz.map(() => random() * twoPi);
  let peak = 0;
  for (let i = 0; i < frames; i++) {
    const t = i / spec.sampleRateHz;
    // A slow swell so the loudness plot has some shape.
    const swell = 0.6 + 0.4 * Math.sin((twoPi * t) / Math.max(4, spec.seconds / 2));
    let l = 0;
    let r = 0;
    for (let k = 0; k < spec.chordHz.length; k++) {
      const hz = spec.chordHz[k] ?? 220;
      const s = Math.sin(twoPi * hz * t + (phases[k] ?? 0));
      l += s * (k % 2 === 0 ? 1 : 0.7);
      r += s * (k % 2 === 0 ? 0.7 : 1);
    }
    const noise = (random() - 0.5) * 0.05;
    const envelope = Math.min(1, i / fade, (frames - 1 - i) / fade) * swell;
    left[i] = (l / spec.chordHz.length + noise) * envelope;
    right[i] = (r / spec.chordHz.length + noise) * envelope;
    peak = Math.max(peak, Math.abs(left[i] ?? 0), Math.abs(right[i] ?? 0));
  }
  const gain = peak > 0 ? 10 ** (spec.peakDbfs / 20) / peak : 0;
  const fullScale = 2 ** (spec.bitDepth - 1) - 1;
  const toInt = (x: number) => Math.round(x * gain * fullScale);
  const wav = new WaveFile();
  wav.fromScratch(2, spec.sampleRateHz, String(spec.bitDepth), [
    Array.from(left, toInt),
    Array.from(right, toInt),
  ]);
  return Buffer.from(wav.toBuffer());
}
