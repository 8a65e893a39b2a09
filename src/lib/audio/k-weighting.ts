/** Biquad coefficients for y[n] = b0·x[n] + b1·x[n−1] + b2·x[n−2] − a1·y[n−1] − a2·y[n−2]. */
export interface Biquad {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

// Analog-prototype parameters of the two K-weighting stages, as used by libebur128
// (`ebur128_init_filter`); at 48 kHz they reproduce BS.1770-4 Tables 1 and 2 (tested).
const SHELF_CENTRE_HZ = 1681.974450955533;
const SHELF_GAIN_DB = 3.999843853973347;
const SHELF_Q = 0.7071752369554196;
const SHELF_VB_EXPONENT = 0.4996667741545416;
const HIGH_PASS_CENTRE_HZ = 38.13547087602444;
const HIGH_PASS_Q = 0.5003270373238773;

/** Stage 1 of the K-weighting (the shelving pre-filter), BS.1770-4 Table 1 at 48 kHz. */
export function computeShelfCoefficients(sampleRateHz: number): Biquad {
  const k = Math.tan((Math.PI * SHELF_CENTRE_HZ) / sampleRateHz);
  const vh = 10 ** (SHELF_GAIN_DB / 20);
  const vb = vh ** SHELF_VB_EXPONENT;
  const a0 = 1 + k / SHELF_Q + k * k;
  return {
    b0: (vh + (vb * k) / SHELF_Q + k * k) / a0,
    b1: (2 * (k * k - vh)) / a0,
    b2: (vh - (vb * k) / SHELF_Q + k * k) / a0,
    a1: (2 * (k * k - 1)) / a0,
    a2: (1 - k / SHELF_Q + k * k) / a0,
  };
}

/**
 * Stage 2 (the RLB high-pass), BS.1770-4 Table 2 at 48 kHz. The numerator stays [1, −2, 1],
 * not divided by a0, exactly as the table gives it.
 */
export function computeHighPassCoefficients(sampleRateHz: number): Biquad {
  const k = Math.tan((Math.PI * HIGH_PASS_CENTRE_HZ) / sampleRateHz);
  const a0 = 1 + k / HIGH_PASS_Q + k * k;
  return {
    b0: 1,
    b1: -2,
    b2: 1,
    a1: (2 * (k * k - 1)) / a0,
    a2: (1 - k / HIGH_PASS_Q + k * k) / a0,
  };
}

/**
 * Second-order Butterworth low-pass (bilinear transform with pre-warping), used for the
 * low-band correlation. Formula: RBJ Audio EQ Cookbook (common practice), Q = 1/√2.
 */
export function computeLowPassCoefficients(sampleRateHz: number, cutoffHz: number): Biquad {
  const k = Math.tan((Math.PI * cutoffHz) / sampleRateHz);
  const q = Math.SQRT1_2;
  const norm = 1 / (1 + k / q + k * k);
  return {
    b0: k * k * norm,
    b1: 2 * k * k * norm,
    b2: k * k * norm,
    a1: 2 * (k * k - 1) * norm,
    a2: (1 - k / q + k * k) * norm,
  };
}
