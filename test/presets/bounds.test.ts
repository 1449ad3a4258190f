import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../cli/run-cli.js';
import { tempDir } from '../support/temp.js';

const dir = tempDir('diesis-bounds-');
// Mozart piano sonatas, derived from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe,
// CC BY-NC-SA 4.0 (see corpus/mozart/LICENSE.md).
const MOVEMENT = join(import.meta.dirname, '../../corpus/mozart/sonata01-2.mid');

function preset(name: string, body: Record<string, unknown>): string {
  const file = join(dir, `${name}.json`);
  writeFileSync(file, JSON.stringify({ name, description: 'a test of limits', source: 'none', ...body }));
  return file;
}

const chainOf = (odd: unknown): unknown[] => ['pure', 'pure', 'pure', odd, 'pure', 'pure', 'pure', 'pure', 'pure', 'pure', 'pure'];

describe('tuning presets with numbers that cannot play are refused by check and by loading', () => {
  it.each([
    ['a fifth tempered by a million commas', { kind: 'regular', fifth: '-1000000/1 syntonic' }, /:\d+: fifth: "-1000000\/1 syntonic" comes to -21506\d{3} cents; an interval here must lie within ±4800 cents/u],
    ['cents of twenty digits', { kind: 'regular', fifth: { cents: 12345678901234567890 } }, /:\d+: fifth: cents 12345678901234567000 is outside ±4800/u],
    ['cents of twenty digits in a table', { kind: 'circulating', cents: { C: 0, 'C#': 12345678901234567890, D: 200, Eb: 300, E: 400, F: 500, 'F#': 600, G: 700, Ab: 800, A: 900, Bb: 1000, B: 1100 } }, /:\d+: cents\.C#: cents 12345678901234567000 is outside ±4800/u],
    ['a comma of 25 digits (trial division would never end)', { kind: 'regular', fifth: '-1/4 1000000000000000000000007/1' }, /unknown comma "1000000000000000000000007\/1"/u],
    ['a ratio of 25 digits', { kind: 'just', degrees: { C: '1/1', G: '1000000000000000000000007/2' } }, /:\d+: degrees\.G: "1000000000000000000000007\/2" has a term of more than 12 digits/u],
    ['a tempering amount of 30 digits', { kind: 'regular', fifth: '-1/100000000000000000000000000000 syntonic' }, /has more than 9 digits/u],
    ['an edo of a billion', { kind: 'regular', fifth: { edo: 1000000000 } }, /:\d+: fifth: edo must be a whole number from 1 to 10000/u],
    ['a fifth of 1000 cents', { kind: 'regular', fifth: { cents: 1000 } }, /:\d+: fifth: a fifth of 1000\.0 cents cannot be played on a keyboard; a fifth must lie between 600 and 800 cents/u],
    ['a chain fifth far from 3/2', { kind: 'circulating', chain: { start: 'Ab', fifths: chainOf({ ratio: '2/1' }) } }, /:\d+: chain\.fifths\[3\]: a fifth of 1200\.0 cents cannot be played/u],
  ])('%s', async (name, body, message) => {
    const file = preset(name.replace(/\W+/gu, '-'), body);
    const checked = await runCli('check', file);
    expect(checked.code).toBe(1);
    expect(checked.stderr).toMatch(message);
    for (const args of [['spell', MOVEMENT, '-t', file], ['chart', file]]) {
      const used = await runCli(...args);
      expect(used.code, args.join(' ')).toBe(1);
      expect(used.stderr.trim().split('\n')).toHaveLength(1);
      expect(used.stderr).toMatch(message);
    }
  });

  it('still accepts what plays: 53-EDO, a fifth in exact cents, a ratio of 10 digits', async () => {
    const fine = [
      preset('edo53', { kind: 'regular', fifth: { edo: 53 } }),
      preset('cents', { kind: 'regular', fifth: { cents: 696.5784284662087 } }),
      preset('pyth-ratio', { kind: 'regular', fifth: { ratio: '3/2', temper: '-1/12 531441/524288' } }),
      preset('just-big', { kind: 'just', degrees: { C: '1/1', E: '5/4', G: '3/2', 'G#': '3486784401/2147483648' } }),
    ];
    for (const file of fine) expect((await runCli('check', file)).stdout, file).toMatch(/: ok: /u);
  });
});
