import { describe, expect, it } from 'vitest';
import { NORMALIZATION_REFERENCES, previewNormalization } from '@/lib/specs';
import { makeMeasurements, makeRelease, makeTrack } from './fixtures';

describe('previewNormalization', () => {
  it('uses −14 LUFS (common practice) and −16 LUFS (AES TD1008) by default', () => {
    expect(NORMALIZATION_REFERENCES.map((r) => r.referenceLufs)).toEqual([-14, -16]);
  });

  it('turns a loud track down and raises a quiet one, flagging a peak pushed over −1 dBTP', () => {
    const loud = makeTrack({ position: 1 });
    const quiet = makeTrack({ position: 2 });
    const [at14, at16] = previewNormalization(makeRelease([loud, quiet]), {
      [loud.id]: makeMeasurements({ loudness: { integratedLufs: -8, truePeakDbtp: -0.2 } }),
      [quiet.id]: makeMeasurements({ loudness: { integratedLufs: -17, truePeakDbtp: -3.5 } }),
    });
    expect(at14!.tracks).toEqual([
      {
        trackId: loud.id,
        integratedLufs: -8,
        gainDb: -6,
        truePeakAfterDbtp: -6.2,
        exceedsCeiling: false,
      },
      {
        trackId: quiet.id,
        integratedLufs: -17,
        gainDb: 3,
        truePeakAfterDbtp: -0.5,
        exceedsCeiling: true,
      },
    ]);
    expect(at16!.tracks[1]).toMatchObject({
      gainDb: 1,
      truePeakAfterDbtp: -2.5,
      exceedsCeiling: false,
    });
  });

  it('is exactly on the ceiling without exceeding it', () => {
    const track = makeTrack();
    const [at14] = previewNormalization(makeRelease([track]), {
      [track.id]: makeMeasurements({ loudness: { integratedLufs: -16, truePeakDbtp: -3 } }),
    });
    expect(at14!.tracks[0]).toMatchObject({
      gainDb: 2,
      truePeakAfterDbtp: -1,
      exceedsCeiling: false,
    });
  });

  it('derives album loudness as the duration-weighted power mean and applies one gain', () => {
    const a = makeTrack({ position: 1 });
    const b = makeTrack({ position: 2 });
    const [at14] = previewNormalization(makeRelease([a, b]), {
      [a.id]: makeMeasurements({
        format: { durationSeconds: 100 },
        loudness: { integratedLufs: -10, truePeakDbtp: -1 },
      }),
      [b.id]: makeMeasurements({
        format: { durationSeconds: 300 },
        loudness: { integratedLufs: -20, truePeakDbtp: -6 },
      }),
    });
    // (100·10^−1 + 300·10^−2) / 400 = 0.0325 → 10·log10(0.0325) = −14.881 LUFS.
    expect(at14!.album.integratedLufs).toBeCloseTo(10 * Math.log10(0.0325), 9);
    expect(at14!.album.gainDb).toBeCloseTo(-14 - 10 * Math.log10(0.0325), 9);
    expect(at14!.album.truePeakAfterDbtp).toBeCloseTo(-1 + at14!.album.gainDb!, 9);
    expect(at14!.album.exceedsCeiling).toBe(true);
  });

  it('leaves unknowns unknown: no audio, or loudness gated out', () => {
    const analysed = makeTrack({ position: 1 });
    const silent = makeTrack({ position: 2 });
    const missing = makeTrack({ position: 3 });
    const [at14] = previewNormalization(makeRelease([analysed, silent, missing]), {
      [analysed.id]: makeMeasurements(),
      [silent.id]: makeMeasurements({ loudness: { integratedLufs: null, truePeakDbtp: null } }),
    });
    const empty = {
      integratedLufs: null,
      gainDb: null,
      truePeakAfterDbtp: null,
      exceedsCeiling: false,
    };
    expect(at14!.tracks[1]).toEqual({ trackId: silent.id, ...empty });
    expect(at14!.tracks[2]).toEqual({ trackId: missing.id, ...empty });
    expect(at14!.album).toEqual(empty);
  });
});
