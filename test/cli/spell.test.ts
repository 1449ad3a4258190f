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
