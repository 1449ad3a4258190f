import { copyFileSync, existsSync, linkSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import MidiParser from 'midi-parser-js';
import { describe, expect, it } from 'vitest';
import { writeWav } from '../../src/audio/wav.js';
import { MAX_DELTA, writeMidiFile } from '../../src/render/smf.js';
import { readWithIndependentParser } from '../support/smf-reader.js';
import { expectUntouched, snapshot } from '../support/snapshot.js';
import { tempDir } from '../support/temp.js';
import { runCli } from './run-cli.js';

// Mozart piano sonatas, derived from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe,
// CC BY-NC-SA 4.0 (see corpus/mozart/LICENSE.md).
const MOVEMENT = join(import.meta.dirname, '../../corpus/mozart/sonata01-2.mid');
const CUSTOM_TUNING = join(import.meta.dirname, '../../presets/examples/custom-tuning.json');


/** A player's folder: a piece, a take of their own, notes, a tuning and a setup of their own, a folder of samples. */
function playersFolder(): string {
  const dir = tempDir('diesis-player-');
  copyFileSync(MOVEMENT, join(dir, 'piece.mid'));
  copyFileSync(MOVEMENT, join(dir, 'ok.mid')); // an earlier output, which a failed command must not replace
  writeFileSync(join(dir, 'take.wav'), writeWav({ sampleRate: 44_100, channels: [Float32Array.from({ length: 4410 }, (_, n) => Math.sin(n / 10) * 0.2)] }, 16));
  writeFileSync(join(dir, 'notes.txt'), 'fingering for bar 12: 2-3-2\n');
  writeFileSync(join(dir, 'fake.mid'), 'not a MIDI file at all, but mine\n');
  copyFileSync(CUSTOM_TUNING, join(dir, 'my-tuning.json'));
  writeFileSync(join(dir, 'setup.json'), JSON.stringify({ tuning: 'meantone-1-4', reference: 'A4=415' }));
  mkdirSync(join(dir, 'subfolder'));
  writeFileSync(join(dir, 'subfolder', 'keep.txt'), 'keep me\n');
  return dir;
}

describe('output files: never destroy what diesis did not write', () => {
  const dir = playersFolder();
  const at = (name: string): string => join(dir, name);
  const before = snapshot(dir);
  linkSync(at('piece.mid'), at('piece-link.mid')); // a hard link: the same file under another name
  const withLink = snapshot(dir);

  it.each([
    ['-o the input itself', ['render', at('piece.mid'), '-o', at('piece.mid')], 2, /-o .*piece\.mid: that is an input of this command/u],
    ['-o the input by another path', ['render', at('piece.mid'), '-o', join(dir, 'subfolder', '..', 'piece.mid')], 2, /that is an input of this command/u],
    ['-o a hard link to the input', ['render', at('piece.mid'), '-o', at('piece-link.mid')], 2, /that is an input of this command/u],
    ['--wav the input', ['render', at('piece.mid'), '--wav', at('piece.mid')], 2, /--wav .*piece\.mid: a ".mid" name is for a Standard MIDI File \(\.mid\), but --wav writes a WAV file/u],
    ['-o a WAV', ['render', at('piece.mid'), '-o', at('take.wav')], 2, /-o .*take\.wav: a ".wav" name is for a WAV file \(\.wav\), but -o writes a Standard MIDI File \(\.mid\); give a name ending in \.mid/u],
    ['--wav a MIDI file', ['render', at('piece.mid'), '--wav', at('new.mid')], 2, /give a name ending in \.wav/u],
    ['-o the player’s notes', ['render', at('piece.mid'), '-o', at('notes.txt')], 2, /notes\.txt: a ".txt" name is for a JSON Lines log/u],
    ['-o a .mid that is not MIDI', ['render', at('piece.mid'), '-o', at('fake.mid')], 1, /fake\.mid: exists and is not a Standard MIDI File \(\.mid\); diesis does not replace a file it did not write/u],
    ['-o a folder', ['render', at('piece.mid'), '-o', at('subfolder')], 1, /-o .*subfolder: is a folder; give a file name/u],
    ['-o the tuning file', ['render', at('piece.mid'), '-o', at('my-tuning.json'), '-t', at('my-tuning.json')], 2, /my-tuning\.json: a ".json" name is for a JSON file \(a tuning, a setup, a manifest\)/u],
    ['-o and --wav the same file', ['render', at('piece.mid'), '-o', at('same.mid'), '--wav', at('same.mid')], 2, /--wav/u],
    ['--wav in a missing folder after a good -o', ['render', at('piece.mid'), '-o', at('ok.mid'), '--wav', at('no/such/x.wav')], 1, /--wav .*x\.wav: the folder .*no\/such does not exist/u],
    ['--listen the tuning file', ['chart', at('my-tuning.json'), '--listen', at('my-tuning.json')], 2, /--listen/u],
    ['--listen a MIDI file', ['chart', 'meantone-1-4', '--listen', at('piece.mid')], 2, /--listen .*piece\.mid: a ".mid" name is for a Standard MIDI File/u],
    ['--record the player’s WAV', ['play', '--in', 'x', '--out', 'y', '--record', at('take.wav')], 2, /--record .*take\.wav: a ".wav" name is for a WAV file/u],
    ['--record the setup', ['play', '--in', 'x', '--out', 'y', '--setup', at('setup.json'), '--record', at('setup.json')], 2, /--record .*setup\.json/u],
    ['--log the piece', ['play', '--in', 'x', '--out', 'y', '--log', at('piece.mid')], 2, /--log .*piece\.mid: a ".mid" name is for a Standard MIDI File/u],
    ['--log the setup', ['play', '--in', 'x', '--out', 'y', '--setup', at('setup.json'), '--log', at('setup.json')], 2, /--log .*setup\.json: a ".json" name is for a JSON file/u],
    ['--log the player’s notes', ['play', '--in', 'x', '--out', 'y', '--log', at('notes.txt')], 1, /--log .*notes\.txt: exists and is not a JSON Lines log/u],
    ['--log and --record one file', ['play', '--in', 'x', '--out', 'y', '--log', at('both.mid'), '--record', at('both.mid')], 2, /--log/u],
  ] as const)('refuses %s in one line and leaves every file as it was', async (_name, args, code, message) => {
    const result = await runCli(...args);
    expect(result.code).toBe(code);
    expect(result.stderr).toMatch(message);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expectUntouched(dir, withLink);
  });

  it('still has the player’s own files, byte for byte', () => {
    const now = snapshot(dir);
    for (const [name, bytes] of before) expect(now.get(name)?.equals(bytes), name).toBe(true);
  });
});

describe('output files: written only when the whole command succeeds', () => {
  it('keeps an earlier output when a later output of the same command fails', async () => {
    const dir = tempDir('diesis-outputs-');
    const good = join(dir, 'ok.mid');
    expect((await runCli('render', MOVEMENT, '-o', good)).code).toBe(0);
    const earlier = readFileSync(good);
    // A damaged input: the same movement cut after a few hundred bytes.
    const cut = join(dir, 'cut.mid');
    writeFileSync(cut, readFileSync(MOVEMENT).subarray(0, 300));
    const result = await runCli('render', cut, '-o', good, '--wav', join(dir, 'ok.wav'));
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/^diesis: .*cut\.mid: byte \d+: track \d says it holds \d+ bytes, but the file ends after \d+/u);
    expect(readFileSync(good).equals(earlier)).toBe(true);
    expect(readdirSync(dir).sort()).toEqual(['cut.mid', 'ok.mid']);
  });

  it('writes no --listen file when the chart itself is refused', async () => {
    const dir = tempDir('diesis-outputs-');
    const result = await runCli('chart', 'meantone-1-4', '--listen', join(dir, 'dyads.wav'), '--csv', 'wobble');
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/--csv "wobble"/u);
    expect(readdirSync(dir)).toEqual([]);
  });

  it('writes -o and --wav together, through temporary files that do not stay', async () => {
    const dir = tempDir('diesis-outputs-');
    const input = join(dir, 'two.mid');
    writeFileSync(input, writeMidiFile({ ticksPerBeat: 480 }, [], [[{ tick: 0, data: [0x90, 68, 90] }, { tick: 240, data: [0x80, 68, 0] }]]));
    const result = await runCli('render', input, '-o', join(dir, 'two-out.mid'), '--wav', join(dir, 'two.wav'));
    expect(result.code).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['two-out.mid', 'two.mid', 'two.wav']);
  });
});

