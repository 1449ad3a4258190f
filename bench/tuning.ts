import { buildChart } from '../src/chart/chart.js';
import { parseFifthsRange, spellKey, DEFAULT_WINDOW } from '../src/pitch/index.js';
import { loadBuiltInTuningPresets } from '../src/presets/tuning-presets.js';
import { A440, DEFAULT_WOLF_LIMITS, frequency } from '../src/tuning/index.js';
import { heading, measure } from './timing.js';

/** Cost of the exact tuning path: one spelled frequency, and a whole default chart, per preset kind. */
export function benchTuning(): void {
  heading('tuning: exact frequency of a spelled pitch, and a whole chart (Gb..A#)');
  const keys = Array.from({ length: 88 }, (_, i) => spellKey(DEFAULT_WINDOW, 21 + i));
  const range = parseFifthsRange('Gb..A#');
  for (const preset of loadBuiltInTuningPresets().filter((p) => ['meantone-1-4', 'just-major', 'werckmeister-3', 'edo-31'].includes(p.id))) {
    let i = 0;
    const freq = measure(() => {
      frequency(preset.tuning, A440, keys[i++ % keys.length]!);
    });
    const chart = measure(() => {
      buildChart({ tuning: preset.tuning, reference: A440, range, octave: 4, wolfLimits: DEFAULT_WOLF_LIMITS });
    }, 300);
    process.stdout.write(
      `${preset.id.padEnd(16)} frequency ${freq.microseconds.toFixed(2).padStart(7)} µs (${Math.round(freq.perSecond).toLocaleString('en')}/s)   chart ${chart.microseconds.toFixed(0).padStart(6)} µs\n`,
    );
  }
}
