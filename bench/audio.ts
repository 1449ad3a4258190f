import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { renderPreview } from '../src/audio/preview.js';
import { buildSampleSet, loadSampleSet, playSampleSet, readSourceFolder } from '../src/audio/sample-set.js';
import { writeWav } from '../src/audio/wav.js';
import { parseFifthsRange } from '../src/pitch/index.js';
import { loadTuningPreset } from '../src/presets/tuning-presets.js';
import { renderEvents } from '../src/render/render-midi.js';
import { createEngine } from '../src/router/setup.js';
import { A440 } from '../src/tuning/index.js';
import { loadCorpus } from './corpus.js';
import { heading } from './timing.js';

/** Render speed of the preview voice and of a sample set on a corpus movement, and sample-set build time. */
export function benchAudio(): void {
  const movement = loadCorpus().find((m) => m.name === 'sonata01-2');
  if (!movement) return;
  heading(`audio: rendering ${movement.name} at 44.1 kHz (seconds of audio per second of compute)`);
  const tuning = loadTuningPreset('meantone-1-4').tuning;
  const timed = (mode: 'bend' | 'samples', layout?: ReadonlyMap<number, number>) => {
    let times: number[] = [];
    const { messages } = renderEvents(movement.midi, createEngine({ tuning, reference: A440, mode, sampleLayout: layout, gather: 'same-time' }), undefined, (t) => (times = t));
    return messages.map((m, i) => ({ time: times[i] ?? 0, data: m.data }));
  };
  const measure = (label: string, render: () => { channels: readonly Float32Array[]; sampleRate: number }) => {
    const t0 = performance.now();
    const audio = render();
    const seconds = (performance.now() - t0) / 1000;
    const length = (audio.channels[0]?.length ?? 0) / audio.sampleRate;
    process.stdout.write(`${label.padEnd(22)} ${length.toFixed(1)} s of audio in ${seconds.toFixed(2)} s: ${(length / seconds).toFixed(1)}× real time\n`);
  };
  const bend = timed('bend');
  measure('built-in voice (pluck)', () => renderPreview(bend, { sampleRate: 44_100, voice: 'pluck' }));
  // A source set made here: one tone every third key, 2 s each, looped.
  const work = mkdtempSync(join(tmpdir(), 'diesis-bench-'));
  const dir = join(work, 'sources');
  mkdirSync(dir);
  for (let key = 36; key <= 96; key += 3) {
    const hz = 440 * 2 ** ((key - 69) / 12);
    const samples = Float32Array.from({ length: 88_200 }, (_, n) => 0.3 * Math.sin((2 * Math.PI * hz * n) / 44_100) * Math.exp(-n / 44_100));
    writeFileSync(join(dir, `${String(key).padStart(3, '0')}.wav`), writeWav({ sampleRate: 44_100, channels: [samples], loop: { start: 44_100, end: 88_000 } }, 16));
  }
  const out = join(work, 'set'); // beside the sources, never inside them
  const t0 = performance.now();
  const manifest = buildSampleSet({ sources: readSourceFolder(dir), tuning, tuningName: 'quarter-comma', reference: A440, range: parseFifthsRange('Eb..G#'), compass: { low: 36, high: 96 }, maxShift: 2 }, out);
  const build = (performance.now() - t0) / 1000;
  process.stdout.write(`sample-set build        ${manifest.files.length} samples of 2 s in ${build.toFixed(2)} s: ${((build / manifest.files.length) * 1000).toFixed(0)} ms per output sample\n`);
  const set = loadSampleSet(out);
  const samples = timed('samples', set.layout);
  measure('sample set', () => playSampleSet(samples, set, 44_100));
  rmSync(work, { recursive: true, force: true });
}
