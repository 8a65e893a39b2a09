import type { VinylFormat } from './schema';

export interface VinylLevelPoint {
  /** Side length in minutes. */
  minutes: number;
  /** Cutting level relative to RIAA standard reference level, dB. */
  levelDb: number;
}

export interface VinylFormatFacts {
  name: string;
  /** Side length against cutting level; common practice (REFERENCES §9, lossenderosstudio.com chart). */
  levelByLength: readonly VinylLevelPoint[];
}

/** Level-versus-time guidance per disc size and speed: common practice, not a standard. */
export const VINYL_FORMATS: Record<VinylFormat, VinylFormatFacts> = {
  '12-33': {
    name: '12-inch 33⅓',
    // REFERENCES §9 [S2]: 20 min at 0 dB, 24 min at −3 dB, 28 min at −6 dB (RIAA SRL).
    levelByLength: [
      { minutes: 20, levelDb: 0 },
      { minutes: 24, levelDb: -3 },
      { minutes: 28, levelDb: -6 },
    ],
  },
  '12-45': {
    name: '12-inch 45',
    // REFERENCES §9 [S2]: 10.5 min at +3 dB, 13.5 min at 0 dB, 16 min at −3 dB.
    levelByLength: [
      { minutes: 10.5, levelDb: 3 },
      { minutes: 13.5, levelDb: 0 },
      { minutes: 16, levelDb: -3 },
    ],
  },
  '7-45': {
    name: '7-inch 45',
    // REFERENCES §9 [S2]: 4 min at +3 dB, 5 min at 0 dB, 6 min at −3 dB.
    levelByLength: [
      { minutes: 4, levelDb: 3 },
      { minutes: 5, levelDb: 0 },
      { minutes: 6, levelDb: -3 },
    ],
  },
};

/**
 * The cutting level (dB re RIAA SRL) a side of this length can carry, interpolated
 * linearly between the chart points; null beyond the longest point, where the chart
 * gives no figure. Shorter than the first point returns the first point's level.
 */
export function estimateVinylLevelDb(format: VinylFormat, sideSeconds: number): number | null {
  const points = VINYL_FORMATS[format].levelByLength;
  const minutes = sideSeconds / 60;
  const first = points[0]!;
  if (minutes <= first.minutes) return first.levelDb;
  for (let i = 1; i < points.length; i += 1) {
    const a = points[i - 1]!;
    const b = points[i]!;
    if (minutes <= b.minutes) {
      return (
        a.levelDb + ((minutes - a.minutes) / (b.minutes - a.minutes)) * (b.levelDb - a.levelDb)
      );
    }
  }
  return null;
}

/** One sentence of guidance: "about 20 min at 0 dB, 24 min at −3 dB and 28 min at −6 dB". */
export function describeVinylGuidance(format: VinylFormat): string {
  const facts = VINYL_FORMATS[format];
  const parts = facts.levelByLength.map(
    (p) =>
      `${p.minutes} min at ${p.levelDb > 0 ? '+' : p.levelDb < 0 ? '−' : ''}${Math.abs(p.levelDb)} dB`,
  );
  return `as a guide (common practice), a ${facts.name} side holds about ${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]} relative to standard reference level`;
}
