import { describe, expect, it } from 'vitest';
import { resample } from '../../src/audio/resample.js';
import { parseSpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { A440, frequency } from '../../src/tuning/index.js';
import { measureFrequency, rmsDb, sine, thdPlusNoise } from '../support/signal.js';

const RATE = 48_000;

describe('band-limited resampling', () => {
  it('moves a 440 Hz sine to quarter-comma G♯4 within 0.05 cent, THD+N below −80 dB', () => {
    const target = frequency(loadTuningPreset('meantone-1-4').tuning, A440, parseSpelledPitch('G#4')); // 411.22 Hz
    const out = resample(sine(440, RATE, 2), target / 440);
    const skip = 4000; // away from the ends, where the kernel runs out of input
    const measured = measureFrequency(out, RATE, target, skip, out.length - skip);
    expect(Math.abs(1200 * Math.log2(measured / target))).toBeLessThan(0.05);
    expect(thdPlusNoise(out, RATE, measured, skip, out.length - skip)).toBeLessThan(-80);
  });

  it('keeps a tone clean when the pitch goes up a fifth too', () => {
    const out = resample(sine(1000, RATE, 1), 1.5);
    const skip = 4000;
    expect(thdPlusNoise(out, RATE, measureFrequency(out, RATE, 1500, skip, out.length - skip), skip, out.length - skip)).toBeLessThan(-80);
  });

  it('lets nothing fold back: a sweep of tones pushed past Nyquist leaves less than −80 dB', () => {
    // Tones from 14 to 23 kHz, raised by a major third (×1.26): every one lands above 17.6 kHz and
    // those above 24 kHz must vanish; whatever is left below 16 kHz can only be aliasing.
    const ratio = 1.26;
    for (const hz of [20_000, 21_000, 22_000, 23_000]) {
      const out = resample(sine(hz, RATE, 0.5), ratio);
      const skip = 4000;
      expect(rmsDb(out, skip, out.length - skip) - rmsDb(sine(hz, RATE, 0.5))).toBeLessThan(-80);
    }
  });
});
