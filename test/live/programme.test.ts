import { spawn } from 'node:child_process';
import { copyFileSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Concert, pieceSpeller } from '../../src/live/concert.js';
import { positionFileOf, readConcertPlace, startingPiece, writeConcertPlace } from '../../src/live/concert-position.js';
import { loadProgrammeFile } from '../../src/presets/programme-file.js';
import { checkSetup } from '../../src/presets/setup-file.js';
import { formatSpelledPitch } from '../../src/pitch/index.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { A440 } from '../../src/tuning/index.js';
import { runCli } from '../cli/run-cli.js';
import { Rig } from '../support/rig.js';
import { tempDir } from '../support/temp.js';

const root = join(import.meta.dirname, '../..');
const EVENING = join(root, 'presets/programmes/evening.json');
const cents = (a: number, b: number): number => 1200 * Math.log2(a / b);
/** The bend's step at ±48 semitones is 0.59 cent: a voice is within half of it. */
const AT_48 = 0.3;
// Independent arithmetic from the tunings' definitions (not from the tuning core):
// quarter-comma meantone E4 = A4 · 2 / 5^(3/4) · 5/4 (three meantone fifths down, a pure third up);
// Pythagorean E4 = A4 · 16/27 · 81/64 = A4 · 3/4 (a pure fourth below A4).
const meantoneE4 = (a4: number): number => (a4 * 2.5) / 5 ** 0.75;
const pythagoreanE4 = (a4: number): number => a4 * 0.75;

/** The example programme on the reference synth: the base setup's pedals, the concert's pieces. */
function concertRig() {
  const programme = loadProgrammeFile(EVENING);
  const first = programme.pieces[0]!;
  const speller = new ControlledSpeller(pieceSpeller(first), [], first.key);
  const pieces = new Concert(programme);
  const rig = new Rig({ tuning: programme.base.tuning!.tuning, reference: A440, speller, controls: new ControlMap(programme.base.bindings, speller), pieces });
  rig.deliver(rig.router.goToPiece(0, 0).messages);
  return { rig, programme, pieces };
}

const pieceEvents = (rig: Rig) => rig.events.filter((e) => e.type === 'piece').map((e) => (e.type === 'piece' ? e.index : -1));
const spellingOf = (rig: Rig, key: number): string => {
  const notes = rig.events.filter((e) => e.type === 'note' && (e.id & 0x7f) === key);
  const last = notes[notes.length - 1];
  return last?.type === 'note' ? formatSpelledPitch(last.pitch) : '?';
};

