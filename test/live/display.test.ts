import { describe, expect, it } from 'vitest';
import { makeStyle } from '../../src/text/style.js';
import { LiveView } from '../../src/live/display.js';
import { parseSpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { createEngine } from '../../src/router/setup.js';
import type { RouterEvent } from '../../src/router/router.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { parseKey } from '../../src/spelling/keys.js';
import { A440 } from '../../src/tuning/index.js';

function stage(): { view: LiveView; events: RouterEvent[]; engine: ReturnType<typeof createEngine>; speller: ControlledSpeller } {
  const speller = new ControlledSpeller(createStrategy({ strategy: 'fixed' }));
  const events: RouterEvent[] = [];
  const engine = createEngine({ tuning: loadTuningPreset('meantone-1-4').tuning, reference: A440, speller, observer: (e) => events.push(e) });
  const view = new LiveView(
    {
      tally: engine.tally,
      speller,
      strategy: 'fixed',
      title: 'diesis · test',
      lostMessages: () => 3,
      ports: () => ({ inputs: [{ name: 'Stage Keys', connected: true }, { name: 'pedal box', connected: false }], output: { name: 'Organ', connected: true } }),
    },
    makeStyle(false),
    { accidentals: 'unicode' },
  );
  return { view, events, engine, speller };
}

describe('the stage display', () => {
  it('shows strategy, window, pedals and latches, sounding notes with cents, channels and warnings', () => {
    const { view, events, engine, speller } = stage();
    const { router } = engine;
    router.start(0);
    router.process(0, [0xb0, 64, 127]);
    router.process(1, [0x90, 68, 90]);
    router.process(2, [0x90, 62, 90]);
    speller.setFlip(true);
    for (const e of events) view.event(e);
    view.event({ type: 'out-of-range', time: 3, pitch: parseSpelledPitch('B#4'), neededCents: 231.2 });
    const frame = view.frame();
    expect(frame).toContain('spelling fixed  window E♭..G♯'); // a fixed window has no key
    expect(frame).toMatch(/pedals \[sustain\] {2}sostenuto +latches \[flip\]/u);
    expect(frame).toContain('from Stage Keys, pedal box (unplugged)  to Organ');
    expect(frame).toMatch(/sounding \(2\)\n {2}D4\s+\+3\.4 c\s+294\.25 Hz {2}ch \d+\n {2}G♯4\s+−17\.1 c\s+411\.22 Hz/u); // meantone D4 and G♯4 at A4 = 440
    expect(frame).toContain('messages the synth missed 3');
    expect(frame).toContain('! B♯4 needs 231.2 cents: more than the output can tune');
    expect(frame).toContain('p or space = PANIC');
  });

  it('names the key in force', () => {
    const speller = new ControlledSpeller(createStrategy({ strategy: 'key', key: parseKey('F# minor') }));
    const engine = createEngine({ tuning: loadTuningPreset('meantone-1-4').tuning, reference: A440, speller });
    const view = new LiveView(
      { tally: engine.tally, speller, strategy: 'key', title: 't', lostMessages: () => 0, ports: () => ({ inputs: [], output: { name: 'Organ', connected: true } }) },
      makeStyle(false),
      { accidentals: 'unicode' },
    );
    expect(view.frame()).toContain('spelling key  key F♯ minor  window');
    speller.setKey(parseKey('Bb major'));
    expect(view.frame()).toContain('key B♭ major');
  });

  it('keeps showing notes the sustain pedal holds after their keys go up, until the pedal lifts', () => {
    const { view, events, engine } = stage();
    const { router } = engine;
    router.start(0);
    router.process(0, [0xb0, 64, 127]);
    router.process(1, [0x90, 60, 90]);
    router.process(1, [0x90, 64, 90]);
    router.process(2, [0x80, 60, 0]);
    router.process(2, [0x80, 64, 0]);
    for (const e of events.splice(0)) view.event(e);
    expect(view.frame()).toMatch(/sounding \(2\)\n {2}C4 .*pedal\n {2}E4 .*pedal/u);
    router.process(3, [0xb0, 64, 0]);
    for (const e of events.splice(0)) view.event(e);
    expect(view.frame()).toContain('sounding (0)');
    expect(view.frame()).toMatch(/pedals {2}sustain /u);
  });
});

describe('the stage display across a tuning change', () => {
  it('shows the new tuning at once, on the screen and as a line', () => {
    const { view, events, engine } = stage();
    const pythagorean = loadTuningPreset('pythagorean');
    engine.router.act(5, { action: { name: 'set-tuning', tuning: { id: 'pythagorean', name: pythagorean.name, tuning: pythagorean.tuning } }, on: true });
    const change = events.find((e) => e.type === 'tuning')!;
    view.event(change);
    expect(view.line(change)).toBe(`== new notes in ${pythagorean.name} (pythagorean), A4=440`);
    expect(view.frame().split('\n')[1]).toBe(`new notes in ${pythagorean.name} (pythagorean), A4=440`);
    const piece: RouterEvent = { type: 'piece', time: 6, index: 1, count: 3, title: 'Drones', strategy: 'follow' };
    view.event(piece);
    expect(view.line(piece)).toBe('== piece 2 of 3: Drones');
    expect(view.frame().split('\n')[3]).toMatch(/^spelling follow /u); // the piece's strategy, not the session's first
    expect(view.frame().split('\n').slice(1, 3)).toEqual(['piece 2 of 3: Drones', `new notes in ${pythagorean.name} (pythagorean), A4=440`]);
  });
});
