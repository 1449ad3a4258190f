/**
 * Band-limited resampling by windowed sinc (Kaiser window), for changing a sample's pitch by an
 * exact ratio: the output, at the same sample rate, sounds `ratio` times higher. When the pitch
 * goes up, the kernel's cut-off comes down with it, so nothing folds back below Nyquist.
 */
export interface ResampleOptions {
  /** Zero crossings of the sinc on each side (at the narrowest); more is cleaner and slower. */
  readonly halfWidth?: number;
  /** Kaiser window β: about 10 gives a stopband near −100 dB. */
  readonly beta?: number;
  /** Cut-off as a share of the (lowered) Nyquist frequency, leaving room for the transition band. */
  readonly rolloff?: number;
}

function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  for (let k = 1; k < 50; k++) {
    term *= (x / (2 * k)) ** 2;
    sum += term;
    if (term < sum * 1e-17) break;
  }
  return sum;
}

export interface Resampler {
  /** The value of the resampled signal at input position `t` (in input samples). */
  at(input: Float32Array | Float64Array, t: number): number;
}

/** A kernel for one ratio; `at` interpolates a band-limited value anywhere between input samples. */
export function resampler(ratio: number, options: ResampleOptions = {}): Resampler {
  const halfWidth = options.halfWidth ?? 32;
  const beta = options.beta ?? 10;
  const rolloff = options.rolloff ?? 0.94;
  const stretch = Math.max(1, ratio);
  const cutoff = (0.5 * rolloff) / stretch; // cycles per input sample
  const reach = Math.ceil(halfWidth * stretch);
  const i0Beta = besselI0(beta);
  // A finely tabulated kernel, linearly interpolated: exact enough far below −100 dB.
  const steps = 2048;
  const table = new Float64Array(reach * steps + 2);
  for (let i = 0; i < table.length; i++) {
    const d = i / steps;
    const u = d / reach;
    const window = u >= 1 ? 0 : besselI0(beta * Math.sqrt(1 - u * u)) / i0Beta;
    const x = 2 * cutoff * d;
    table[i] = 2 * cutoff * (x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x)) * window;
  }
  const kernel = (d: number): number => {
    const p = Math.abs(d) * steps;
    const i = Math.floor(p);
    if (i >= table.length - 1) return 0;
    const f = p - i;
    return table[i]! * (1 - f) + table[i + 1]! * f;
  };
  return {
    at(input, t) {
      const centre = Math.floor(t);
      let sum = 0;
      const from = Math.max(0, centre - reach + 1);
      const to = Math.min(input.length - 1, centre + reach);
      for (let k = from; k <= to; k++) sum += input[k]! * kernel(t - k);
      return sum;
    },
  };
}

/** Resamples a whole signal: output sample n is the input at position n · ratio (pitch up by `ratio`). */
export function resample(input: Float32Array, ratio: number, options?: ResampleOptions): Float32Array {
  const r = resampler(ratio, options);
  const length = Math.floor((input.length - 1) / ratio) + 1;
  const out = new Float32Array(length);
  for (let n = 0; n < length; n++) out[n] = r.at(input, n * ratio);
  return out;
}
