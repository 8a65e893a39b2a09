import {
  scanTruePeak2x,
  scanTruePeak4x,
  TRUE_PEAK_PHASES,
  TRUE_PEAK_TAPS,
  type TruePeakScan,
} from './true-peak.ts';

/**
 * The true-peak FIR as a WebAssembly SIMD kernel (one f32x4 lane per phase), about 3× faster
 * than the JavaScript loop (PERFORMANCE.md). It only finds the 64-sample group holding the
 * largest value; that group is then measured again by the JavaScript kernel in double
 * precision, so results match the JavaScript path. Source: true-peak-simd.wat beside this file
 * (rebuild with `wat2wasm true-peak-simd.wat` from Debian's wabt and paste the base64 here).
 */
const KERNEL_BASE64 =
  'AGFzbQEAAAABCQFgBX9/f39/AAMDAgAABQMBAAEHGQMGbWVtb3J5AgAEc2NhbgAABXNjYW4yAAEKuQYCmgMDDHsDfwJ7IAD9AAQAIQUgAP0ABBAhBiAA/QAEICEHIAD9AAQwIQggAP0ABEAhCSAA/QAEUCEKIAD9AARgIQsgAP0ABHAhDCAA/QAEgAEhDSAA/QAEkAEhDiAA/QAEoAEhDyAA/QAEsAEhECABIREgASACQQJ0aiESAkADQCARIBJPDQEgESAEQQJ0aiETIBMgEksEQCASIRML/QwAAAAAAAAAAAAAAAAAAAAAIRUDQCAFIBH9CQIs/eYBIAYgEf0JAij95gH95AEgByAR/QkCJP3mASAIIBH9CQIg/eYB/eQB/eQBIAkgEf0JAhz95gEgCiAR/QkCGP3mAf3kASALIBH9CQIU/eYBIAwgEf0JAhD95gH95AH95AH95AEgDSAR/QkCDP3mASAOIBH9CQII/eYB/eQBIA8gEf0JAgT95gEgECAR/QkCAP3mAf3kAf3kAf3kASEUIBUgFP3gAf3pASEVIBFBBGohESARIBNJDQALIAMgFf0fACAV/R8BlyAV/R8CIBX9HwOXlzgCACADQQRqIQMMAAsLC5oDAwx7A38CeyAA/QAEACEFIAD9AAQQIQYgAP0ABCAhByAA/QAEMCEIIAD9AARAIQkgAP0ABFAhCiAA/QAEYCELIAD9AARwIQwgAP0ABIABIQ0gAP0ABJABIQ4gAP0ABKABIQ8gAP0ABLABIRAgASERIAEgAkECdGohEgJAA0AgESASTw0BIBEgBEECdGohEyATIBJLBEAgEiETC/0MAAAAAAAAAAAAAAAAAAAAACEVA0AgBSAR/QoDLP3mASAGIBH9CgMo/eYB/eQBIAcgEf0KAyT95gEgCCAR/QoDIP3mAf3kAf3kASAJIBH9CgMc/eYBIAogEf0KAxj95gH95AEgCyAR/QoDFP3mASAMIBH9CgMQ/eYB/eQB/eQB/eQBIA0gEf0KAwz95gEgDiAR/QoDCP3mAf3kASAPIBH9CgME/eYBIBAgEf0KAwD95gH95AH95AH95AEhFCAVIBT94AH96QEhFSARQQhqIREgESATSQ0ACyADIBX9HwAgFf0fAZcgFf0fAiAV/R8Dl5c4AgAgA0EEaiEDDAALCws=';

const GROUP_FRAMES = 64;
const COEF_4X_AT = 0;
const COEF_2X_AT = 192;
const GROUP_MAX_AT = 384;
const WASM_PAGE_BYTES = 65_536;

interface KernelExports {
  memory: WebAssembly.Memory;
  scan(coef: number, x: number, n: number, out: number, group: number): void;
  scan2(coef: number, x: number, n: number, out: number, group: number): void;
}

let compiled: WebAssembly.Module | null | undefined;

function compileKernel(): WebAssembly.Module | null {
  if (compiled !== undefined) return compiled;
  try {
    compiled = new WebAssembly.Module(Buffer.from(KERNEL_BASE64, 'base64'));
  } catch {
    // No SIMD support in this runtime: the JavaScript kernel is used.
    compiled = null;
  }
  return compiled;
}

