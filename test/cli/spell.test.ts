import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from './run-cli.js';

// Mozart piano sonatas, derived from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe,
// CC BY-NC-SA 4.0 (see corpus/mozart/LICENSE.md).
const movement = join(import.meta.dirname, '../../corpus/mozart/sonata01-2.mid');

interface Row {
  tick: number;
  time: number;
  key: number;
  channel: number;
  spelling: string;
  hz: number;
  cents: number;
}

describe('diesis spell', () => {
  it('writes one JSON object per note-on, in file order, with the documented fields', async () => {
    const { code, stdout } = await runCli('spell', movement, '--json', '--ref', 'A4=415');
    expect(code).toBe(0);
    const rows = stdout.trim().split('\n').map((l) => JSON.parse(l) as Row);
    expect(rows).toHaveLength(1231);
    expect(Object.keys(rows[0]!)).toEqual(['tick', 'time', 'key', 'channel', 'spelling', 'hz', 'cents']);
    expect(rows.every((r, i) => i === 0 || r.tick >= rows[i - 1]!.tick)).toBe(true);
    const a = rows.find((r) => r.key === 69)!;
    expect(a.spelling).toBe('A4');
    expect(a.hz).toBeCloseTo(415, 6); // the reference itself
    expect(a.cents).toBeCloseTo(0, 9);
    // Ticks are the file's own (480 per quarter) and times are seconds through its tempo map.
    expect(rows[1]!.tick).toBe(120);
    expect(rows[1]!.time).toBeGreaterThan(0);
  });

  it('rounds hz to 6 places, cents to 4 and time to the microsecond', async () => {
    const { stdout } = await runCli('spell', movement, '--json', '-t', 'just-major', '--spelling', 'key', '--key', 'C major');
    const rows = stdout.trim().split('\n').map((l) => JSON.parse(l) as Row);
    const places = (n: number): number => (String(n).includes('e') ? Infinity : (String(n).split('.')[1] ?? '').length);
    expect(rows.every((r) => places(r.hz) <= 6 && places(r.cents) <= 4 && places(r.time) <= 6)).toBe(true);
    // Just major on C at A4 = 440: F is 4/3 over C and A 5/3, so F3 = 440 · (4/5) / 2 = 176 Hz exactly (common practice, no source).
    const f = rows.filter((r) => /^F-?\d+$/u.test(r.spelling));
    expect(f.length).toBeGreaterThan(0);
    for (const r of f) expect(r.hz, r.spelling).toBe(176 * 2 ** (Number(r.spelling.slice(1)) - 3));
  });

  it('follows the options: --spelling fixed with --window, or key with --key', async () => {
    const spellingsOf = async (...args: string[]) =>
      new Set(
        (await runCli('spell', movement, '--json', ...args)).stdout
          .trim()
          .split('\n')
          .map((l) => (JSON.parse(l) as Row).spelling.replace(/-?\d+$/u, '')),
      );
    const flats = await spellingsOf('--spelling', 'fixed', '--window', 'Gb..B');
    expect([...flats].every((s) => !s.includes('#'))).toBe(true);
    const sharps = await spellingsOf('--spelling', 'key', '--key', 'E major');
    expect(sharps.has('D#') || sharps.has('G#')).toBe(true);
    expect((await runCli('spell', movement, '--spelling', 'key')).stderr).toMatch(/--spelling key needs --key/u);
  });

  it('ends with a summary: how each black key was spelled, and the wolves that sounded', async () => {
    const { code, stdout } = await runCli('spell', movement, '--spelling', 'fixed', '--ascii');
    expect(code).toBe(0);
    expect(stdout).toMatch(/^1231 notes$/mu);
    expect(stdout).toMatch(/^ {2}G#\/Ab\s+\d+ G#$/mu); // a fixed Eb..G# window: every G♯/A♭ key is G♯
    expect(stdout).toMatch(/wolves sounded:\n {2}(major|minor) (third|sixth)/u);
    expect(stdout).toMatch(/major third +C#-F +\+41\.1 cents from pure, \d+x? ?.*diminished fourth/u);
    expect(stdout).toMatch(/\+41\.1 cents from pure/u); // the quarter-comma diminished fourth: the lesser diesis wide
  });

  it('with follow, the summary names the keys followed; with a fixed window it does not', async () => {
    expect((await runCli('spell', movement, '--ascii')).stdout).toMatch(/^keys followed: [A-G][#b]* (major|minor) \d+ %/mu);
    expect((await runCli('spell', movement, '--spelling', 'fixed')).stdout).not.toMatch(/keys followed/u);
  });

  it('reads a setup file, and lets the command line override it', async () => {
    const setup = join(import.meta.dirname, '../../presets/setups/multitimbral-sampler.json');
    const { stdout } = await runCli('spell', movement, '--setup', setup);
    expect(stdout).toMatch(/Werckmeister III at A4=415 Hz, bend multi on channels 1–16, spelling the key of [A-G]/u);
    const over = await runCli('spell', movement, '--setup', setup, '--tuning', 'pythagorean', '--spelling', 'follow');
    expect(over.stdout).toMatch(/Pythagorean at A4=415 Hz, bend multi on channels 1–16, spelling follow/u);
    const bad = await runCli('spell', movement, '--setup', join(import.meta.dirname, '../fixtures/bad-tuning.json'));
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/bad-tuning\.json:\d+: kind: this is a tuning file, not a setup/u);
  });
});

describe('--key-names and the setup\'s keyNames', () => {
  it('name a piece in D♭ major D♭ (later music) or C♯ (Baroque keyboard music, the default), with no key given', async () => {
    const { writeMidiFile } = await import('../../src/render/smf.js');
    const { writeFileSync } = await import('node:fs');
    const { tempDir } = await import('../support/temp.js');
    // Our own phrase in D♭ major, four times: I–IV–V6–I–vi–ii–V–I.
    const chords = [[49, 65, 68, 73], [54, 66, 70, 73], [56, 65, 68, 72], [49, 65, 68, 73], [46, 65, 70, 73], [51, 63, 66, 70], [56, 60, 63, 68], [49, 65, 68, 73]];
    const events: Array<{ tick: number; data: number[] }> = [];
    let tick = 0;
    for (let round = 0; round < 4; round++)
      for (const keys of chords) {
        keys.forEach((k) => events.push({ tick, data: [0x90, k, 80] }));
        keys.forEach((k) => events.push({ tick: tick + 470, data: [0x80, k, 0] }));
        tick += 480;
      }
    events.sort((a, b) => a.tick - b.tick);
    const dir = tempDir('diesis-key-names-');
    const file = join(dir, 'phrase.mid');
    writeFileSync(file, writeMidiFile({ ticksPerBeat: 480 }, [], [events]));
    const tonic = async (...args: string[]): Promise<Set<string>> =>
      new Set((await runCli('spell', file, '--json', ...args)).stdout.trim().split('\n').map((l) => (JSON.parse(l) as Row).spelling).filter((n) => n.startsWith('C#') || n.startsWith('Db')).map((n) => n.replace(/\d+$/u, '')));
    expect(await tonic()).toEqual(new Set(['C#']));
    expect(await tonic('--key-names', 'later')).toEqual(new Set(['Db']));
    expect((await runCli('spell', file, '--key-names', 'later')).stdout).toMatch(/spelling follow, no key given, later key names\n/u);
    const setup = join(dir, 'later.json');
    writeFileSync(setup, JSON.stringify({ spelling: { follow: { keyNames: 'later' } } }));
    expect(await tonic('--setup', setup)).toEqual(new Set(['Db']));
    expect(await tonic('--setup', setup, '--key-names', 'baroque')).toEqual(new Set(['C#']));
    const refused = await runCli('spell', file, '--spelling', 'fixed', '--key-names', 'later');
    expect(refused.code).toBe(2);
    expect(refused.stderr.trim()).toBe('diesis: --key-names has no effect with --spelling fixed; it names the keys follow finds');
  });
});

describe('--gather applies to files as it does live', () => {
  /**
   * Our own phrase, written as a file (480 ticks a beat, 500 ms a beat): A minor, its dominant, A
   * minor, then an F minor triad, its notes `spread` ticks apart; returns a function that spells it
   * with the given options and gives the F minor triad's spellings.
   */
  async function phraseEndingInFMinor(spread: number): Promise<(...args: string[]) => Promise<string[]>> {
    const { writeMidiFile } = await import('../../src/render/smf.js');
    const { writeFileSync } = await import('node:fs');
    const { tempDir } = await import('../support/temp.js');
    const events: Array<{ tick: number; data: number[] }> = [];
    let tick = 0;
    for (const [i, keys] of [[57, 60, 64], [52, 56, 59, 62], [57, 60, 64], [53, 56, 60]].entries()) {
      keys.forEach((k, j) => events.push({ tick: tick + (i === 3 ? j * spread : 0), data: [0x90, k, 80] }));
      keys.forEach((k) => events.push({ tick: tick + 470, data: [0x80, k, 0] }));
      tick += 480;
    }
    events.sort((a, b) => a.tick - b.tick);
    const file = join(tempDir('diesis-gather-'), 'phrase.mid');
    writeFileSync(file, writeMidiFile({ ticksPerBeat: 480 }, [], [events]));
    return async (...args) => (await runCli('spell', file, '--json', ...args)).stdout.trim().split('\n').slice(-3).map((l) => (JSON.parse(l) as Row).spelling);
  }

  it('a chord spread over a few milliseconds is spelled as one chord with --gather, not note by note', async () => {
    const last = await phraseEndingInFMinor(12); // rolled over 25 ms
    // An F minor triad is F–A♭–C (common practice, no source); one note at a time, A♭ after A minor's G♯ reads as G♯.
    expect(await last('--gather', '30')).toEqual(['F3', 'Ab3', 'C4']);
    expect(await last()).toEqual(['F3', 'G#3', 'C4']);
  });

  it('notes with equal onsets in a file are a chord with --gather 0 too (the live default, as setups write it)', async () => {
    const last = await phraseEndingInFMinor(0);
    // An F minor triad is F–A♭–C (common practice, no source), whatever --gather says.
    expect(await last()).toEqual(['F3', 'Ab3', 'C4']);
    expect(await last('--gather', '0')).toEqual(['F3', 'Ab3', 'C4']);
  });
});
