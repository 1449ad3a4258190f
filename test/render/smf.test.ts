import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import MidiParser from 'midi-parser-js';
import { describe, expect, it } from 'vitest';
import { MAX_DELTA, readMidiFile, writeMidiFile } from '../../src/render/smf.js';
import { UserError } from '../../src/util/errors.js';
import { readWithIndependentParser } from '../support/smf-reader.js';

// Every byte layout below is written by hand from "Standard MIDI Files 1.0" (MIDI Manufacturers
// Association, part of the Complete MIDI 1.0 Detailed Specification), not with the project's
// writer: header chunk "MThd", length 6, format, track count, division; track chunks "MTrk",
// length, then <delta-time> <event> pairs, ending with End of Track FF 2F 00.

const ascii = (s: string): number[] => [...s].map((ch) => ch.charCodeAt(0));
const u32 = (n: number): number[] => [(n >>> 24) & 0xff, (n >>> 16) & 0xff, (n >>> 8) & 0xff, n & 0xff];
const header = (format: number, tracks: number, division = 480): number[] => [...ascii('MThd'), ...u32(6), 0, format, 0, tracks, division >> 8, division & 0xff];
const chunk = (type: string, body: number[], length = body.length): number[] => [...ascii(type), ...u32(length), ...body];
const END = [0x00, 0xff, 0x2f, 0x00];
const file = (...parts: number[][]): Uint8Array => Uint8Array.from(parts.flat());

/** A variable-length quantity, from SMF 1.0's "Conventions" (7 bits per byte, high bit = more follow). */
function vlq(n: number): number[] {
  const out = [n & 0x7f];
  for (let rest = Math.floor(n / 128); rest > 0; rest = Math.floor(rest / 128)) out.unshift(0x80 | (rest & 0x7f));
  return out;
}

function readError(bytes: Uint8Array): string {
  try {
    readMidiFile(bytes, 'take.mid');
  } catch (error) {
    expect(error).toBeInstanceOf(UserError);
    return (error as Error).message;
  }
  throw new Error('the file was accepted');
}

