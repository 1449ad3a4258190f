import { describe, expect, it } from 'vitest';
import { logLine } from '../../src/live/session.js';
import { noteId } from '../../src/midi/note-id.js';
import { parseSpelledPitch } from '../../src/pitch/index.js';

describe('the --log line of an event', () => {
  it('rounds its figures as the other JSON outputs do (src/text/output-numbers.ts), keeping the fields', () => {
    const line = logLine({
      type: 'note',
      time: 1234.56789012,
      id: noteId(0, 0, 53),
      velocity: 90,
      pitch: parseSpelledPitch('F3'),
      wanted: undefined,
      hz: 175.99999999999997,
      cents: 13.686286135165244,
      placement: { channel: 1, key: 53 },
      adaptive: { fromTable: -2.27e-13, compromise: false },
    });
    expect(JSON.parse(line)).toEqual({
      type: 'note', time: 1234.568, velocity: 90, hz: 176, cents: 13.6863, placement: { channel: 1, key: 53 },
      adaptive: { fromTable: 0, compromise: false }, source: 0, channel: 1, key: 53, spelling: 'F3',
    });
    expect(JSON.parse(logLine({ type: 'out-of-range', time: 0.1 + 0.2, pitch: parseSpelledPitch('B#-2'), neededCents: -1234.000000001 }))).toMatchObject({ time: 0.3, neededCents: -1234 });
  });
});