describe('bounded reading', () => {
  it('renders a silence longer than 2^31 ticks, writing no delta-time above 0x0FFFFFFF', async () => {
    const dir = tempDir('diesis-long-');
    // Hand-made file: a note-on, nine empty text events 0x0FFFFFFF ticks apart (SMF 1.0: the largest
    // delta-time), then the note-off: 2.4·10^9 ticks of one held note.
    const track = [0x00, 0x90, 60, 100];
    for (let i = 0; i < 9; i++) track.push(0xff, 0xff, 0xff, 0x7f, 0xff, 0x01, 0x00);
    track.push(0x00, 0x80, 60, 0, 0x00, 0xff, 0x2f, 0x00);
    const bytes = [...'MThd'].map((c) => c.charCodeAt(0)).concat([0, 0, 0, 6, 0, 0, 0, 1, 0x7f, 0xff], [...'MTrk'].map((c) => c.charCodeAt(0)), [0, (track.length >> 16) & 0xff, (track.length >> 8) & 0xff, track.length & 0xff], track);
    const input = join(dir, 'long.mid');
    writeFileSync(input, Uint8Array.from(bytes));
    const output = join(dir, 'long-out.mid');
    const result = await runCli('render', input, '-o', output, '--release-guard', '0');
    expect(result.stderr).toBe('');
    expect(result.code).toBe(0);
    const parsed = MidiParser.parse(readFileSync(output));
    if (!parsed) throw new Error('unreadable');
    expect(Math.max(...parsed.track.flatMap((t) => t.event.map((e) => e.deltaTime)))).toBeLessThanOrEqual(MAX_DELTA);
    const offs = readWithIndependentParser(readFileSync(output)).messages.filter((m) => (m.data[0]! & 0xf0) === 0x80 || ((m.data[0]! & 0xf0) === 0x90 && m.data[2] === 0));
    expect(offs[0]?.tick).toBe(9 * MAX_DELTA);
    // As audio that silence (73,722 beats at 120 bpm, 32767 ticks per beat) would last 10.2 hours: refused in one line, and the MIDI output of the same command is not written.
    const both = await runCli('render', input, '-o', join(dir, 'both.mid'), '--wav', join(dir, 'both.wav'));
    expect(both.code).toBe(1);
    expect(both.stderr).toBe('diesis: the audio would last 10.2 hours; an audio preview is at most 4 hours (is there a very long silence in the file?)\n');
    expect(readdirSync(dir).sort()).toEqual(['long-out.mid', 'long.mid']);
  });

  it.each([
    ['render', ['render', 'FILE', '-o', 'OUT']],
    ['spell', ['spell', 'FILE']],
  ])('refuses a 34-byte file with an endless meta length in %s', async (_name, template) => {
    const dir = tempDir('diesis-bad-');
    const file = join(dir, 'bad.mid');
    // MThd, 6, format 0, 1 track, 480; MTrk of 12 bytes: delta 0, meta FF 01, then a length of nine 0xFF bytes.
    writeFileSync(file, Uint8Array.from([0x4d, 0x54, 0x68, 0x64, 0, 0, 0, 6, 0, 0, 0, 1, 1, 0xe0, 0x4d, 0x54, 0x72, 0x6b, 0, 0, 0, 12, 0, 0xff, 0x01, ...Array<number>(9).fill(0xff)]));
    const result = await runCli(...template.map((a) => (a === 'FILE' ? file : a === 'OUT' ? join(dir, 'out.mid') : a)));
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/^diesis: .*bad\.mid: byte 25: track 1: a meta event's length is a variable-length number longer than 4 bytes/u);
    expect(readdirSync(dir)).toEqual(['bad.mid']);
  });

  it('renders a file with a chunk of unknown type between its tracks, as SMF 1.0 asks (skip it)', async () => {
    const dir = tempDir('diesis-alien-');
    const movement = readFileSync(MOVEMENT);
    // SMF 1.0: after the 14-byte header come the chunks; insert an 8 + 6 byte chunk "XYZW" before the first track.
    const alien = Buffer.concat([movement.subarray(0, 14), Buffer.from([0x58, 0x59, 0x5a, 0x57, 0, 0, 0, 6, 1, 2, 3, 4, 5, 6]), movement.subarray(14)]);
    writeFileSync(join(dir, 'alien.mid'), alien);
    const plain = await runCli('render', MOVEMENT, '-o', join(dir, 'plain-out.mid'));
    const skipped = await runCli('render', join(dir, 'alien.mid'), '-o', join(dir, 'alien-out.mid'));
    expect(skipped.code).toBe(0);
    expect(readFileSync(join(dir, 'alien-out.mid')).equals(readFileSync(join(dir, 'plain-out.mid')))).toBe(true);
    expect(skipped.stdout.split('\n').slice(1)).toEqual(plain.stdout.split('\n').slice(1));
  });

  it.runIf(existsSync('/dev/zero'))('refuses /dev/zero as the input and as the tuning, promptly', async () => {
    const dir = tempDir('diesis-zero-');
    const asInput = await runCli('render', '/dev/zero', '-o', join(dir, 'out.mid'));
    expect(asInput.code).toBe(1);
    expect(asInput.stderr).toMatch(/^diesis: \/dev\/zero: is not a regular file and gives more than 16 MB/u);
    const asTuning = await runCli('spell', MOVEMENT, '--tuning', '/dev/zero');
    expect(asTuning.code).toBe(1);
    expect(asTuning.stderr).toMatch(/^diesis: \/dev\/zero: is not a regular file and gives more than 4\.0 MB/u);
    const asCheck = await runCli('check', '/dev/zero');
    expect(asCheck.code).toBe(1);
    expect(readdirSync(dir)).toEqual([]);
  });
});