/** Channel buffers living in the kernel's memory, and the scan over them. */
export class SimdTruePeak {
  readonly samples: Float32Array[];
  private readonly kernel: KernelExports;
  private readonly groupMax: Float32Array;
  private readonly channelAt: number[];
  private readonly tail: TruePeakScan = { peak: 0, atIndex: -1 };

  private constructor(kernel: KernelExports, channels: number, frames: number, maxGroups: number) {
    this.kernel = kernel;
    const channelBytes = Math.ceil((frames * 4) / 16) * 16;
    const groupBytes = Math.ceil((maxGroups * 4) / 16) * 16;
    const first = GROUP_MAX_AT + groupBytes;
    const needed = first + channels * channelBytes;
    const have = kernel.memory.buffer.byteLength;
    if (needed > have) kernel.memory.grow(Math.ceil((needed - have) / WASM_PAGE_BYTES));
    const buffer = kernel.memory.buffer;
    const coefficients = new Float32Array(buffer, 0, 96);
    for (let k = 0; k < TRUE_PEAK_TAPS; k++) {
      for (let p = 0; p < 4; p++) {
        coefficients[k * 4 + p] = TRUE_PEAK_PHASES[p * TRUE_PEAK_TAPS + k]!;
        // 2× (scan2): lanes are phase 0 at n, n+1 and phase 2 at n, n+1.
        coefficients[48 + k * 4 + p] = TRUE_PEAK_PHASES[(p < 2 ? 0 : 2) * TRUE_PEAK_TAPS + k]!;
      }
    }
    this.groupMax = new Float32Array(buffer, GROUP_MAX_AT, maxGroups);
    this.channelAt = [];
    this.samples = [];
    for (let c = 0; c < channels; c++) {
      const at = first + c * channelBytes;
      this.channelAt.push(at);
      this.samples.push(new Float32Array(buffer, at, frames));
    }
  }

  /** Null when WebAssembly SIMD is not available. */
  static create(channels: number, frames: number): SimdTruePeak | null {
    const module = compileKernel();
    if (module === null) return null;
    const instance = new WebAssembly.Instance(module, {});
    return new SimdTruePeak(
      instance.exports as unknown as KernelExports,
      channels,
      frames,
      Math.ceil(frames / GROUP_FRAMES),
    );
  }

  /** As scanTruePeak4x/2x on samples[channel][from..to). */
  scan(
    channel: number,
    from: number,
    to: number,
    factor: 2 | 4,
    floor: number,
    out: TruePeakScan,
  ): void {
    const x = this.samples[channel]!;
    const n = to - from;
    out.peak = floor;
    out.atIndex = -1;
    if (n <= 0) return;
    const xAt = this.channelAt[channel]! + (from - (TRUE_PEAK_TAPS - 1)) * 4;
    // scan2 takes inputs in pairs; an odd last input is measured by the JavaScript kernel.
    const simdCount = factor === 4 ? n : n - (n % 2);
    if (factor === 4) this.kernel.scan(COEF_4X_AT, xAt, simdCount, GROUP_MAX_AT, GROUP_FRAMES);
    else if (simdCount > 0)
      this.kernel.scan2(COEF_2X_AT, xAt, simdCount, GROUP_MAX_AT, GROUP_FRAMES);
    const groups = Math.ceil(simdCount / GROUP_FRAMES);
    let bestGroup = -1;
    let best = floor;
    for (let g = 0; g < groups; g++) {
      const v = this.groupMax[g]!;
      if (v > best) {
        best = v;
        bestGroup = g;
      }
    }
    if (bestGroup >= 0) {
      const groupFrom = from + bestGroup * GROUP_FRAMES;
      const groupTo = Math.min(from + simdCount, groupFrom + GROUP_FRAMES);
      // Floor −1 so the group's exact maximum and its position are always found.
      if (factor === 4) scanTruePeak4x(x, groupFrom, groupTo, -1, out);
      else scanTruePeak2x(x, groupFrom, groupTo, -1, out);
      if (out.peak <= floor) {
        out.peak = floor;
        out.atIndex = -1;
      }
    }
    if (simdCount < n) {
      scanTruePeak2x(x, to - 1, to, out.peak, this.tail);
      if (this.tail.atIndex >= 0) {
        out.peak = this.tail.peak;
        out.atIndex = this.tail.atIndex;
      }
    }
  }
}
