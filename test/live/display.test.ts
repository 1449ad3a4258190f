import { describe, expect, it } from 'vitest';
import { makeStyle } from '../../src/cli/style.js';
import { LiveView } from '../../src/live/display.js';
import { parseSpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { createRouter } from '../../src/router/setup.js';
import type { RouterEvent } from '../../src/router/router.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { A440 } from '../../src/tuning/index.js';

describe('the stage display', () => {
  it('shows strategy, window, pedals and latches, sounding notes with cents, channels and warnings', () => {
    const speller = new ControlledSpeller(createStrategy({ strategy: 'fixed' }));
    const events: RouterEvent[] = [];
    const router = createRouter({ tuning: loadTuningPreset('meantone-1-4').tuning, reference: A440, speller, observer: (e) => events.push(e) });
    router.start(0);
    router.process(0, [0xb0, 64, 127]);
    router.process(1, [0x90, 68, 90]);
    router.process(2, [0x90, 62, 90]);
    speller.flip = true;
    const view = new LiveView(
      { router, speller, strategy: 'fixed', title: 'diesis · test', lostMessages: () => 3, ports: () => ({ inputs: [true, false], output: true }) },
      makeStyle(false),
      { accidentals: 'unicode' },
    );
    for (const e of events) view.event(e);
    view.event({ type: 'out-of-range', time: 3, pitch: parseSpelledPitch('B#4'), neededCents: 231.2 });
    const frame = view.frame();
    expect(frame).toContain('spelling fixed  window E♭..G♯');
    expect(frame).toMatch(/pedals \[sustain\] {2}sostenuto +latches \[flip\]/u);
    expect(frame).toContain('ports  in 1:ok 2:GONE  out ok');
    expect(frame).toMatch(/sounding \(2\)\n {2}D4\s+\+3\.4 c\s+294\.25 Hz {2}ch \d+\n {2}G♯4\s+−17\.1 c\s+411\.22 Hz/u); // meantone D4 and G♯4 at A4 = 440
    expect(frame).toContain('lost messages 3');
    expect(frame).toContain('! B♯4 needs 231.2 cents: more than the bend range');
    expect(frame).toContain('p or space = PANIC');
  });
});
