import { describe, expect, it } from 'vitest';
import type { TimedMessage } from '../../src/midi/bytes.js';
import { applyStageControl } from '../../src/page/stage-controls.js';
import { lonePiece, StageTracker, stageStateOf, type StageSources } from '../../src/page/stage-view.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import type { Router } from '../../src/router/router.js';
import { createRouter } from '../../src/router/setup.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { parseKey } from '../../src/spelling/keys.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { SynthModel } from '../../src/synth/reference-synth.js';
import { A440 } from '../../src/tuning/index.js';

const meantone = loadTuningPreset('meantone-1-4');
/** Quarter-comma meantone's fifth, 1200·log2(5)/4 cents (the comma definition; a handbook fact), against 12-ET's 700. */
const FIFTH_FROM_ET = (1200 * Math.log2(5)) / 4 - 700;

function stage(strategy: 'fixed' | 'key' | 'follow' = 'key', key = 'D minor') {
  const speller = new ControlledSpeller(createStrategy({ strategy, key: parseKey(key) }));
  let tracker: StageTracker | undefined;
  const router: Router = createRouter({ tuning: meantone.tuning, reference: A440, speller, observer: (e) => tracker?.event(e) });
  tracker = new StageTracker();
  const synth = new SynthModel(440, 400);
  let time = 0;
  const sent: TimedMessage[] = [];
  const send = (messages: readonly TimedMessage[]): void => {
    for (const m of messages) {
      sent.push(m);
      synth.receive(m.time, m.data);
    }
  };
  send(router.start(0));
  const sources: StageSources = {
    router,
    speller,
    tuning: meantone.tuning,
    reference: A440,
    tuningId: meantone.id,
    tuningName: meantone.name,
    strategy,
    piece: lonePiece('a test'),
    synthConnected: () => true,
  };
  const play = (bytes: number[]): void => send(router.process((time += 10), bytes, 0));
  const now = () => stageStateOf(sources, tracker!, time);
  const control = (c: Parameters<typeof applyStageControl>[0]) => applyStageControl(c, { speller, router, send, clock: () => (time += 10) });
  return { router, speller, synth, sent, play, now, control };
}

describe('the stage state', () => {
  it('gives each of the twelve keys its spelling now and that spelling’s cents from 12-ET', () => {
    const { now } = stage('key', 'D minor');
    const s = now();
    expect(s.keys.map((k) => k.spelling)).toEqual(['C', 'C♯', 'D', 'E♭', 'E', 'F', 'F♯', 'G', 'G♯', 'A', 'B♭', 'B']);
    expect(s.keys.filter((k) => k.black).map((k) => k.chroma)).toEqual([1, 3, 6, 8, 10]);
    // G♯ is five fifths above the reference A: 5 × (696.58 − 700) cents; E♭ six fifths below: −6 × …
    expect(s.keys[8]!.cents).toBeCloseTo(5 * FIFTH_FROM_ET, 6);
    expect(s.keys[3]!.cents).toBeCloseTo(-6 * FIFTH_FROM_ET, 6);
    expect(s).toMatchObject({ strategy: 'key', key: 'D minor', window: 'E♭..G♯', passing: false, bar: null });
    expect(s.tuning).toMatchObject({ id: 'meantone-1-4', name: '1/4-comma meantone' });
    expect(s.reference).toBe('A4 = 440 Hz');
  });

  it('names the key follow believes it is in, with its mode', () => {
    expect(stage('follow', 'Bb major').now().key).toBe('B♭ major');
    expect(stage('follow', 'F# minor').now().key).toBe('F♯ minor');
    expect(stage('fixed').now().key).toBeNull();
  });

  it('shows the notes sounding, and those the pedal holds after their keys are up, until it lifts', () => {
    const { play, now } = stage();
    play([0x90, 62, 80]); // D4
    play([0x90, 68, 80]); // G♯4 in D minor
    expect(now().sounding.map((n) => [n.spelling, n.pedalHeld])).toEqual([['D4', false], ['G♯4', false]]);
    const gSharp = now().sounding[1]!;
    expect(gSharp.cents).toBeCloseTo(5 * FIFTH_FROM_ET, 6);
    expect(gSharp.hz).toBeCloseTo(440 * 2 ** ((5 * FIFTH_FROM_ET - 100) / 1200), 6);
    play([0xb0, 64, 127]);
    play([0x80, 68, 0]);
    expect(now().sounding.map((n) => [n.spelling, n.pedalHeld])).toEqual([['D4', false], ['G♯4', true]]);
    expect(now().pedals).toEqual({ sustain: true, sostenuto: false });
    play([0xb0, 64, 0]);
    expect(now().sounding.map((n) => n.spelling)).toEqual(['D4']);
  });

  it('carries out the page’s requests through the same speller and engine the pedals use', () => {
    const { play, now, control, synth, sent } = stage();
    expect(control({ kind: 'flip', on: true })).toEqual({ ok: true });
    expect(now().keys[8]!.spelling).toBe('A♭');
    expect(now().latches.flip).toBe(true);
    expect(control({ kind: 'flip', on: true })).toEqual({ ok: true }); // asked twice: still on
    expect(now().latches.flip).toBe(true);
    control({ kind: 'flip', on: false });
    expect(control({ kind: 'set-key', key: 'Bb major' })).toEqual({ ok: true });
    expect(now().keys.map((k) => k.spelling).filter((_, c) => [1, 3, 6, 8, 10].includes(c))).toEqual(['D♭', 'E♭', 'F♯', 'A♭', 'B♭']);
    expect(control({ kind: 'set-key', key: 'X major' })).toMatchObject({ ok: false, reason: expect.stringMatching(/is not a key/u) as string });
    expect(control({ kind: 'freeze', on: true })).toEqual({ ok: true });
    expect(now().latches.freeze).toBe(true);
    // 12-ET comparison: new notes sound at 12-ET (A4 = 440 · 2^((key − 69)/12), the definition of 12-ET).
    expect(control({ kind: 'compare-12et', on: true })).toEqual({ ok: true });
    expect(now().passing).toBe(true);
    expect(now().keys.every((k) => k.cents === 0)).toBe(true);
    play([0x90, 64, 80]);
    const voice = synth.active()[0]!;
    expect(synth.frequency(voice)).toBeCloseTo(440 * 2 ** ((64 - 69) / 12), 1);
    control({ kind: 'compare-12et', on: false });
    expect(now().passing).toBe(false);
    // Panic: All Notes Off (CC 123) on the channels in use, and nothing left sounding (MIDI 1.0).
    const before = sent.length;
    expect(control({ kind: 'panic' })).toEqual({ ok: true });
    expect(sent.slice(before).some((m) => (m.data[0]! & 0xf0) === 0xb0 && m.data[1] === 123)).toBe(true);
    expect(synth.active()).toEqual([]);
    expect(now().sounding).toEqual([]);
    expect(now().warnings.map((w) => w.text)).toEqual(['PANIC (panic on the stage page): every note was stopped']);
    expect(control({ kind: 'piece', step: 1 })).toEqual({ ok: false, reason: 'no concert programme: there is only this piece' });
  });
});
