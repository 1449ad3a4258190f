import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { resolveEngineCli } from '../../src/cli/engine-options.js';
import { formatProblem } from '../../src/presets/problems.js';
import { checkSetup, loadSetupFile } from '../../src/presets/setup-file.js';
import { tempDir } from '../support/temp.js';

const lines = (text: string, file = 'stage.json'): string[] => {
  const check = checkSetup(text, file);
  return check.problems.map((p) => formatProblem(file, p, check.source));
};

describe('check sees what play would refuse, all of it at once, with lines', () => {
  it('a setup with a mistake in every block: one pass, each as FILE:LINE: where: what', () => {
    const text = [
      '{',
      '  // my stage setup',
      '  "tuning": "meantone",',
      '  "reference": "A=415",',
      '  "output": { "mode": "mts-note", "channels": "0-17", "layout": "mpe" },',
      '  "spelling": { "strategy": "fixed", "key": "D minor", },',
      '  "controls": [',
      '    { "cc": 66, "action": "flip" },',
      '    { "cc": 66, "action": "freeze" },',
      '    { "note": 60, "action": "set-key", "key": "H minor" }',
      '  ],',
      '}',
    ].join('\n');
    expect(lines(text)).toEqual([
      'stage.json:3: tuning: unknown tuning "meantone": did you mean meantone-1-3, meantone-1-4, meantone-1-5, meantone-1-6, meantone-2-7?',
      'stage.json:4: reference: reference "A=415": the note needs its octave, as in A4=415',
      'stage.json:5: warning: output.layout: does not apply to mode "mts-note" (ignored)',
      'stage.json:5: output.channels: "0-17": 0 is not a MIDI channel (1–16)',
      'stage.json:6: spelling.key: has no effect with strategy "fixed"',
      expect.stringMatching(/^stage\.json:10: controls\[2\]\.key: .*H minor/u),
      'stage.json:9: controls[1]: controller 66 is already bound at controls[0] (one pedal or key, two actions)',
    ]);
  });

  it('schema problems and value problems come together, not in rounds', () => {
    const found = lines(JSON.stringify({ tuning: 'nonesuch', output: { channels: '1-16', mode: 'bend', extra: 1 }, splitKeys: [{ key: 61, spelling: 'Db' }, { key: 61, spelling: 'C#' }] }));
    expect(found.some((l) => l.includes('output: unknown setting "extra"'))).toBe(true);
    expect(found.some((l) => l.includes('tuning: unknown tuning "nonesuch"'))).toBe(true);
    expect(found.some((l) => l.includes('splitKeys[1]: the same key 61 as splitKeys[0]'))).toBe(true);
  });

  it('a key switch on a key the player plays is a warning; a setup with only warnings loads', () => {
    const check = checkSetup(JSON.stringify({ controls: [{ note: 60, action: 'flip', latch: true }, { note: 12, action: 'panic' }] }), 's.json');
    expect(check.setup).toBeDefined();
    expect(check.problems.map((p) => formatProblem('s.json', p, check.source))).toEqual([
      "s.json:1: warning: controls[0]: key 60 is inside the keyboard's playing range (21–108): played there, it will never sound",
    ]);
  });

  it('reads a tuning file named in a setup from the setup’s own folder, not the current one', () => {
    const dir = join(tempDir('diesis-setup-'), 'concert');
    mkdirSync(dir, { recursive: true });
    writeFileSync(
      join(dir, 'my-tuning.json'),
      '{ "name": "Mine", "kind": "regular", "description": "a fifth of my own", "source": "my ears", "fifth": { "cents": 697 }, /* trailing comma: */ }',
    );
    writeFileSync(join(dir, 'setup.json'), '{ "tuning": "my-tuning.json", "reference": "A4=415" }');
    const setup = loadSetupFile(join(dir, 'setup.json'));
    expect(setup.tuning?.name).toBe('Mine');
    expect(resolveEngineCli({ setup: join(dir, 'setup.json') }).preset.name).toBe('Mine');
  });

  it('spelling.follow.keyNames takes baroque or later, and nothing else', () => {
    expect(checkSetup('{ "spelling": { "follow": { "keyNames": "later" } } }', 's.json').problems).toEqual([]);
    const bad = checkSetup('{ "spelling": { "follow": { "keyNames": "modern" } } }', 's.json').problems;
    expect(bad.map((p) => p.path)).toEqual(['$.spelling.follow.keyNames']);
    expect(bad[0]!.message).toMatch(/baroque.*later/u);
  });

  it('spelling.follow with another strategy is a problem, as spelling.key is', () => {
    const problems = checkSetup('{ "spelling": { "strategy": "fixed", "follow": { "keyNames": "later" } } }', 's.json').problems;
    expect(problems.map((p) => [p.path, p.message])).toEqual([['$.spelling.follow', 'has no effect with strategy "fixed" (it steers "follow")']]);
  });

  it('a MIDI file or another binary file given as a setup is named for what it is', () => {
    // A Standard MIDI File begins with the chunk type "MThd" (MIDI 1.0, Standard MIDI Files).
    expect(() => checkSetup('MThd\u0000\u0000\u0000\u0006\u0000\u0000', 'piece.mid')).toThrow(/^piece\.mid: a Standard MIDI File, not a JSON setup/u);
    expect(() => checkSetup('RIFF\u0000\u0000WAVE', 'take.wav')).toThrow(/^take\.wav: not a text file/u);
  });

  it('JSON mistakes name the line and column', () => {
    expect(() => checkSetup('{\n  "tuning": "meantone-1-4"\n  "reference": "A4=415"\n}', 's.json')).toThrow(/^s\.json:3:3: not valid JSON: comma expected/u);
  });

  it('the shipped setups are clean: no problems, no warnings', () => {
    for (const f of ['mpe-synth', 'multitimbral-sampler', 'mts-synth']) expect(loadSetupFile(`presets/setups/${f}.json`).json, f).toBeDefined();
  });
});