describe('a concert programme on the engine: switching pieces with notes held', () => {
  it('key switch, program change, previous: held notes finish in their tuning, new notes take the piece’s, nothing is stuck', () => {
    const { rig } = concertRig();
    // Piece 1: quarter-comma meantone at A4 = 415, spelled in D minor. E4 held by the sustain pedal.
    rig.at(0).cc(64, 127).on(64).on(66).off(64).off(66);
    const e4 = rig.voice(64);
    expect(Math.abs(cents(rig.model.frequency(e4), meantoneE4(415)))).toBeLessThan(AT_48);
    expect(spellingOf(rig, 66)).toBe('F#4');
    // Key 20 (a key switch below the keyboard's range): piece 2, Pythagorean at 415, fixed Gb..B.
    rig.at(100).on(20).off(20);
    expect(pieceEvents(rig)).toEqual([0, 1]);
    rig.at(110).on(76).on(66);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(76)), 2 * pythagoreanE4(415)))).toBeLessThan(AT_48);
    expect(spellingOf(rig, 66)).toBe('Gb4'); // the piece's own spelling
    expect(Math.abs(cents(rig.model.frequency(e4), meantoneE4(415)))).toBeLessThan(AT_48); // the held E4 did not move
    rig.off(76).off(66);
    const e5 = rig.voice(76);
    // Program change 1 (a foot switch sending programs): piece 3, Werckmeister III at A4 = 440.
    rig.at(200).send([0xc0, 1]);
    expect(pieceEvents(rig)).toEqual([0, 1, 2]);
    rig.at(210).on(69);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(69)), 440))).toBeLessThan(AT_48);
    expect(Math.abs(cents(rig.model.frequency(e4), meantoneE4(415)))).toBeLessThan(AT_48);
    expect(Math.abs(cents(rig.model.frequency(e5), 2 * pythagoreanE4(415)))).toBeLessThan(AT_48);
    // The last piece: next goes nowhere; previous (key 19) goes back to piece 2.
    rig.at(220).on(20).off(20);
    expect(pieceEvents(rig)).toEqual([0, 1, 2]);
    rig.at(230).on(19).off(19).on(57);
    expect(pieceEvents(rig)).toEqual([0, 1, 2, 1]);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(57)), 207.5))).toBeLessThan(AT_48);
    // The switches never reached the synth as notes or programs.
    expect(rig.sent.some((m) => (m.data[0]! & 0xf0) === 0x90 && (m.data[1] === 19 || m.data[1] === 20))).toBe(false);
    expect(rig.sent.some((m) => (m.data[0]! & 0xf0) === 0xc0)).toBe(false);
    // Let go of everything: nothing is left sounding.
    rig.at(300).off(69).off(57).cc(64, 0).after(2000);
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('a switch pedal bound to next-piece moves on once per press, with a note held through it', () => {
    const programme = loadProgrammeFile(EVENING);
    const first = programme.pieces[0]!;
    const speller = new ControlledSpeller(pieceSpeller(first), [], first.key);
    const { setup } = checkSetup(JSON.stringify({ controls: [{ cc: 67, action: 'next-piece' }] }), 'pedal.json');
    const rig = new Rig({ tuning: first.tuning.tuning, reference: A440, speller, controls: new ControlMap(setup!.bindings, speller), pieces: new Concert(programme) });
    rig.deliver(rig.router.goToPiece(0, 0).messages);
    rig.at(0).on(64);
    rig.at(10).cc(67, 127).cc(67, 100).cc(67, 0); // one press (the pedal's travel sends several values)
    expect(pieceEvents(rig)).toEqual([0, 1]);
    rig.at(20).on(76);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(76)), 2 * pythagoreanE4(415)))).toBeLessThan(AT_48);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(64)), meantoneE4(415)))).toBeLessThan(AT_48);
    expect(rig.sent.some((m) => (m.data[0]! & 0xf0) === 0xb0 && m.data[1] === 67)).toBe(false); // the pedal is consumed
    rig.at(30).off(64).off(76).after(1000);
    expect(rig.model.active()).toHaveLength(0);
  });

  it('each visit to a piece starts its spelling afresh, with its own declared key', () => {
    const { rig, pieces } = concertRig();
    expect(pieces.index).toBe(0);
    rig.deliver(rig.router.act(10, { action: { name: 'next-piece' }, on: true }));
    rig.deliver(rig.router.act(20, { action: { name: 'next-piece' }, on: true }));
    expect(pieces.index).toBe(2);
    expect(rig.router.tuningInForce.id).toBe('werckmeister-3');
    rig.deliver(rig.router.act(30, { action: { name: 'previous-piece' }, on: true }));
    rig.deliver(rig.router.act(40, { action: { name: 'previous-piece' }, on: true }));
    rig.deliver(rig.router.act(50, { action: { name: 'previous-piece' }, on: true }));
    expect(pieces.index).toBe(0);
    expect(rig.router.tuningInForce.id).toBe('meantone-1-4');
    expect(rig.router.tuningInForce.reference.hz.valueOf()).toBe(415);
    rig.at(60).on(70);
    expect(spellingOf(rig, 70)).toBe('Bb4'); // D minor again
  });
});

