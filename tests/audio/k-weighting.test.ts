import { describe, expect, it } from 'vitest';
import {
  computeHighPassCoefficients,
  computeShelfCoefficients,
} from '../../src/lib/audio/k-weighting.ts';
import { chooseOversamplingFactor, TRUE_PEAK_PHASES } from '../../src/lib/audio/true-peak.ts';

describe('K-weighting coefficients from the analog prototype', () => {
  it('reproduce BS.1770-4 Table 1 (shelving pre-filter) at 48 kHz to 1e-9', () => {
    // BS.1770-4 Table 1, as published in the ITU-T STL bs1770demo.c.
    const shelf = computeShelfCoefficients(48_000);
    expect(Math.abs(shelf.b0 - 1.53512485958697)).toBeLessThan(1e-9);
    expect(Math.abs(shelf.b1 - -2.69169618940638)).toBeLessThan(1e-9);
    expect(Math.abs(shelf.b2 - 1.19839281085285)).toBeLessThan(1e-9);
    expect(Math.abs(shelf.a1 - -1.69065929318241)).toBeLessThan(1e-9);
    expect(Math.abs(shelf.a2 - 0.73248077421585)).toBeLessThan(1e-9);
  });

  it('reproduce BS.1770-4 Table 2 (RLB high-pass) at 48 kHz to 1e-9', () => {
    // BS.1770-4 Table 2; the table's a-coefficients are printed to 14 decimals.
    const highPass = computeHighPassCoefficients(48_000);
    expect([highPass.b0, highPass.b1, highPass.b2]).toEqual([1, -2, 1]);
    expect(Math.abs(highPass.a1 - -1.99004745483398)).toBeLessThan(1e-9);
    expect(Math.abs(highPass.a2 - 0.99007225036621)).toBeLessThan(1e-9);
  });

  it('match the 44.1 kHz values recomputed from the same formulas (REFERENCES.md §1 [C])', () => {
    const shelf = computeShelfCoefficients(44_100);
    const highPass = computeHighPassCoefficients(44_100);
    expect(shelf.b0).toBeCloseTo(1.53084123005035, 12);
    expect(shelf.b1).toBeCloseTo(-2.65097999515473, 12);
    expect(shelf.b2).toBeCloseTo(1.16907907992159, 12);
    expect(shelf.a1).toBeCloseTo(-1.66365511325602, 12);
    expect(shelf.a2).toBeCloseTo(0.71259542807323, 12);
    expect(highPass.a1).toBeCloseTo(-1.9891696736298, 12);
    expect(highPass.a2).toBeCloseTo(0.98919903578704, 12);
  });

  it('give a +0.698 dB gain at 1 kHz, which the −0.691 offset cancels (REFERENCES.md §1 [C])', () => {
    const fs = 48_000;
    const response = (
      c: { b0: number; b1: number; b2: number; a1: number; a2: number },
      hz: number,
    ): number => {
      const w = (2 * Math.PI * hz) / fs;
      const num = Math.hypot(
        c.b0 + c.b1 * Math.cos(w) + c.b2 * Math.cos(2 * w),
        c.b1 * Math.sin(w) + c.b2 * Math.sin(2 * w),
      );
      const den = Math.hypot(
        1 + c.a1 * Math.cos(w) + c.a2 * Math.cos(2 * w),
        c.a1 * Math.sin(w) + c.a2 * Math.sin(2 * w),
      );
      return num / den;
    };
    const gain =
      response(computeShelfCoefficients(fs), 1000) *
      response(computeHighPassCoefficients(fs), 1000);
    expect(20 * Math.log10(gain)).toBeCloseTo(0.698, 2);
  });
});

describe('true-peak interpolator', () => {
  it('has the published Annex 2 phases, phase 2/3 being phase 1/0 reversed', () => {
    // BS.1770-4 Annex 2 (48 taps, 4 phases × 12), REFERENCES.md §1.
    expect(TRUE_PEAK_PHASES[6]).toBe(0.97216796875);
    expect(TRUE_PEAK_PHASES[12 + 6]).toBe(0.77978515625);
    for (let k = 0; k < 12; k++) {
      expect(TRUE_PEAK_PHASES[36 + k]).toBe(TRUE_PEAK_PHASES[11 - k]);
      expect(TRUE_PEAK_PHASES[24 + k]).toBe(TRUE_PEAK_PHASES[12 + 11 - k]);
    }
  });

  it('oversamples 4× below 88.2 kHz, 2× below 176.4 kHz and not at all above', () => {
    expect(chooseOversamplingFactor(44_100)).toBe(4);
    expect(chooseOversamplingFactor(48_000)).toBe(4);
    expect(chooseOversamplingFactor(88_200)).toBe(2);
    expect(chooseOversamplingFactor(96_000)).toBe(2);
    expect(chooseOversamplingFactor(176_400)).toBe(1);
    expect(chooseOversamplingFactor(192_000)).toBe(1);
  });
});
