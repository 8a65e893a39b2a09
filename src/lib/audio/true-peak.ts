/**
 * True-peak measurement, ITU-R BS.1770-4 Annex 2: oversample, low-pass, take the largest
 * absolute value. The interpolator is the 48-tap, 4-phase FIR published with Annex 2
 * (coefficients as reproduced by lcweden/loudness-worklet and other independent copies).
 */

// BS.1770-4 Annex 2 interpolating filter, phase 0 (12 taps); phase 3 is phase 0 reversed.
const PHASE_0 = [
  0.001708984375, 0.010986328125, -0.0196533203125, 0.033203125, -0.0594482421875, 0.1373291015625,
  0.97216796875, -0.102294921875, 0.047607421875, -0.026611328125, 0.014892578125, -0.00830078125,
];
// BS.1770-4 Annex 2 interpolating filter, phase 1; phase 2 is phase 1 reversed.
const PHASE_1 = [
  -0.0291748046875, 0.029296875, -0.0517578125, 0.089111328125, -0.16650390625, 0.465087890625,
  0.77978515625, -0.2003173828125, 0.1015625, -0.0582275390625, 0.0330810546875, -0.0189208984375,
];

export const TRUE_PEAK_TAPS = 12;

/** The four phases as one array: coefficient k of phase p is at [p * 12 + k]. */
export const TRUE_PEAK_PHASES: Float64Array = new Float64Array([
  ...PHASE_0,
  ...PHASE_1,
  ...[...PHASE_1].reverse(),
  ...[...PHASE_0].reverse(),
]);

/**
 * Group delay of the interpolator in input samples: output phase p at input index n shows the
 * signal at n + p/4 − 5.875 (the 48-tap prototype is centred between taps 23 and 24).
 */
export const TRUE_PEAK_DELAY_SAMPLES = 5.875;

/**
 * Oversampling factor. BS.1770-4 Annex 2 asks for at least 192 kHz after oversampling: 4×
 * below 88.2 kHz, 2× below 176.4 kHz (phases 0 and 2 of the same filter), none above, where
 * the true peak is the sample peak. Same thresholds as libebur128's `ebur128_init_resampler`.
 */
export function chooseOversamplingFactor(sampleRateHz: number): 1 | 2 | 4 {
  if (sampleRateHz < 88_200) return 4;
  if (sampleRateHz < 176_400) return 2;
  return 1;
}

export interface TruePeakScan {
  /** Largest absolute interpolated value found, linear full scale. */
  peak: number;
  /** Input index where it was found (−1 when the scan did not beat `floor`). */
  atIndex: number;
}

/**
 * Scans x[from..to) with 4× oversampling; x must hold 11 samples of history before `from`.
 * Only a value above `floor` is reported, so the caller can keep a running maximum.
 */
