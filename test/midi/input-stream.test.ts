import { describe, expect, it } from 'vitest';
import { describeDrops, InputStream, LIVE_MAX_SYSEX_BYTES, LIVE_SYSEX_TIME_LIMIT_MS } from '../../src/midi/input-stream.js';

const collect = (stream: InputStream, time: number, bytes: number[]): number[][] => {
  const out: number[][] = [];
  stream.feed(time, bytes, (m) => out.push(m));
  return out;
};

// Running status, real-time bytes inside messages and system exclusive: MIDI 1.0 Detailed
// Specification (running status; real-time messages may appear anywhere, even between the bytes
// of another message; a sysex ends with F7 or with any status byte other than real-time).
describe('a live input stream', () => {
  it('passes running status and real-time bytes inside messages as whole messages, across packets', () => {
    const s = new InputStream();
    expect(collect(s, 0, [0x90, 60])).toEqual([]);
    expect(collect(s, 1, [0xf8, 90, 64, 90, 67])).toEqual([[0xf8], [0x90, 60, 90], [0x90, 64, 90]]);
    expect(collect(s, 2, [0, 0x80, 0xfa, 60, 0, 64, 0])).toEqual([[0x90, 67, 0], [0xfa], [0x80, 60, 0], [0x80, 64, 0]]);
    expect(s.drops.bytes).toBe(0);
  });

  it('ends an unterminated sysex at the next status byte and counts it', () => {
    const s = new InputStream();
    expect(collect(s, 0, [0xf0, 0x7d, 1, 2])).toEqual([]);
    expect(collect(s, 5, [0x90, 62, 90])).toEqual([[0x90, 62, 90]]);
    expect(s.drops).toEqual({ bytes: 4, sysex: 1, sysexTimedOut: 0 });
  });

  it('drops a sysex unfinished after the time limit, so the data after it cannot be taken for it', () => {
    const s = new InputStream();
    collect(s, 100, [0xf0, 0x7d, 1]);
    s.expire(100 + LIVE_SYSEX_TIME_LIMIT_MS); // exactly at the limit: still waiting
    expect(s.drops.sysex).toBe(0);
    s.expire(101 + LIVE_SYSEX_TIME_LIMIT_MS);
    expect(s.drops).toEqual({ bytes: 3, sysex: 1, sysexTimedOut: 1 });
    expect(collect(s, 2000, [2, 3, 0xf7, 0x90, 60, 90])).toEqual([[0x90, 60, 90]]); // the late tail is stray data
    expect(describeDrops(s.drops)).toBe('6 malformed input bytes dropped; 1 incomplete system-exclusive message, 1 of them unfinished after 1.5 s');
  });

  it('a late packet ends a slow sysex before its own bytes are parsed', () => {
    const s = new InputStream();
    collect(s, 0, [0xf0, 0x7d]);
    expect(collect(s, LIVE_SYSEX_TIME_LIMIT_MS + 1, [5, 0xf7, 0xf0, 0x7d, 6, 0xf7])).toEqual([[0xf0, 0x7d, 6, 0xf7]]);
    expect(s.drops.sysexTimedOut).toBe(1);
  });

  it('bounds a sysex in length: the longest allowed passes, one byte more is dropped', () => {
    const s = new InputStream();
    const body = (n: number) => new Array<number>(n).fill(0x11);
    expect(collect(s, 0, [0xf0, ...body(LIVE_MAX_SYSEX_BYTES - 2), 0xf7])[0]).toHaveLength(LIVE_MAX_SYSEX_BYTES);
    expect(collect(s, 0, [0xf0, ...body(LIVE_MAX_SYSEX_BYTES - 1), 0xf7])).toEqual([]);
    expect(s.drops.sysex).toBe(1);
    expect(s.drops.bytes).toBe(LIVE_MAX_SYSEX_BYTES + 1);
  });

  it('a reset (the port went away) drops the message in progress', () => {
    const s = new InputStream();
    collect(s, 0, [0xf0, 1, 2]);
    s.reset();
    expect(collect(s, 1, [3, 0xf7, 0x90, 60, 1])).toEqual([[0x90, 60, 1]]);
    expect(s.drops.sysex).toBe(1);
  });
});
