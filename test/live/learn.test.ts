import { existsSync, lstatSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { writeAgreedText } from '../../src/util/files.js';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import { runListenCommand } from '../../src/cli/ports-learn.js';
import { disableMidi } from '../../src/io/midi-system.js';
import { virtualInput } from '../../src/io/virtual-ports.js';
import { describeGesture, GESTURE_QUIET_MS, GestureTracker, type Gesture } from '../../src/midi/gesture.js';
import { decodeMessage } from '../../src/midi/message.js';
import { parseJsonText } from '../../src/presets/problems.js';
import { addControlText, controlOf, newSetupText } from '../../src/presets/learned-control.js';
import { checkSetup } from '../../src/presets/setup-file.js';
import type { ControlJson } from '../../src/presets/setup-schema.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { tempDir } from '../support/temp.js';

afterAll(async () => {
  await disableMidi();
});

/** Feeds raw messages at the given times (ms) and lets time pass until every gesture is done. */
function gesturesOf(...timed: Array<[number, number[]]>): Gesture[] {
  const tracker = new GestureTracker();
  const found = timed.flatMap(([t, bytes]) => tracker.hear(t, decodeMessage(bytes)));
  const last = timed[timed.length - 1]![0];
  return [...found, ...tracker.tick(last + GESTURE_QUIET_MS)];
}

// Status bytes from MIDI 1.0: 0xB0 control change, 0x90 note-on, 0xC0 program change, low nibble
// the channel (0 = channel 1).
describe('what a pedal, key or button did, in a player’s words', () => {
  it('a switch pedal: pressed and let go', () => {
    const [g] = gesturesOf([0, [0xb0, 64, 127]], [300, [0xb0, 64, 0]]);
    expect(g).toEqual({ kind: 'switch', channel: 0, controller: 64, pressed: 127, released: 0 });
    expect(describeGesture(g!)).toBe('controller 64 (sustain pedal) on channel 1: 127 when pressed, 0 when let go (a switch pedal)');
  });

  it('a switch pedal wired the other way round, an expression pedal, a key switch, a program button', () => {
    expect(gesturesOf([0, [0xb3, 66, 0]], [200, [0xb3, 66, 127]])).toEqual([{ kind: 'switch', channel: 3, controller: 66, pressed: 0, released: 127 }]);
    const sweep = gesturesOf(...[0, 10, 40, 90, 127, 60, 0].map((v, i): [number, number[]] => [i * 50, [0xb0, 11, v]]));
    expect(sweep).toEqual([{ kind: 'continuous', channel: 0, controller: 11, low: 0, high: 127, first: 0 }]);
    const key = gesturesOf([0, [0x9f, 24, 100]]);
    expect(describeGesture(key[0]!)).toBe('key 24 (C1) on channel 16 (a key, or a key switch)');
    expect(gesturesOf([0, [0xc1, 5]])).toEqual([{ kind: 'program', channel: 1, program: 5 }]);
  });

  it('a controller is not judged while it is still moving', () => {
    const tracker = new GestureTracker();
    expect(tracker.hear(0, decodeMessage([0xb0, 4, 127]))).toEqual([]);
    expect(tracker.tick(GESTURE_QUIET_MS - 1)).toEqual([]);
    expect(tracker.tick(GESTURE_QUIET_MS)).toHaveLength(1);
  });
});

/** Whether each message presses (true), releases (false) or leaves alone (undefined) the control, through the engine's own control map as a setup loads it. */
function firesOf(control: ControlJson, messages: number[][]): Array<boolean | undefined> {
  const check = checkSetup(newSetupText(control, 'test'), 'test.json');
  expect(check.problems).toEqual([]);
  const map = new ControlMap(check.setup!.bindings, new ControlledSpeller(createStrategy({ strategy: 'fixed' })));
  return messages.map((bytes) => {
    const firings = map.intercept(decodeMessage(bytes), 0);
    return firings?.length ? firings[0]!.on : undefined;
  });
}

describe('the control made from it fires when the player presses', () => {
  it('a switch pedal: on when pressed, off when let go', () => {
    const control = controlOf({ kind: 'switch', channel: 0, controller: 66, pressed: 127, released: 0 }, { name: 'flip' });
    expect(control).toEqual({ cc: 66, channel: 1, action: 'flip' });
    expect(firesOf(control, [[0xb0, 66, 127], [0xb0, 66, 0]])).toEqual([true, false]);
  });

  it('a pedal that sends less when pressed becomes a zone of its lower values', () => {
    const control = controlOf({ kind: 'switch', channel: 0, controller: 67, pressed: 0, released: 127 }, { name: 'freeze' });
    expect(control).toEqual({ cc: 67, channel: 1, zones: [{ from: 0, to: 63, action: 'freeze' }] });
    expect(firesOf(control, [[0xb0, 67, 127], [0xb0, 67, 0], [0xb0, 67, 127]])).toEqual([undefined, true, false]);
  });

  it('a switch that sends 0 and 40 gets its threshold between them; an expression pedal fires past the middle of its sweep', () => {
    const low = controlOf({ kind: 'switch', channel: 2, controller: 80, pressed: 40, released: 0 }, { name: 'flip', latch: true });
    expect(low).toEqual({ cc: 80, channel: 3, threshold: 21, action: 'flip', latch: true });
    expect(firesOf(low, [[0xb2, 80, 40], [0xb2, 80, 0], [0xb2, 80, 40]])).toEqual([true, undefined, false]);
    const sweep = controlOf({ kind: 'continuous', channel: 0, controller: 11, low: 20, high: 100, first: 20 }, { name: 'force-flats' });
    expect(sweep).toEqual({ cc: 11, channel: 1, threshold: 61, action: 'force-flats' });
  });

  it('a key switch and a program button, with a key for set-key', () => {
    expect(controlOf({ kind: 'key', channel: 15, key: 24 }, { name: 'shift-flat' })).toEqual({ note: 24, channel: 16, action: 'shift-flat' });
    const program = controlOf({ kind: 'program', channel: 0, program: 1 }, { name: 'set-key', key: 'Bb major' });
    expect(program).toEqual({ program: 1, channel: 1, action: 'set-key', key: 'Bb major' });
    expect(firesOf(program, [[0xc0, 1], [0xc0, 2]])).toEqual([true, undefined]);
  });
});

const PLAYERS_SETUP = `{
  // my harpsichord, for the Thursday concert
  "name": "Harpsichord",
  "tuning": "meantone-1-4", "reference": "A4=415",
  "controls": [
    { "cc": 66, "action": "flip" },                 // the left pedal
    { "note": 20, "channel": 16, "action": "shift-flat" }, /* below the lowest A */
  ],
}
`;

describe('the setup with the control added keeps the player’s text', () => {
  const control: ControlJson = { cc: 67, channel: 1, action: 'freeze' };

  it('after the last control, with the comments where they were and the trailing comma kept', () => {
    const text = addControlText(PLAYERS_SETUP, control);
    expect(text).toBe(PLAYERS_SETUP.replace('/* below the lowest A */\n', '/* below the lowest A */\n    { "cc": 67, "channel": 1, "action": "freeze" },\n'));
    expect(checkSetup(text, 'setup.json').setup?.json.controls).toHaveLength(3);
  });

  it('without a trailing comma, with a comment at the end of the last line', () => {
    const before = '{\n  "controls": [\n    { "cc": 66, "action": "flip" } // left\n  ]\n}\n';
    expect(addControlText(before, control)).toBe('{\n  "controls": [\n    { "cc": 66, "action": "flip" }, // left\n    { "cc": 67, "channel": 1, "action": "freeze" }\n  ]\n}\n');
  });

  it('a list on one line stays on one line; a setup without controls gets the list', () => {
    expect(addControlText('{ "controls": [{ "cc": 66, "action": "flip" }] }', control)).toBe('{ "controls": [{ "cc": 66, "action": "flip" }, { "cc": 67, "channel": 1, "action": "freeze" }] }');
    const made = addControlText('{\n  // mine\n  "name": "x"\n}\n', control);
    expect(made).toContain('// mine');
    expect(parseJsonText(made, 'x.json')).toEqual({ name: 'x', controls: [control] });
  });
});

let serial = 0;

/** Runs the CLI in-process; `play` is called once diesis says it is listening. */
async function runListening(args: string[], play: (send: (bytes: number[]) => void) => Promise<void>, input = virtualInput(`learn pedals ${++serial}`)) {
  let stdout = '';
  let stderr = '';
  let played: Promise<void> | undefined;
  const io = {
    stdout: {
      write: (s: string) => {
        stdout += s;
        if (!played && stdout.includes('listening to')) played = play((b) => input.send(b));
      },
    },
    stderr: { write: (s: string) => void (stderr += s) },
  };
  const code = await main(['node', 'diesis', 'ports', '--in', input.name, ...args], io);
  await played;
  return { code, stdout, stderr };
}

const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
const pressAndLetGo = (controller: number, channel = 0) => async (send: (bytes: number[]) => void) => {
  await wait(20);
  send([0xb0 | channel, controller, 127]);
  await wait(50);
  send([0xb0 | channel, controller, 0]);
};

describe('diesis ports --learn, on virtual ports', () => {
  it('writes a new setup with the control, which checks ok', async () => {
    const dir = tempDir('diesis-learn-');
    const file = join(dir, 'my-setup.json');
    const r = await runListening(['--learn', '--into', file, '--action', 'flip'], pressAndLetGo(66));
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('heard: controller 66 (sostenuto pedal) on channel 1: 127 when pressed, 0 when let go (a switch pedal)');
    const check = checkSetup(readFileSync(file, 'utf8'), file);
    expect(check.problems).toEqual([]);
    expect(check.setup?.json.controls).toEqual([{ cc: 66, channel: 1, action: 'flip' }]);
  });

  it('never changes a setup the player wrote unless told: refused before listening, then --force or --save-as', async () => {
    const dir = tempDir('diesis-learn-');
    const file = join(dir, 'harpsichord.json');
    writeFileSync(file, PLAYERS_SETUP);
    const refused = await runListening(['--learn', '--into', file, '--action', 'freeze'], async () => undefined);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain('it is your setup: diesis changes it only when you say so');
    expect(refused.stdout).toBe(''); // it did not ask for a pedal it could not write
    expect(readFileSync(file, 'utf8')).toBe(PLAYERS_SETUP);

    const copy = join(dir, 'harpsichord-2.json');
    const saved = await runListening(['--learn', '--into', file, '--save-as', copy, '--action', 'freeze'], pressAndLetGo(67));
    expect(saved.code).toBe(0);
    expect(readFileSync(file, 'utf8')).toBe(PLAYERS_SETUP);
    expect(readFileSync(copy, 'utf8')).toBe(addControlText(PLAYERS_SETUP, { cc: 67, channel: 1, action: 'freeze' }));

    const forced = await runListening(['--learn', '--into', file, '--action', 'freeze', '--force'], pressAndLetGo(67));
    expect(forced.code).toBe(0);
    expect(forced.stdout).toContain(`${file}: control added as controls[2]`);
    expect(readFileSync(file, 'utf8')).toBe(addControlText(PLAYERS_SETUP, { cc: 67, channel: 1, action: 'freeze' }));
  });

  it('a pedal already bound in the setup is refused in the setup’s own words, and the file stays', async () => {
    const dir = tempDir('diesis-learn-');
    const file = join(dir, 'harpsichord.json');
    writeFileSync(file, PLAYERS_SETUP);
    const r = await runListening(['--learn', '--into', file, '--action', 'freeze', '--force'], pressAndLetGo(66));
    expect(r.code).toBe(1);
    expect(r.stderr).toContain(`${file}:8: controls[2]: controller 66 on channel 1 is already bound at controls[0] (one pedal or key, two actions)`);
    expect(r.stderr).toContain('not written');
    expect(readFileSync(file, 'utf8')).toBe(PLAYERS_SETUP);
  });

  it('on a terminal it asks what the control should do and whether to change the setup', async () => {
    const dir = tempDir('diesis-learn-');
    const file = join(dir, 'harpsichord.json');
    writeFileSync(file, PLAYERS_SETUP);
    const input = virtualInput(`learn keys ${++serial}`);
    const questions: string[] = [];
    const answers = ['set key', 'set-key', 'D minor', 'y']; // a slip first: asked again
    let stdout = '';
    const io = {
      stdout: {
        write: (s: string) => {
          stdout += s;
          if (s.startsWith('listening to')) void wait(20).then(() => input.send([0xc0, 7]));
        },
      },
      stderr: { write: () => undefined },
    };
    await runListenCommand({ learn: true, in: [input.name], into: file }, io, async (q) => {
      questions.push(q);
      return answers.shift()!;
    });
    await disableMidi(); // as main does after every command
    expect(questions[0]).toMatch(/^what should it do\?/u);
    expect(questions[1]).toMatch(/^what should it do\?/u);
    expect(stdout).toContain('--action set key: not an action');
    expect(questions[3]).toMatch(new RegExp(`^add it to ${file.replace(/[.*+?^${}()|[\]\\]/gu, '\\$&')}\\?`, 'u'));
    expect(stdout).toContain('control: { "program": 7, "channel": 1, "action": "set-key", "key": "D minor" }');
    expect(checkSetup(readFileSync(file, 'utf8'), file).setup?.json.controls?.[2]).toEqual({ program: 7, channel: 1, action: 'set-key', key: 'D minor' });
  });

  it('refuses a setup name that is another kind of file before listening, and never writes over it', async () => {
    const dir = tempDir('diesis-learn-');
    const setup = join(dir, 'harpsichord.json');
    writeFileSync(setup, PLAYERS_SETUP);
    const piece = join(dir, 'piece.mid');
    const midi = 'MThd not really, but the player’s';
    writeFileSync(piece, midi);
    const overPiece = await runListening(['--learn', '--into', setup, '--save-as', piece, '--action', 'freeze', '--force'], pressAndLetGo(67));
    expect(overPiece.stderr).toBe(`diesis: --save-as ${piece}: a ".mid" name is for a Standard MIDI File (.mid), but --save-as writes a setup (.json); give a name ending in .json\n`);
    expect(overPiece.code).toBe(2);
    expect(overPiece.stdout).toBe(''); // refused before asking for a pedal
    expect(readFileSync(piece, 'utf8')).toBe(midi);
    expect(readFileSync(setup, 'utf8')).toBe(PLAYERS_SETUP);
    const newWav = join(dir, 'new.wav');
    const intoWav = await runListening(['--learn', '--into', newWav, '--action', 'flip'], pressAndLetGo(66));
    expect(intoWav.stderr).toBe(`diesis: --into ${newWav}: a ".wav" name is for a WAV file (.wav), but --into writes a setup (.json); give a name ending in .json\n`);
    expect(intoWav.code).toBe(2);
    expect(existsSync(newWav)).toBe(false);
  });

  it('gives up after --stop-after when nothing is pressed', async () => {
    const r = await runListening(['--learn', '--action', 'flip', '--stop-after', '0.2'], async () => undefined);
    expect(r.code).toBe(1);
    expect(r.stderr).toBe('diesis: ports --learn: nothing was heard in 0.2 s; nothing was learned\n');
  });
});

describe('diesis ports --watch', () => {
  it('says what each message is and sums up each controller', async () => {
    const r = await runListening(['--watch', '--stop-after', '1.2'], async (send) => {
      await wait(20);
      send([0x9f, 24, 100]);
      send([0x8f, 24, 0]);
      await pressAndLetGo(64)(send);
    });
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/ key 24 \(C1\) on channel 16: pressed, velocity 100\n/u);
    expect(r.stdout).toMatch(/ key 24 \(C1\) on channel 16: let go\n/u);
    expect(r.stdout).toMatch(/ controller 64 \(sustain pedal\) on channel 1: 127\n/u);
    expect(r.stdout).toContain('→ controller 64 (sustain pedal) on channel 1: 127 when pressed, 0 when let go (a switch pedal)');
  });
});

describe('writing a setup the player agreed to', () => {
  it('create never replaces a file; replace through a link changes the file it names and keeps the link', () => {
    const dir = tempDir('diesis-agreed-');
    const file = join(dir, 'mine.json');
    writeFileSync(file, '{}\n');
    expect(() => writeAgreedText(file, '{ "name": "x" }\n', 'create')).toThrow(/exists already/u);
    expect(readFileSync(file, 'utf8')).toBe('{}\n');
    const link = join(dir, 'link.json');
    symlinkSync(file, link);
    writeAgreedText(link, '{ "name": "y" }\n', 'replace');
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(readFileSync(file, 'utf8')).toBe('{ "name": "y" }\n');
  });
});