describe('no option silently ignored', () => {
  it('refuses mode-specific options outside their mode, and --key where the strategy has none', () => {
    expect(() => resolveEngineCli({ mode: 'mts-note', layout: 'multi' })).toThrow(/--layout applies to --mode bend, not to --mode mts-note/u);
    expect(() => resolveEngineCli({ mode: 'pass', bendRange: 2 })).toThrow(/--bend-range applies to --mode bend/u);
    expect(() => resolveEngineCli({ mode: 'bend', octaveForm: '1' })).toThrow(/--octave-form applies to --mode mts-octave/u);
    expect(() => resolveEngineCli({ spelling: 'fixed', key: 'D minor' })).toThrow(/--key has no effect with --spelling fixed/u);
    expect(() => resolveEngineCli({ spelling: 'follow', window: 'Eb..G#' })).toThrow(/--window has no effect with --spelling follow/u);
  });

  it('--window alone means fixed spelling in that window', () => {
    const resolved = resolveEngineCli({ window: 'Ab..C#' });
    expect(resolved.strategy).toBe('fixed');
    expect(resolved.speller.peek({ key: 61, velocity: 1, time: 0, channel: 0, source: 0 })).toEqual({ fifths: 7, octave: 4 }); // C♯4
  });

  it('a tuning’s common name works as an alias', () => {
    expect(resolveEngineCli({ tuning: 'quarter-comma' }).preset.id).toBe('meantone-1-4');
    expect(resolveEngineCli({ tuning: 'werckmeister' }).preset.id).toBe('werckmeister-3');
    expect(resolveEngineCli({ tuning: 'pythagorean' }).preset.id).toBe('pythagorean');
  });
});

describe('the README’s setup example', () => {
  it('loads as printed (comments, trailing commas and all), beside the score it names', async () => {
    const { readFileSync, copyFileSync } = await import('node:fs');
    const readme = readFileSync(join(import.meta.dirname, '..', '..', 'README.md'), 'utf8');
    const section = readme.slice(readme.indexOf('### Setup files'));
    const example = /```jsonc\n([\s\S]*?)```/u.exec(section)?.[1];
    expect(example).toBeDefined();
    const dir = tempDir('diesis-readme-');
    mkdirSync(join(dir, 'scores'));
    // The score it names: a Mozart movement from corpus/mozart-scores (CC BY-NC-SA 4.0, see its LICENSE.md).
    copyFileSync(join(import.meta.dirname, '..', '..', 'corpus', 'mozart-scores', 'sonata01-2.mxl'), join(dir, 'scores', 'piece.mxl'));
    writeFileSync(join(dir, 'setup.json'), example!);
    const check = checkSetup(example!, join(dir, 'setup.json'));
    expect(check.problems.map((p) => formatProblem('README', p, check.source))).toEqual([]);
    expect(check.setup?.bindings.length).toBeGreaterThan(5);
  });
});

describe('what a player found trying it', () => {
  it('a split-key spelling must be a spelling of its key', () => {
    expect(lines(JSON.stringify({ splitKeys: [{ channel: 1, key: 70, spelling: 'B' }] }))).toEqual([
      'stage.json:1: splitKeys[0].spelling: B is not a spelling of key 70, which is Bb or another name for it',
    ]);
  });

  it('a mistake in one field does not hide the others of its block', () => {
    const found = lines(JSON.stringify({ spelling: { strategy: 'folow', key: 'H minor' }, output: { channels: '0-17', bendRange: 200 } }));
    expect(found.some((l) => l.includes('spelling.strategy'))).toBe(true);
    expect(found.some((l) => l.includes('spelling.key') && l.includes('H minor'))).toBe(true);
    expect(found.some((l) => l.includes('output.bendRange'))).toBe(true);
    expect(found.some((l) => l.includes('output.channels') && l.includes('0 is not a MIDI channel'))).toBe(true);
  });

  it('a key switch on a channel of its own is no player’s key: no warning', () => {
    expect(lines(JSON.stringify({ controls: [{ note: 60, channel: 16, action: 'flip' }] }))).toEqual([]);
  });

  it('score controls: a bar the score lacks is a problem; without a score, a warning', () => {
    const score = join(import.meta.dirname, '..', '..', 'corpus', 'mozart-scores', 'sonata01-2.mxl'); // CC BY-NC-SA 4.0, see its LICENSE.md
    expect(lines(JSON.stringify({ score, controls: [{ program: 3, action: 'score-bar', bar: 999 }] }))[0]).toMatch(/controls\[0\]\.bar: the score has no bar 999 \(its bars run /u);
    expect(lines(JSON.stringify({ controls: [{ program: 3, action: 'score-restart' }] }))[0]).toMatch(/warning: controls\[0\]: "score-restart" acts on a score, and this setup names none/u);
  });

  it('a setup given where a tuning goes says so', async () => {
    const { checkTuningPreset } = await import('../../src/presets/tuning-presets.js');
    expect(checkTuningPreset(JSON.stringify({ tuning: 'meantone-1-4', output: { mode: 'bend' } }), 'setup.json').problems.map((p) => p.message)).toEqual([
      'this is a setup, not a tuning (a tuning has a "kind"): give it with --setup',
    ]);
  });
});
