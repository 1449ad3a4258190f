/**
 * Measurements on audio for the tests, independent of the code under test: frequency from the
 * slope of the demodulated phase, and THD+N as the power left after fitting a pure sine.
 */

/** Estimates a tone's frequency near `guess` Hz: demodulate by `guess`, take each block's phase (Hann-weighted), fit a line. */
export function measureFrequency(x: ArrayLike<number>, sampleRate: number, guess: number, from = 0, to = x.length): number {
  const block = 2048;
  const phases: number[] = [];
  const centres: number[] = [];
  for (let start = from; start + block <= to; start += block / 2) {
    let re = 0;
    let im = 0;
    for (let n = 0; n < block; n++) {
      const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * n) / (block - 1));
      const t = (start + n) / sampleRate;
      const v = x[start + n]! * w;
      re += v * Math.cos(2 * Math.PI * guess * t);
      im -= v * Math.sin(2 * Math.PI * guess * t);
    }
    phases.push(Math.atan2(im, re));
    centres.push((start + block / 2) / sampleRate);
  }
  for (let i = 1; i < phases.length; i++) {
    while (phases[i]! - phases[i - 1]! > Math.PI) phases[i]! -= 2 * Math.PI;
    while (phases[i]! - phases[i - 1]! < -Math.PI) phases[i]! += 2 * Math.PI;
  }
  const n = phases.length;
  const mt = centres.reduce((a, b) => a + b, 0) / n;
  const mp = phases.reduce((a, b) => a + b, 0) / n;
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    num += (centres[i]! - mt) * (phases[i]! - mp);
    den += (centres[i]! - mt) ** 2;
  }
  return guess + num / den / (2 * Math.PI);
}

/** THD+N in dB: the power left after a least-squares fit of a sine (and offset) at `hz`, against the sine's. */
export function thdPlusNoise(x: ArrayLike<number>, sampleRate: number, hz: number, from = 0, to = x.length): number {
  let cc = 0;
  let ss = 0;
  let cs = 0;
  let xc = 0;
  let xs = 0;
  for (let n = from; n < to; n++) {
    const c = Math.cos((2 * Math.PI * hz * n) / sampleRate);
    const s = Math.sin((2 * Math.PI * hz * n) / sampleRate);
    cc += c * c;
    ss += s * s;
    cs += c * s;
    xc += x[n]! * c;
    xs += x[n]! * s;
  }
  const det = cc * ss - cs * cs;
  const a = (xc * ss - xs * cs) / det;
  const b = (xs * cc - xc * cs) / det;
  let signal = 0;
  let residual = 0;
  for (let n = from; n < to; n++) {
    const fit = a * Math.cos((2 * Math.PI * hz * n) / sampleRate) + b * Math.sin((2 * Math.PI * hz * n) / sampleRate);
    signal += fit * fit;
    residual += (x[n]! - fit) ** 2;
  }
  return 10 * Math.log10(residual / signal);
}

export function sine(hz: number, sampleRate: number, seconds: number, amplitude = 0.5): Float32Array {
  return Float32Array.from({ length: Math.round(seconds * sampleRate) }, (_, n) => amplitude * Math.sin((2 * Math.PI * hz * n) / sampleRate));
}

export function rmsDb(x: ArrayLike<number>, from = 0, to = x.length): number {
  let sum = 0;
  for (let n = from; n < to; n++) sum += x[n]! ** 2;
  return 10 * Math.log10(sum / (to - from) + 1e-300);
}
