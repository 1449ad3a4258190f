import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildSampleSet, fileStem, keyFromName, loadSampleSet, playSampleSet, readSourceFolder } from '../../src/audio/sample-set.js';
import { writeWav } from '../../src/audio/wav.js';
import { formatSpelledPitch, keyOf, parseFifthsRange, parseSpelledPitch, parseWindow, spellKey } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { createEngine, createRouter } from '../../src/router/setup.js';
import { fixedSpeller } from '../../src/spelling/speller.js';
import { A440, frequency, parseReference } from '../../src/tuning/index.js';
import { measureFrequency } from '../support/signal.js';
import { tempDir } from '../support/temp.js';

const RATE = 48_000;
const meantone = loadTuningPreset('meantone-1-4').tuning;

/** Synthesises a player's sample folder: a plucked-like tone with harmonics every third key, 12-ET at A4 = 440, looped. */
function sourceFolder(keys: number[]): string {
  const dir = tempDir('diesis-src-');
  for (const key of keys) {
    const hz = 440 * 2 ** ((key - 69) / 12);
    const samples = Float32Array.from({ length: RATE * 1.5 }, (_, n) => {
      const t = n / RATE;
      return 0.3 * (Math.sin(2 * Math.PI * hz * t) + 0.3 * Math.sin(4 * Math.PI * hz * t) + 0.1 * Math.sin(6 * Math.PI * hz * t));
    });
    const name = `${formatSpelledPitch(spellKey(parseWindow('Eb..G#'), key)).replace('#', 's')}.wav`;
    writeFileSync(join(dir, name), writeWav({ sampleRate: RATE, channels: [samples], loop: { start: RATE * 0.5, end: RATE * 1.4 } }, 24));
  }
  return dir;
}

describe('retuned sample sets', () => {
  const sources = sourceFolder([48, 51, 54, 57, 60, 63, 66, 69, 72]);
  const out = join(tempDir('diesis-set-'), 'meantone');
  const manifest = buildSampleSet(
    { sources: readSourceFolder(sources), tuning: meantone, tuningName: 'quarter-comma', reference: A440, range: parseFifthsRange('Eb..G#'), compass: { low: 48, high: 72 }, maxShift: 2 },
    out,
  );

  it('reads root keys from names, map.json or the smpl chunk', () => {
    expect(keyFromName('harpsichord-C4.wav')).toBe(60);
    expect(keyFromName('Bb3 soft.wav')).toBe(58);
    expect(keyFromName('Fs5.wav')).toBe(78);
    expect(keyFromName('060.wav')).toBe(60);
    expect(keyFromName('key61.wav')).toBe(61);
    expect(keyFromName('mystery.wav')).toBeUndefined();
    expect(fileStem(parseSpelledPitch('G#4'), 4)).toBe('Gs4');
  });

  it('maps every spelling to its own file, channel and key', () => {
    expect(manifest.layout.map((l) => l.spelling)).toEqual(['Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#', 'G#']);
    expect(manifest.files).toHaveLength(25); // keys 48–72, one spelling each in this window
    for (const f of manifest.files) {
      const pitch = parseSpelledPitch(f.spelling);
      expect(keyOf(pitch)).toBe(f.key);
      expect(manifest.layout.find((l) => l.channel === f.channel)?.fifths).toBe(pitch.fifths);
      expect(f.hz).toBeCloseTo(frequency(meantone, A440, pitch), 9);
      expect(existsSync(join(out, f.file))).toBe(true);
    }
    const sfz = readFileSync(join(out, 'diesis.sfz'), 'utf8');
    expect(sfz).toMatch(/<group> lochan=12 hichan=12[^\n]*\n<region> sample=Gs3\.wav lokey=56 hikey=56 pitch_keycenter=56 loop_mode=loop_continuous/u);
  });

  it('drops a note outside the compass the set was built for, and says why, instead of sending it to silence', () => {
    const set = loadSampleSet(out); // built for keys 48–72
    const { router, tally } = createEngine({
      tuning: meantone,
      reference: A440,
      mode: 'samples',
      sampleLayout: set.layout,
      sampleKeys: new Set(set.manifest.files.map((f) => (f.channel - 1) * 128 + f.key)),
      speller: fixedSpeller(),
    });
    router.start(0);
    expect(router.process(0, [0x90, 36, 100]).map((m) => m.data)).toEqual([]); // C2: below the set’s compass
    expect(router.process(1, [0x90, 60, 100]).some((m) => (m.data[0]! & 0xf0) === 0x90)).toBe(true);
    expect(tally.notesDropped).toBe(1);
    expect(tally.dropSummary()).toMatch(/1: the sample set has no sample for key 36/u);
  });

  it('sounds every note at its spelling’s frequency within 0.1 cent, through the samples mode of the engine', () => {
    const set = loadSampleSet(out);
    const router = createRouter({ tuning: meantone, reference: A440, mode: 'samples', sampleLayout: set.layout, speller: fixedSpeller() });
    const messages = [...router.start(0)];
    const keys = [48, 51, 56, 61, 63, 66, 68, 70, 72];
    keys.forEach((key, i) => {
      messages.push(...router.process(i * 600, [0x90, key, 100]), ...router.process(i * 600 + 450, [0x80, key, 0]));
    });
    const audio = playSampleSet(messages, set, RATE).channels[0]!;
    keys.forEach((key, i) => {
      const expected = frequency(meantone, A440, spellKey(parseWindow('Eb..G#'), key));
      const from = Math.round((i * 0.6 + 0.05) * RATE);
      const measured = measureFrequency(audio, RATE, expected, from, from + Math.round(0.35 * RATE));
      expect(Math.abs(1200 * Math.log2(measured / expected)), `key ${key}`).toBeLessThan(0.1);
    });
  });

  it('refuses a range the sources cannot reach, leaving nothing half-written', () => {
    const target = join(tempDir('diesis-set-'), 'far');
    expect(() =>
      buildSampleSet(
        { sources: readSourceFolder(sources), tuning: meantone, tuningName: 'q', reference: parseReference('A4=415'), range: parseFifthsRange('Eb..G#'), compass: { low: 40, high: 90 }, maxShift: 1 },
        target,
      ),
    ).toThrow(/semitones from the nearest sample, .*the limit is 1/u);
    expect(existsSync(target)).toBe(false);
    expect(readdirSync(dirname(target))).toEqual([]); // no temporary folder left beside it
  });

  it('names the file when a source has no root or is not PCM', () => {
    const dir = tempDir('diesis-bad-');
    writeFileSync(join(dir, 'mystery.wav'), writeWav({ sampleRate: RATE, channels: [new Float32Array(10)] }, 16));
    expect(() => readSourceFolder(dir)).toThrow(/mystery\.wav: no root key/u);
    const empty = join(dir, 'none');
    mkdirSync(empty);
    expect(() => readSourceFolder(empty)).toThrow(/no \.wav files/u);
  });
});
