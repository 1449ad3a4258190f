import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readWav } from '../../src/audio/wav.js';
import { parseSpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { writeMidiFile } from '../../src/render/smf.js';
import { frequency, parseReference } from '../../src/tuning/index.js';
import { measureFrequency } from '../support/signal.js';
import { runCli } from './run-cli.js';
import { tempDir } from '../support/temp.js';

const dir = tempDir('diesis-preview-');

describe('audio preview', () => {
  it('renders a file at the tuned frequencies with the built-in voice (-o not needed)', async () => {
    // Three notes of our own, one at a time: G♯4, E♭4, C♯5, a second each at 120 bpm (480 ticks per beat).
    const keys = [68, 63, 73];
    const events = keys.flatMap((k, i) => [
      { tick: i * 960, data: [0x90, k, 100] },
      { tick: i * 960 + 800, data: [0x80, k, 0] },
    ]);
    const input = join(dir, 'three.mid');
    writeFileSync(input, writeMidiFile({ ticksPerBeat: 480 }, [], [events]));
    const wav = join(dir, 'three.wav');
    const result = await runCli('render', input, '--wav', wav, '--spelling', 'fixed', '--ref', 'A4=415', '--rate', '48000', '--bits', '24', '--layout', 'multi', '--bend-range', '2');
    expect(result.code).toBe(0);
    expect(result.stdout).toContain(`→ ${wav}`);
    const audio = readWav(readFileSync(wav), wav);
    expect(audio.sampleRate).toBe(48_000);
    const tuning = loadTuningPreset('meantone-1-4').tuning;
    ['G#4', 'Eb4', 'C#5'].forEach((name, i) => {
      const expected = frequency(tuning, parseReference('A4=415'), parseSpelledPitch(name));
      const from = Math.round((i * 1 + 0.1) * 48_000);
      const measured = measureFrequency(audio.channels[0]!, 48_000, expected, from, from + 30_000);
      expect(Math.abs(1200 * Math.log2(measured / expected)), name).toBeLessThan(0.1); // within the ±2 bend step
    });
  });

  it('writes the chart’s intervals as dyads to listen to', async () => {
    const file = join(dir, 'listen.wav');
    const result = await runCli('chart', 'meantone-1-4', '--from', 'Eb', '--to', 'G#', '--listen', file);
    expect(result.code).toBe(0);
    const audio = readWav(readFileSync(file), file);
    const intervals = 11 + 1 + 8 + 4; // P5s, the one d6 (G♯–E♭), M3s, d4s within Eb..G#
    expect(audio.channels[0]!.length).toBe(intervals * Math.round(2.9 * 44_100));
  });
});

describe('diesis samples', () => {
  it('builds a set from a folder and says how to play it; refuses what it cannot reach', async () => {
    const { writeWav } = await import('../../src/audio/wav.js');
    const src = join(dir, 'src');
    (await import('node:fs')).mkdirSync(src);
    for (const key of [57, 60, 63, 66, 69]) {
      const hz = 440 * 2 ** ((key - 69) / 12);
      writeFileSync(join(src, `${key}.wav`), writeWav({ sampleRate: 44_100, channels: [Float32Array.from({ length: 22_050 }, (_, n) => 0.3 * Math.sin((2 * Math.PI * hz * n) / 44_100))] }, 16));
    }
    const to = join(dir, 'set');
    const ok = await runCli('samples', '--from', src, '--to', to, '-t', 'werckmeister-3', '--compass', '57-69', '--range', 'Eb..G#');
    expect(ok.code).toBe(0);
    expect(ok.stdout).toMatch(/13 samples from 5 sources, Werckmeister III/u);
    expect(ok.stdout).toContain(`--sample-set ${to}`);
    const far = await runCli('samples', '--from', src, '--to', join(dir, 'far'), '--compass', '30-100');
    expect(far.code).toBe(1);
    expect(far.stderr).toMatch(/semitones from the nearest sample/u);
    const tooMany = await runCli('samples', '--from', src, '--to', join(dir, 'many'), '--range', 'Gb..B#');
    expect(tooMany.stderr).toMatch(/at most 16/u);
    // The set plays through the engine: render with it as a preview.
    const input = join(dir, 'three.mid');
    const wav = await runCli('render', input, '--wav', join(dir, 'set.wav'), '--sample-set', to, '-t', 'werckmeister-3');
    expect(wav.code).toBe(0);
    expect(wav.stdout).toMatch(/samples on channels 1–12/u);
  });
});