describe('reading Standard MIDI Files: strict where SMF 1.0 is strict', () => {
  it('refuses a 34-byte file whose meta-event length never ends, naming the byte, instead of hanging', () => {
    // SMF 1.0: a variable-length quantity has at most 4 bytes. Here the length runs on (0xFF bytes).
    const bytes = file(header(0, 1), chunk('MTrk', [0x00, 0xff, 0x01, ...Array<number>(9).fill(0xff)]));
    expect(bytes.length).toBe(34);
    expect(readError(bytes)).toMatch(/^take\.mid: byte 25: track 1: a meta event's length is a variable-length number longer than 4 bytes/u);
  });

  it('refuses a 5-byte delta-time', () => {
    const bytes = file(header(0, 1), chunk('MTrk', [0x81, 0x80, 0x80, 0x80, 0x00, 0x90, 60, 100, ...END]));
    expect(readError(bytes)).toMatch(/^take\.mid: byte 22: track 1: a delta-time is a variable-length number longer than 4 bytes/u);
  });

  it('refuses a file cut after a note-on, naming the track and the byte', () => {
    const whole = file(header(0, 1), chunk('MTrk', [0x00, 0x90, 60, 100, 0x60, 0x80, 60, 0, ...END]));
    const cut = whole.subarray(0, 14 + 8 + 4);
    expect(readError(cut)).toBe('take.mid: byte 14: track 1 says it holds 12 bytes, but the file ends after 4 (the file is cut short or the length is wrong)');
  });

  it('refuses a track whose length lies (says 5)', () => {
    const bytes = file(header(0, 1), chunk('MTrk', [0x00, 0x90, 60, 100, 0x60, 0x80, 60, 0, ...END], 5));
    expect(readError(bytes)).toMatch(/^take\.mid: byte 27: track 1: an event runs past the end of its track/u);
    // … and a length that is too long by a chunk's worth.
    const long = file(header(0, 1), chunk('MTrk', [0x00, 0x90, 60, 100, ...END], 12), [0, 0, 0, 0]);
    expect(readError(long)).toMatch(/track 1: 4 bytes follow its End of Track/u);
  });

  it('refuses a track without End of Track, a data byte with no status, a status byte where data belongs', () => {
    expect(readError(file(header(0, 1), chunk('MTrk', [0x00, 0x90, 60, 100])))).toBe(
      'take.mid: byte 26: track 1 ends without an End of Track event (the file is cut short or the track\'s length is wrong)',
    );
    expect(readError(file(header(0, 1), chunk('MTrk', [0x00, 60, 100, ...END])))).toMatch(/byte 23: track 1: data byte 0x3C with no status byte before it/u);
    expect(readError(file(header(0, 1), chunk('MTrk', [0x00, 0x90, 60, 0x90, ...END])))).toMatch(/byte 25: track 1: data byte 0x90 of a 0x90 message is not below 0x80/u);
    // SMF 1.0 carries no real-time bytes in a track (only channel, F0/F7 and FF events).
    expect(readError(file(header(0, 1), chunk('MTrk', [0x00, 0xf8, ...END])))).toMatch(/status byte 0xF8 cannot appear/u);
  });

  it('refuses a header that promises more tracks than the file holds, and one that is not MThd', () => {
    expect(readError(file(header(1, 2), chunk('MTrk', END)))).toMatch(/^take\.mid: byte 10: the header promises 2 tracks, the file holds 1$/u);
    expect(readError(file(ascii('RIFF'), u32(6), [0, 0, 0, 1, 1, 0xe0]))).toMatch(/does not begin with an MThd header/u);
    // A setup given where the piece goes: JSON text (RFC 8259 objects begin with "{"), named for what it is.
    expect(readError(file(ascii('{ "tuning": "meantone-1-4" }')))).toMatch(/^take\.mid: a JSON file, not a Standard MIDI File \(a setup goes with --setup\)$/u);
  });
});

describe('reading Standard MIDI Files: lenient where SMF 1.0 says so', () => {
  const track = chunk('MTrk', [0x00, 0x90, 60, 100, 0x83, 0x60, 60, 0, ...END]); // running status: the second note-on has no status byte

  it('skips a chunk of unknown type between tracks ("expect alien chunks and treat them as if they weren\'t there")', () => {
    const plain = readMidiFile(file(header(1, 2), track, track), 'plain.mid');
    const alien = readMidiFile(file(header(1, 2), track, chunk('XFIH', [1, 2, 3, 4, 5, 6, 7]), track), 'alien.mid');
    expect(alien.events).toEqual(plain.events);
    expect(alien.events.map((e) => [e.tick, ...e.data])).toEqual([
      [0, 0x90, 60, 100],
      [0, 0x90, 60, 100],
      [480, 0x90, 60, 0],
      [480, 0x90, 60, 0],
    ]);
  });

  it('honours a header longer than 6 bytes (its extra bytes are skipped)', () => {
    const long = [...ascii('MThd'), ...u32(8), 0, 0, 0, 1, 0x01, 0xe0, 0xaa, 0xbb];
    expect(readMidiFile(file(long, track), 'long.mid').events).toHaveLength(2);
  });

  it('reads tempo changes into times, and sysex and meta events with running status cancelled after them', () => {
    const body = [
      0x00, 0xff, 0x51, 0x03, 0x07, 0xa1, 0x20, // tempo 500000 µs per quarter
      0x00, 0x90, 60, 100,
      0x83, 0x60, 0xff, 0x51, 0x03, 0x0f, 0x42, 0x40, // at tick 480: 1000000 µs per quarter
      0x00, 0xf0, 0x03, 0x7e, 0x7f, 0xf7, // a sysex: F0, length, data ending in F7
      0x83, 0x60, 0x80, 60, 0, // after a sysex, the status must be given again
      ...END,
    ];
    const content = readMidiFile(file(header(0, 1), chunk('MTrk', body)), 'tempo.mid');
    expect(content.events.map((e) => [e.tick, e.time, ...e.data])).toEqual([
      [0, 0, 0x90, 60, 100],
      [480, 500, 0xf0, 0x7e, 0x7f, 0xf7],
      [960, 1500, 0x80, 60, 0],
    ]);
    expect(content.msPerTickAtEnd).toBeCloseTo(1000 / 480, 12);
  });
});

describe('writing Standard MIDI Files', () => {
  // Mozart piano sonatas, derived from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe,
  // CC BY-NC-SA 4.0 (see corpus/mozart/LICENSE.md).
  const movement = join(import.meta.dirname, '../../corpus/mozart/sonata01-1.mid');

  it('reads a corpus movement as midi-parser-js (an independent reader) does, and writes it back the same', () => {
    const bytes = readFileSync(movement);
    const ours = readMidiFile(bytes, movement);
    const theirs = readWithIndependentParser(bytes).messages;
    expect(ours.events.map((e) => [e.tick, ...e.data])).toEqual(theirs.map((m) => [m.tick, ...m.data]));
    ours.events.forEach((e, i) => expect(e.time).toBeCloseTo(theirs[i]!.ms, 6));
    const written = writeMidiFile(ours.division, ours.meta, [ours.events]);
    const reread = readWithIndependentParser(written);
    expect(reread).toMatchObject({ format: 1, tracks: 2 });
    expect(reread.messages.map((m) => [m.tick, ...m.data])).toEqual(theirs.map((m) => [m.tick, ...m.data]));
  });

  it('splits a delta longer than 0x0FFFFFFF ticks, so no variable-length number needs 5 bytes', () => {
    const far = 2 ** 31 + 12_345; // a silence longer than 2^31 ticks
    const bytes = writeMidiFile({ ticksPerBeat: 480 }, [], [[{ tick: 0, data: [0x90, 60, 100] }, { tick: far, data: [0x80, 60, 0] }]]);
    const parsed = MidiParser.parse(bytes);
    if (!parsed) throw new Error('unreadable');
    const deltas = parsed.track.flatMap((t) => t.event.map((e) => e.deltaTime));
    expect(Math.max(...deltas)).toBeLessThanOrEqual(MAX_DELTA); // SMF 1.0: 0x0FFFFFFF is the largest delta-time
    expect(readWithIndependentParser(bytes).messages.map((m) => [m.tick, ...m.data])).toEqual([
      [0, 0x90, 60, 100],
      [far, 0x80, 60, 0],
    ]);
    expect(readMidiFile(bytes, 'far.mid').events.map((e) => e.tick)).toEqual([0, far]);
  });

  it('writes running status and the file’s own bytes, and leaves out what a file cannot carry', () => {
    const bytes = writeMidiFile({ ticksPerBeat: 96 }, [], [[
      { tick: 0, data: [0x90, 60, 100] },
      { tick: 0, data: [0x90, 64, 100] },
      { tick: 0, data: [0xf8] }, // a real-time clock: not in a file
      { tick: 200, data: [0x90, 60, 0] },
    ]]);
    // Conductor track (End of Track only), then the track: 00 90 3C 64, 00 40 64 (running status), 81 48 3C 00, End of Track.
    expect([...bytes.subarray(14 + 12)]).toEqual([...chunk('MTrk', [0x00, 0x90, 60, 100, 0x00, 64, 100, 0x81, 0x48, 60, 0, ...END])]);
    expect([...bytes.subarray(0, 14)]).toEqual(header(1, 2, 96));
    expect(vlq(200)).toEqual([0x81, 0x48]);
  });
});