describe('check and the running order', () => {
  it('diesis programme prints the running order', async () => {
    const { code, stdout } = await runCli('programme', EVENING);
    expect(code).toBe(0);
    expect(stdout.split('\n').slice(0, 5)).toEqual([
      'An evening in three temperaments  (setup Stage keyboard for a concert programme)',
      '#  piece                           tuning          reference  spelling             score',
      '1  Prelude on a ground in D minor  meantone-1-4    A4=415     key D minor          -',
      '2  Pastorale with drones           pythagorean     A4=415     fixed Gb..B          -',
      '3  Rondo through the keys          werckmeister-3  A4=440     follow from G major  -',
    ]);
  });

  it('check: the example programme is ok', async () => {
    const { code, stdout } = await runCli('check', EVENING);
    expect(code).toBe(0);
    expect(stdout).toMatch(/evening\.json: ok: programme "An evening in three temperaments", 3 pieces on /u);
  });

  it('check: every problem of every piece in one pass, each as FILE:LINE: where: what', async () => {
    const dir = tempDir('diesis-programme-');
    copyFileSync(join(root, 'presets/programmes/stage-keyboard.json'), join(dir, 'stage-keyboard.json'));
    const file = join(dir, 'concert.json');
    writeFileSync(
      file,
      [
        '{',
        '  "setup": "stage-keyboard.json",',
        '  "pieces": [',
        '    { "title": "One", "tuning": "meantone-1-9" },',
        '    { "title": "Two", "spelling": { "strategy": "key", "key": "H minor" } },',
        '    { "title": "Three", "score": "missing.musicxml",',
        '      "output": { "mode": "pass", "octaveForm": 1 } },',
        '    { "tuning": "pythagorean" },',
        '    { "title": "Five", "reference": "A4=five", "colour": "blue" }',
        '  ]',
        '}',
      ].join('\n'),
    );
    const { code, stderr } = await runCli('check', file);
    expect(code).toBe(1);
    const lines = stderr.trim().split('\n');
    expect(lines.slice(0, -1).map((l) => l.replace(dir, 'DIR'))).toEqual([
      expect.stringMatching(/^DIR\/concert\.json:4: pieces\[0\]\.tuning: unknown tuning "meantone-1-9"/u),
      expect.stringMatching(/^DIR\/concert\.json:5: pieces\[1\]\.spelling\.key: .*H minor/u),
      expect.stringMatching(/^DIR\/concert\.json:7: pieces\[2\]\.output\.mode: belongs to the base setup/u),
      'DIR/concert.json:7: warning: pieces[2].output.octaveForm: does not apply to mode "bend" (ignored)',
      expect.stringMatching(/^DIR\/concert\.json:6: pieces\[2\]\.score: .*missing\.musicxml/u),
      'DIR/concert.json:8: pieces[3].title: is missing',
      expect.stringMatching(/^DIR\/concert\.json:9: pieces\[4\]: unknown setting "colour"/u),
    ]);
    expect(lines[lines.length - 1]).toMatch(/6 problems$/u);
  });

  it('check: a broken base setup is shown in its own file, with its line', async () => {
    const dir = tempDir('diesis-programme-');
    writeFileSync(join(dir, 'base.json'), '{\n  "tuning": "pythagorean",\n  "reference": "A=415",\n  "output": { "mode": "mts-octave" }\n}\n');
    writeFileSync(join(dir, 'concert.json'), '{ "setup": "base.json", "pieces": [ { "title": "One", "tuning": "just-adaptive" } ] }');
    const { code, stderr } = await runCli('check', join(dir, 'concert.json'));
    expect(code).toBe(1);
    expect(stderr).toMatch(/concert\.json:1: setup: the base setup base\.json has 1 problem/u);
    expect(stderr).toMatch(/concert\.json:1: pieces\[0\]\.tuning: just-adaptive gives every note its own pitch/u);
    expect(stderr).toMatch(/base\.json:3: reference: reference "A=415": the note needs its octave/u);
  });
});