export function scanTruePeak4x(
  x: Float32Array,
  from: number,
  to: number,
  floor: number,
  out: TruePeakScan,
): void {
  const h = TRUE_PEAK_PHASES;
  const a0 = h[0]!,
    a1 = h[1]!,
    a2 = h[2]!,
    a3 = h[3]!,
    a4 = h[4]!,
    a5 = h[5]!;
  const a6 = h[6]!,
    a7 = h[7]!,
    a8 = h[8]!,
    a9 = h[9]!,
    a10 = h[10]!,
    a11 = h[11]!;
  const b0 = h[12]!,
    b1 = h[13]!,
    b2 = h[14]!,
    b3 = h[15]!,
    b4 = h[16]!,
    b5 = h[17]!;
  const b6 = h[18]!,
    b7 = h[19]!,
    b8 = h[20]!,
    b9 = h[21]!,
    b10 = h[22]!,
    b11 = h[23]!;
  let best = floor;
  let bestAt = -1;
  let x1 = x[from - 1]!,
    x2 = x[from - 2]!,
    x3 = x[from - 3]!,
    x4 = x[from - 4]!;
  let x5 = x[from - 5]!,
    x6 = x[from - 6]!,
    x7 = x[from - 7]!,
    x8 = x[from - 8]!;
  let x9 = x[from - 9]!,
    x10 = x[from - 10]!,
    x11 = x[from - 11]!;
  for (let n = from; n < to; n++) {
    const x0 = x[n]!;
    // Phases 2 and 3 are phases 1 and 0 reversed, so they reuse the same coefficients.
    let p0 = a0 * x0 + a1 * x1 + a2 * x2 + a3 * x3 + a4 * x4 + a5 * x5;
    p0 += a6 * x6 + a7 * x7 + a8 * x8 + a9 * x9 + a10 * x10 + a11 * x11;
    let p1 = b0 * x0 + b1 * x1 + b2 * x2 + b3 * x3 + b4 * x4 + b5 * x5;
    p1 += b6 * x6 + b7 * x7 + b8 * x8 + b9 * x9 + b10 * x10 + b11 * x11;
    let p2 = b11 * x0 + b10 * x1 + b9 * x2 + b8 * x3 + b7 * x4 + b6 * x5;
    p2 += b5 * x6 + b4 * x7 + b3 * x8 + b2 * x9 + b1 * x10 + b0 * x11;
    let p3 = a11 * x0 + a10 * x1 + a9 * x2 + a8 * x3 + a7 * x4 + a6 * x5;
    p3 += a5 * x6 + a4 * x7 + a3 * x8 + a2 * x9 + a1 * x10 + a0 * x11;
    const m = Math.max(Math.abs(p0), Math.abs(p1), Math.abs(p2), Math.abs(p3));
    if (m > best) {
      best = m;
      bestAt = n;
    }
    x11 = x10;
    x10 = x9;
    x9 = x8;
    x8 = x7;
    x7 = x6;
    x6 = x5;
    x5 = x4;
    x4 = x3;
    x3 = x2;
    x2 = x1;
    x1 = x0;
  }
  out.peak = best;
  out.atIndex = bestAt;
}

/** As scanTruePeak4x with 2× oversampling (phases 0 and 2 of the same filter). */
export function scanTruePeak2x(
  x: Float32Array,
  from: number,
  to: number,
  floor: number,
  out: TruePeakScan,
): void {
  const h = TRUE_PEAK_PHASES;
  const a0 = h[0]!,
    a1 = h[1]!,
    a2 = h[2]!,
    a3 = h[3]!,
    a4 = h[4]!,
    a5 = h[5]!;
  const a6 = h[6]!,
    a7 = h[7]!,
    a8 = h[8]!,
    a9 = h[9]!,
    a10 = h[10]!,
    a11 = h[11]!;
  const b0 = h[12]!,
    b1 = h[13]!,
    b2 = h[14]!,
    b3 = h[15]!,
    b4 = h[16]!,
    b5 = h[17]!;
  const b6 = h[18]!,
    b7 = h[19]!,
    b8 = h[20]!,
    b9 = h[21]!,
    b10 = h[22]!,
    b11 = h[23]!;
  let best = floor;
  let bestAt = -1;
  let x1 = x[from - 1]!,
    x2 = x[from - 2]!,
    x3 = x[from - 3]!,
    x4 = x[from - 4]!;
  let x5 = x[from - 5]!,
    x6 = x[from - 6]!,
    x7 = x[from - 7]!,
    x8 = x[from - 8]!;
  let x9 = x[from - 9]!,
    x10 = x[from - 10]!,
    x11 = x[from - 11]!;
  for (let n = from; n < to; n++) {
    const x0 = x[n]!;
    let p0 = a0 * x0 + a1 * x1 + a2 * x2 + a3 * x3 + a4 * x4 + a5 * x5;
    p0 += a6 * x6 + a7 * x7 + a8 * x8 + a9 * x9 + a10 * x10 + a11 * x11;
    let p2 = b11 * x0 + b10 * x1 + b9 * x2 + b8 * x3 + b7 * x4 + b6 * x5;
    p2 += b5 * x6 + b4 * x7 + b3 * x8 + b2 * x9 + b1 * x10 + b0 * x11;
    const m = Math.max(Math.abs(p0), Math.abs(p2));
    if (m > best) {
      best = m;
      bestAt = n;
    }
    x11 = x10;
    x10 = x9;
    x9 = x8;
    x8 = x7;
    x7 = x6;
    x6 = x5;
    x5 = x4;
    x4 = x3;
    x3 = x2;
    x2 = x1;
    x1 = x0;
  }
  out.peak = best;
  out.atIndex = bestAt;
}
