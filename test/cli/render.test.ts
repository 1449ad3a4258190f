import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_WINDOW, spellKey } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { A440, frequency, parseReference, type Reference } from '../../src/tuning/index.js';
import { readWithIndependentParser } from '../support/smf-reader.js';
import { malformation, SynthModel } from '../../src/synth/reference-synth.js';
import { runCli } from './run-cli.js';
import { tempDir } from '../support/temp.js';

// Mozart piano sonatas, derived from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe,
// CC BY-NC-SA 4.0 (see corpus/mozart/LICENSE.md).
const CORPUS = join(import.meta.dirname, '../../corpus/mozart');
const dir = tempDir('diesis-render-');

/**
 * Plays a rendered file into the reference synth model and checks every note against the
 * tuning's frequency for the spelling the fixed window gives its input key, for as long as it
 * sounds (release tails included). Returns the worst error in cents and what was left sounding.
 */
function audit(input: string, output: string, tuningId: string, reference: Reference, tailMs: number): { worst: number; notes: number; left: number } {
  const tuning = loadTuningPreset(tuningId).tuning;
  const inputNotes = readWithIndependentParser(readFileSync(input)).messages.filter((m) => (m.data[0]! & 0xf0) === 0x90 && m.data[2]! > 0);
  const rendered = readWithIndependentParser(readFileSync(output));
  expect(rendered).toMatchObject({ format: 1, tracks: 2 });
  const model = new SynthModel(440, tailMs);
  const expected = new Map<object, number>();
  let next = 0;
  let worst = 0;
  for (const m of rendered.messages) {
    expect(malformation(m.data), JSON.stringify(m.data)).toBeUndefined();
    const voice = model.receive(m.ms, m.data);
    if (voice) {
      const source = inputNotes[next++]!;
      expected.set(voice, frequency(tuning, reference, spellKey(DEFAULT_WINDOW, source.data[1]!)));
    }
    for (const v of model.sounding()) worst = Math.max(worst, Math.abs(1200 * Math.log2(model.frequency(v) / expected.get(v)!)));
  }
  expect(next).toBe(inputNotes.length);
  return { worst, notes: next, left: model.active().length };
}

describe('diesis render', () => {
  const input = join(CORPUS, 'sonata01-1.mid');

  it.each([
    ['bend, MPE ±48', [], 0.293],
    ['bend, multitimbral ±2', ['--layout', 'multi', '--bend-range', '2', '--channels', '1-16'], 0.0123],
    ['mts-note', ['--mode', 'mts-note', '--channels', '1'], 0.0031],
  ] as const)('writes a corpus movement in quarter-comma meantone that sounds in tune: %s', async (_name, extra, tolerance) => {
    const output = join(dir, `out-${_name.replace(/\W+/gu, '-')}.mid`);
    const result = await runCli('render', input, '-o', output, '--tuning', 'meantone-1-4', '--spelling', 'fixed', ...extra);
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/notes\s+2062 in, 2062 out/u);
    const { worst, notes, left } = audit(input, output, 'meantone-1-4', A440, 400);
    expect(notes).toBe(2062);
    expect(worst).toBeLessThan(tolerance);
    expect(left).toBe(0);
  });

  it('honours the reference, the window and the tuning options', async () => {
    const output = join(dir, 'wm3-415.mid');
    const result = await runCli('render', input, '-o', output, '-t', 'werckmeister-3', '--ref', 'A4=415', '--layout', 'multi', '--bend-range', '2', '--release-guard', '100', '--spelling', 'fixed');
    expect(result.code).toBe(0);
    expect(result.stdout).toContain('Werckmeister III at A4=415 Hz');
    expect(audit(input, output, 'werckmeister-3', parseReference('A4=415'), 100).worst).toBeLessThan(0.0123);
  });

  it('closes the file with a panic, so a file that ends with the pedal down leaves nothing sounding', async () => {
    const { writeMidiFile } = await import('../../src/render/smf.js');
    const hanging = join(dir, 'hanging.mid');
    writeFileSync(hanging, writeMidiFile({ ticksPerBeat: 480 }, [], [[{ tick: 0, data: [0xb0, 64, 127] }, { tick: 0, data: [0x90, 60, 90] }, { tick: 480, data: [0x90, 64, 90] }]]));
    const output = join(dir, 'closed.mid');
    expect((await runCli('render', hanging, '-o', output)).code).toBe(0);
    const model = new SynthModel();
    for (const m of readWithIndependentParser(readFileSync(output)).messages) model.receive(m.ms, m.data);
    expect(model.active()).toEqual([]);
  });

  it.each([
    [['render', 'x.mid'], 2, /^diesis: render needs -o OUT\.mid/u],
    [['render', '/nonexistent.mid', '-o', join(dir, 'n.mid')], 1, /^diesis: \/nonexistent\.mid: no such file$/mu],
    [['render', join(CORPUS, 'LICENSE.md'), '-o', join(dir, 'n.mid')], 1, /LICENSE\.md: not a readable Standard MIDI File/u],
    [['render', input, '-o', input], 2, /is an input of this command; diesis never replaces a file it reads/u],
    [['render', input, '-o', join(dir, 'n.mid'), '--mode', 'wobble'], 2, /--mode.*wobble/u],
    [['render', input, '-o', join(dir, 'n.mid'), '--channels', '0-3'], 2, /--channels "0-3"/u],
    [['render', input, '-o', join(dir, 'n.mid'), '--channels', '3,5,9'], 2, /MPE layout needs member channels/u],
    [['render', input, '-o', join(dir, 'n.mid'), '--voice', 'organ'], 2, /^diesis: --voice is for the audio preview: give --wav OUT\.wav too$/mu],
    [['render', input, '-o', join(dir, 'n.mid'), '--window', 'C..G'], 2, /--window "C\.\.G" holds 2 spellings \(1 fifth\)/u],
  ])('fails in one line: %j', async (args, code, message) => {
    const result = await runCli(...args);
    expect(result.code).toBe(code);
    expect(result.stderr).toMatch(message);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('a folder given as the piece', () => {
  it.each(['render', 'spell'])('%s names the folder and says it is not a MIDI file, before anything about the outputs', async (command) => {
    const folder = tempDir('diesis-piece-');
    const args = command === 'render' ? [command, folder, '-o', join(folder, 'out.mid')] : [command, folder];
    const result = await runCli(...args);
    expect(result.code).toBe(1);
    expect(result.stderr).toBe(`diesis: ${folder}: is a folder, not a Standard MIDI File: give the piece to ${command}, as piece.mid\n`);
  });

  it('diesis render . names the folder in full', () => {
    const folder = tempDir('diesis-piece-');
    const result = spawnSync(process.execPath, [join(import.meta.dirname, '../../bin/diesis.js'), 'render', '.', '-o', 'out.mid'], { cwd: folder, encoding: 'utf8' });
    expect(result.status).toBe(1);
    expect(result.stderr).toBe(`diesis: . (${folder}): is a folder, not a Standard MIDI File: give the piece to render, as piece.mid\n`);
  });
});

describe('diesis play', () => {
  it('asks for its ports in one line', async () => {
    const result = await runCli('play', '--in', 'keyboard');
    expect(result.code).toBe(2);
    expect(result.stderr).toBe('diesis: play needs --in PORT and --out PORT (run "diesis ports" to list them)\n');
  });
});