describe('the concert’s place', () => {
  it('is kept beside the programme, written whole, and read back; a file diesis did not write is never replaced', () => {
    const dir = tempDir('diesis-place-');
    const file = join(dir, 'concert.json');
    writeFileSync(file, '{}');
    expect(positionFileOf(file)).toBe(join(dir, '.concert.json.position'));
    expect(readConcertPlace(file)).toBeUndefined();
    writeConcertPlace(file, { index: 1, title: 'Two' }, [file]);
    expect(readConcertPlace(file)).toEqual({ index: 1, title: 'Two' });
    writeConcertPlace(file, { index: 2, title: 'Three' }, [file]);
    expect(readConcertPlace(file)).toEqual({ index: 2, title: 'Three' });
    writeFileSync(positionFileOf(file), 'my own notes about the concert\n');
    expect(readConcertPlace(file)).toBeUndefined();
    expect(() => writeConcertPlace(file, { index: 0, title: 'One' }, [file])).toThrow(/does not replace a file it did not write/u);
    expect(readFileSync(positionFileOf(file), 'utf8')).toBe('my own notes about the concert\n');
  });

  it('offers to resume at the same piece: --resume, --from-start, a terminal’s answer, a changed programme', async () => {
    const titles = ['One', 'Two', 'Three'];
    const never = (): Promise<boolean> => Promise.reject(new Error('not asked'));
    expect(await startingPiece({ index: 2, title: 'Three' }, titles, 'resume', never)).toEqual({ index: 2, note: 'resuming at piece 3 of 3, "Three"' });
    expect((await startingPiece({ index: 2, title: 'Three' }, titles, 'from-start', never)).index).toBe(0);
    expect(await startingPiece({ index: 1, title: 'Two' }, titles, 'tell', never)).toEqual({ index: 0, note: 'the concert was at piece 2 of 3, "Two": starting at the first piece (give --resume to continue there)' });
    let asked = '';
    const yes = (q: string): Promise<boolean> => ((asked = q), Promise.resolve(true));
    expect((await startingPiece({ index: 1, title: 'Two' }, titles, 'ask', yes)).index).toBe(1);
    expect(asked).toBe('The concert was at piece 2 of 3, "Two". Resume there? [Y/n] ');
    expect((await startingPiece({ index: 1, title: 'Two' }, titles, 'ask', () => Promise.resolve(false))).index).toBe(0);
    // The programme changed: that piece is no longer there.
    expect((await startingPiece({ index: 1, title: 'Deux' }, titles, 'resume', never)).index).toBe(0);
    expect((await startingPiece(undefined, titles, 'resume', never)).index).toBe(0);
  });
});

