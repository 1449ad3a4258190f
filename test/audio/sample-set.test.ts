import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildSampleSet, checkSetPlays, fileStem, keyFromName, loadSampleSet, playSampleSet, readSourceFolder, rootKeyFromName } from '../../src/audio/sample-set.js';
import { writeWav } from '../../src/audio/wav.js';
import { formatSpelledPitch, keyOf, parseFifthsRange, parseSpelledPitch, parseWindow, spellKey } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { createEngine, createRouter } from '../../src/router/setup.js';
import { fixedSpeller } from '../../src/spelling/speller.js';
import { A440, frequency, parseReference } from '../../src/tuning/index.js';
import { measureFrequency } from '../support/signal.js';
import { tempDir } from '../support/temp.js';
import { runCli } from '../cli/run-cli.js';

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

  // Key numbers: MIDI 1.0 (C4 = 60 as the project's scientific octaves: common practice, no source).
  it('reads a key from a name only where the naming rule describes one', () => {
    expect(keyFromName('C-1.wav')).toBe(0);
    expect(keyFromName('G9.wav')).toBe(127);
    expect(keyFromName('piano_072.wav')).toBe(72);
    expect(keyFromName('60.wav')).toBe(60); // a name that is only a number
    expect(keyFromName('7.wav')).toBe(7);
    expect(keyFromName('Key 61.wav')).toBeUndefined(); // `key` joins its number
    expect(keyFromName('F♯5.wav')).toBe(78);
    expect(keyFromName('C4 060.wav')).toBe(60); // two words, one key
    for (const name of ['s2.wav', 'take 2.wav', 'b3.wav', 'c4.wav', 'C4soft.wav', 'harpsichordC4.wav', 'take 2024.wav', 'x12.wav']) {
      expect(rootKeyFromName(name), name).toEqual({ kind: 'none' });
    }
    expect(rootKeyFromName('C4 take 062.wav')).toEqual({ kind: 'problem', problem: 'the name gives C4 (key 60) and 062 (key 62)' });
    expect(rootKeyFromName('200.wav')).toEqual({ kind: 'problem', problem: "the name gives 200, key 200, outside MIDI's 0–127" });
    expect(rootKeyFromName('G#9.wav')).toMatchObject({ kind: 'problem' });
  });

  /** A folder with one short WAV per name (no smpl chunk) and, if given, a map.json. */
  function folderOf(names: string[], map?: unknown): string {
    const dir = tempDir('diesis-names-');
    for (const name of names) writeFileSync(join(dir, name), writeWav({ sampleRate: RATE, channels: [new Float32Array(64)] }, 16));
    if (map !== undefined) writeFileSync(join(dir, 'map.json'), JSON.stringify(map));
    return dir;
  }

  it('reports a name the rule does not describe instead of guessing a key from it', () => {
    const dir = folderOf(['C4.wav', 's2.wav']);
    expect(() => readSourceFolder(dir)).toThrow(new RegExp(`^${join(dir, 's2.wav').replace(/[.\\]/gu, '\\$&')}: no root key: name it after its note`, 'u'));
    const two = folderOf(['C4 take 062.wav']);
    expect(() => readSourceFolder(two)).toThrow(/C4 take 062\.wav: the name gives C4 \(key 60\) and 062 \(key 62\): rename it, or give its key in map\.json$/u);
    // The map decides for a name that does not say.
    expect(readSourceFolder(folderOf(['C4.wav', 's2.wav'], { 's2.wav': { key: 62 } })).map((s) => s.rootKey)).toEqual([60, 62]);
  });

  it('refuses a map.json entry naming a file the folder does not have, in one line', () => {
    const dir = folderOf(['C4.wav'], { 'C4.wav': { key: 60 }, 'D4.wav': { key: 62 } });
    const mapFile = join(dir, 'map.json');
    expect(() => readSourceFolder(dir)).toThrow(`${mapFile}: "D4.wav": no such file in the folder`);
    expect(() => readSourceFolder(folderOf(['C4.wav'], { 'c4.wav': { key: 60 } }))).toThrow(/"c4\.wav": no such file in the folder \(there is "C4\.wav": names must match exactly\)$/u);
    const notWav = folderOf(['C4.wav'], { 'map.json': { key: 60 } });
    expect(() => readSourceFolder(notWav)).toThrow(/"map\.json": is not a \.wav file/u);
  });

  it('diesis samples stops on such a folder with one line and exit code 1, writing nothing', async () => {
    const dir = folderOf(['C4.wav'], { 'D4.wav': { key: 62 } });
    const to = join(tempDir('diesis-set-'), 'out');
    const result = await runCli('samples', '--from', dir, '--to', to);
    expect(result.code).toBe(1);
    expect(result.stderr).toBe(`diesis: ${join(dir, 'map.json')}: "D4.wav": no such file in the folder\n`);
    expect(existsSync(to)).toBe(false);
  });

  it('maps every spelling to its own file, channel and key', () => {
    expect(manifest.layout.map((l) => l.spelling)).toEqual(['Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#', 'G#']);
    expect(manifest.files).toHaveLength(25); // keys 48–72, one spelling each in this window
    for (const f of manifest.files) {
      const pitch = parseSpelledPitch(f.spelling);
      expect(keyOf(pitch)).toBe(f.key);
      expect(manifest.layout.find((l) => l.channel === f.channel)?.fifths).toBe(pitch.fifths);
      expect(Math.abs(1200 * Math.log2(f.hz / frequency(meantone, A440, pitch)))).toBeLessThan(1e-5); // as written: rounded to 10 digits
      expect(existsSync(join(out, f.file))).toBe(true);
    }
    const sfz = readFileSync(join(out, 'diesis.sfz'), 'utf8');
    expect(sfz).toMatch(/<group> lochan=12 hichan=12[^\n]*\n<region> sample=Gs3\.wav lokey=56 hikey=56 pitch_keycenter=56 loop_mode=loop_continuous/u);
  });

  /** Significant digits of a number as JSON writes it (123.45 → 5, 0.0123 → 3, 440 → 3). */
  const significantDigits = (token: string): number => token.replace(/^-?0*\.?0*/u, '').replace('.', '').length;

  it('writes manifest.json with its figures rounded, and reads it back to the same map and frequencies', () => {
    const text = readFileSync(join(out, 'manifest.json'), 'utf8');
    const hzTokens = [...text.matchAll(/"hz": ([-\d.e+]+)/gu)].map((m) => m[1]!);
    const shiftTokens = [...text.matchAll(/"shiftCents": ([-\d.e+]+)/gu)].map((m) => m[1]!);
    expect(hzTokens).toHaveLength(25);
    expect(shiftTokens).toHaveLength(25);
    for (const t of hzTokens) expect(significantDigits(t), t).toBeLessThanOrEqual(10);
    for (const t of shiftTokens) expect(t.split('.')[1]?.length ?? 0, t).toBeLessThanOrEqual(4);
    const set = loadSampleSet(out);
    // The layout as built: the window's spellings on channels 1–12 in order along the line of fifths,
    // E♭ three fifths below C to G♯ eight above (common practice, no source).
    expect([...set.layout]).toEqual(Array.from({ length: 12 }, (_, i) => [i - 3, i]));
    for (const f of set.manifest.files) {
      const pitch = parseSpelledPitch(f.spelling);
      expect(keyOf(pitch)).toBe(f.key);
      expect(set.layout.get(pitch.fifths)).toBe(f.channel - 1);
      expect(set.audio(f.channel - 1, f.key)).toBeDefined();
      // The frequency read back is the spelling's (from the tuning core) to far under the 0.01 cent the set is checked to.
      expect(Math.abs(1200 * Math.log2(f.hz / frequency(meantone, A440, pitch))), f.spelling).toBeLessThan(1e-5);
    }
    expect(() => checkSetPlays(set, { tuning: meantone, tuningName: 'quarter-comma', reference: A440 })).not.toThrow();
    // 440.1 Hz is 0.39 cent above 440 (1200·log2(440.1/440)): the read-back still tells them apart.
    expect(() => checkSetPlays(set, { tuning: meantone, tuningName: 'quarter-comma', reference: parseReference('A4=440.1') })).toThrow(/would be 0\.39 cents off/u);
  });

  it('keeps a very low set’s frequencies within 0.01 cent too (the rounding is relative, not a fixed number of places)', () => {
    // A4 = 1 Hz (the lowest reference diesis takes) puts keys 0–12 between about 0.019 and 0.037 Hz;
    // the source's frequency comes from map.json.
    const dir = folderOf(['F#-1.wav'], { 'F#-1.wav': { key: 6, hz: 0.026 } });
    const low = join(tempDir('diesis-set-'), 'low');
    const reference = parseReference('A4=1');
    buildSampleSet({ sources: readSourceFolder(dir), tuning: meantone, tuningName: 'quarter-comma', reference, range: parseFifthsRange('Eb..G#'), compass: { low: 0, high: 12 }, maxShift: 12 }, low);
    expect(() => checkSetPlays(loadSampleSet(low), { tuning: meantone, tuningName: 'quarter-comma', reference })).not.toThrow();
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