/** Runs the programme child (dist/); `kill` SIGKILLs it once it says "ready", as a crash would end it. */
function child(programme: string, steps: number, flags: string[], kill: boolean): Promise<{ out: string; err: string; signal: NodeJS.Signals | null }> {
  return new Promise((resolve, reject) => {
    const proc = spawn(process.execPath, [join(root, 'test/fixtures/programme-child.js'), programme, String(steps), ...flags], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    proc.stdout.on('data', (chunk: Buffer) => {
      out += chunk.toString();
      if (kill && /^ready$/mu.test(out)) proc.kill('SIGKILL');
    });
    proc.stderr.on('data', (chunk: Buffer) => (err += chunk.toString()));
    const timer = setTimeout(() => {
      proc.kill('SIGKILL');
      reject(new Error(`the child did not finish: ${out} ${err}`));
    }, 20_000);
    proc.on('exit', (_code, signal) => {
      clearTimeout(timer);
      resolve({ out, err, signal });
    });
  });
}

describe('resume after a crash (a child process killed mid-concert)', () => {
  it('starting again with --resume plays on at the piece where the concert was', async () => {
    const dir = tempDir('diesis-resume-');
    const programme = join(dir, 'evening.json');
    copyFileSync(EVENING, programme);
    copyFileSync(join(root, 'presets/programmes/stage-keyboard.json'), join(dir, 'stage-keyboard.json'));
    // First run: two steps with the key switch (piece 3, A4 = 440), A4 played, then killed.
    const first = await child(programme, 2, ['--from-start'], true);
    expect(first.signal).toBe('SIGKILL');
    expect(first.out).toMatch(/^note 69 440\.0\d\d$/mu);
    expect(existsSync(positionFileOf(programme))).toBe(true);
    expect(readConcertPlace(programme)).toEqual({ index: 2, title: 'Rondo through the keys' });
    // Second run, no steps: resumed at piece 3, so A4 sounds at 440 Hz, not piece 1's 415.
    const second = await child(programme, 0, ['--resume', '--stop-after', '1.5'], false);
    expect(second.err).toMatch(/resuming at piece 3 of 3, "Rondo through the keys"/u);
    expect(second.out).toMatch(/^note 69 440\.0\d\d$/mu);
    expect(second.out).toMatch(/^exit 0$/mu);
    // Third run from the start: piece 1 at A4 = 415.
    const third = await child(programme, 0, ['--from-start', '--stop-after', '1.5'], false);
    // A4 = 415 Hz is nearest the synth's key 68 (G#4 at 440), bent up.
    expect(third.out).toMatch(/^note 68 415\.0\d\d$/mu);
    expect(readConcertPlace(programme)).toEqual({ index: 0, title: 'Prelude on a ground in D minor' });
  }, 60_000);
});

describe('the README’s programme', () => {
  it('loads as printed (beside the example base setup) and plays the order it describes', async () => {
    const readme = readFileSync(join(root, 'README.md'), 'utf8');
    const section = readme.slice(readme.indexOf('### Concert programme'));
    const block = /```jsonc\n([\s\S]*?)```/u.exec(section)?.[1];
    expect(block).toBeDefined();
    const dir = tempDir('diesis-readme-');
    copyFileSync(join(root, 'presets/programmes/stage-keyboard.json'), join(dir, 'stage-keyboard.json'));
    writeFileSync(join(dir, 'concert.json'), block!);
    const programme = loadProgrammeFile(join(dir, 'concert.json'));
    expect(programme.pieces.map((p) => [p.title, p.tuning.id, p.reference.hz.valueOf(), p.strategy, p.key && formatSpelledPitch({ ...p.key.tonic, octave: 4 })])).toEqual([
      ['Ground in D minor', 'meantone-1-4', 415, 'key', 'D4'],
      // The reference is the base setup's (A4 = 440) when the piece names none.
      ['Drones', 'pythagorean', 440, 'fixed', undefined],
      ['Rondo', 'werckmeister-3', 440, 'follow', 'G4'],
    ]);
    const { code } = await runCli('check', join(dir, 'concert.json'));
    expect(code).toBe(0);
  });
});

describe('a piece that follows its score', () => {
  it('is checked with its score read, shown in the running order, and spelled from the score afresh each time it starts', async () => {
    const dir = tempDir('diesis-score-');
    copyFileSync(join(root, 'presets/programmes/stage-keyboard.json'), join(dir, 'stage-keyboard.json'));
    copyFileSync(join(root, 'test/fixtures/score/features.musicxml'), join(dir, 'features.musicxml'));
    const file = join(dir, 'concert.json');
    writeFileSync(file, JSON.stringify({ setup: 'stage-keyboard.json', pieces: [{ title: 'Plain' }, { title: 'Scored', score: 'features.musicxml', tuning: 'meantone-1-6' }] }, null, 2));
    const { code, stdout } = await runCli('programme', file);
    expect(code).toBe(0);
    expect(stdout).toMatch(/^2 +Scored +meantone-1-6 +A4=440 +follow from C major +features\.musicxml$/mu);
    const concert = new Concert(loadProgrammeFile(file));
    const scored = concert.at(1)!;
    expect(scored.spelling.strategy).toBe('score, else follow');
    const again = concert.at(1)!;
    expect(again.spelling.base).not.toBe(scored.spelling.base); // a fresh follower: the score from its first bar
    expect(concert.at(0)!.spelling.strategy).toBe('follow');
  });
});

describe('a piece that changes the output settings', () => {
  it('takes over only when nothing sounds and the release guard has passed: held notes finish on the old set-up, then the new ranges and channels are sent', () => {
    const dir = tempDir('diesis-output-');
    copyFileSync(join(root, 'presets/programmes/stage-keyboard.json'), join(dir, 'stage-keyboard.json'));
    const file = join(dir, 'concert.json');
    writeFileSync(
      file,
      JSON.stringify({
        setup: 'stage-keyboard.json',
        pieces: [
          { title: 'Wide', tuning: 'meantone-1-4', reference: 'A4=415' },
          { title: 'Narrow', tuning: 'pythagorean', reference: 'A4=415', output: { channels: '2-5', bendRange: 24 } },
          { title: 'Wide again', tuning: 'werckmeister-3' },
        ],
      }),
    );
    const programme = loadProgrammeFile(file);
    const speller = new ControlledSpeller(pieceSpeller(programme.pieces[0]!));
    const base = { tuning: programme.base.tuning!.tuning, reference: A440, speller, controls: new ControlMap(programme.base.bindings, speller), channels: programme.base.channels, bendRange: 48 };
    const rig = new Rig({ ...base, pieces: new Concert(programme, base) });
    rig.deliver(rig.router.goToPiece(0, 0).messages);
    expect(rig.model.zone?.members).toHaveLength(15);
    rig.at(0).cc(64, 127).on(64).off(64);
    const held = rig.voice(64);
    rig.at(10).on(20).off(20); // next piece, with E4 still sounding under the pedal
    expect(rig.events.some((e) => e.type === 'output' && e.waiting)).toBe(true);
    expect(rig.model.zone?.members).toHaveLength(15); // not yet: the synth is not re-configured under a note
    rig.at(20).on(76);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(76)), 2 * pythagoreanE4(415)))).toBeLessThan(AT_48);
    expect(Math.abs(cents(rig.model.frequency(held), meantoneE4(415)))).toBeLessThan(AT_48);
    rig.at(30).off(76).cc(64, 0); // nothing is held any more; the release tails ring for the guard (400 ms)
    rig.at(429).deliver(rig.router.tick(429));
    expect(rig.model.zone?.members).toHaveLength(15);
    rig.at(430).deliver(rig.router.tick(430)); // the guard has passed: the piece's output takes over
    expect(rig.events.some((e) => e.type === 'output' && !e.waiting && e.waited === true)).toBe(true);
    expect(rig.model.zone?.members).toEqual([1, 2, 3, 4]); // MPE zone of four members (RP-053)
    expect(rig.model.channels[1]!.bendRange).toBe(24);
    rig.at(1000).on(69);
    const a4 = rig.voice(69);
    expect([1, 2, 3, 4]).toContain(a4.channel);
    // A4 = 415 Hz with ±24: the bend step is 0.29 cent, half of it 0.15.
    expect(Math.abs(cents(rig.model.frequency(a4), 415))).toBeLessThan(0.15);
    rig.at(1010).off(69).after(1000);
    // The next piece changes nothing in the output: the base's set-up comes back (nothing sounds, so at once).
    rig.deliver(rig.router.act(3000, { action: { name: 'next-piece' }, on: true }));
    expect(rig.model.zone?.members).toHaveLength(15);
    expect(rig.model.channels[1]!.bendRange).toBe(48);
    rig.at(3010).on(69).off(69).after(1000);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(69)), 440))).toBeLessThan(AT_48);
    expect(rig.model.active()).toHaveLength(0);
  });
});
