import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/main.js';
import { runSynthCheck } from '../../src/cli/synth-check-command.js';
import { disableMidi } from '../../src/io/midi-system.js';
import { virtualOutput } from '../../src/io/virtual-ports.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { synthCheckPlan, type CheckSettings, type SynthCheckPlan } from '../../src/router/synth-check.js';
import { SynthModel } from '../../src/synth/reference-synth.js';
import { A440, parseReference } from '../../src/tuning/index.js';

afterAll(async () => {
  await disableMidi();
});

const pythagorean = loadTuningPreset('pythagorean').tuning;
const cents = (a: number, b: number) => 1200 * Math.log2(a / b);

/** Plays a plan into the reference synth by its own times; at each listen point, the frequencies sounding (low to high). */
function sound(plan: SynthCheckPlan, synth = new SynthModel(440)) {
  const heard: Array<{ what: string; hz: number[] }> = [];
  let step = 0;
  for (const point of plan.listen) {
    while (step < plan.steps.length && plan.steps[step]!.at <= point.at) {
      const s = plan.steps[step++]!;
      for (const m of s.messages) synth.receive(s.at, m);
    }
    heard.push({ what: point.what, hz: synth.active().map((v) => synth.frequency(v)).sort((a, b) => a - b) });
  }
  for (const s of plan.steps.slice(step)) for (const m of s.messages) synth.receive(s.at, m);
  for (const m of plan.closing) synth.receive(1e9, m);
  return { heard, synth };
}

/**
 * The frequencies each part must sound, from ratios: Pythagorean G4 and D5 are two fifths down
 * and one fourth up from A4 (8/9 and 4/3 of it); 12-ET ones 2^(−2/12) and 2^(5/12) of it; the
 * moved key and its neighbour are the synth's own 12-ET C♯4, 2^(−8/12) of its A4 (or, for
 * scale/octave tuning, the quarter tone between C4 and C♯4, 2^(−8.5/12)).
 */
function expected(a4: number, neighbour: number) {
  return {
    'pure fifth': [a4 * (8 / 9), a4 * (4 / 3)],
    '12-ET fifth': [a4 * 2 ** (-2 / 12), a4 * 2 ** (5 / 12)],
    moved: [neighbour],
    neighbour: [neighbour],
  } as Record<string, number[]>;
}

function checkHeard(plan: SynthCheckPlan, a4: number, tolerance: number, synthA4 = 440, quarterTone = false) {
  const { heard, synth } = sound(plan, new SynthModel(synthA4));
  const want = expected(a4, synthA4 * 2 ** ((quarterTone ? -8.5 : -8) / 12));
  expect(heard.map((h) => h.what)).toEqual(['pure fifth', '12-ET fifth', 'pure fifth', 'moved', 'neighbour', 'moved', 'neighbour']);
  for (const h of heard) {
    expect(h.hz).toHaveLength(want[h.what]!.length);
    h.hz.forEach((hz, i) => expect(Math.abs(cents(hz, want[h.what]![i]!)), `${h.what} ${i}`).toBeLessThan(tolerance));
  }
  const pure = heard[0]!.hz;
  expect(Math.abs(cents(pure[1]! / pure[0]!, 3 / 2))).toBeLessThan(tolerance * 2); // a pure fifth, 3/2
  // Every way out ends with everything off and put back: the panic sequence and, for MTS, 12-ET again.
  expect(synth.active()).toEqual([]);
  expect(synth.channels.every((c) => c.bend === 8192 && !c.sustain)).toBe(true);
  expect(synth.keyTable.every((k, i) => Math.abs(k - i) < 1e-3)).toBe(true);
  expect(synth.channels.every((c) => c.octaveOffsets.every((o) => o === 0))).toBe(true);
}

const settings = (s: Partial<CheckSettings>): CheckSettings => ({ reference: A440, ...s });

// Tolerances: half a bend step at the range (MIDI 1.0 14-bit bend: 100·range/8192 cents a step),
// MTS's 0.006 cent, or a whole cent for the 1-byte scale/octave form (MTS: 1 cent units).
describe('synth-check: what the synth sounds, in every retuning mode', () => {
  it('MPE pitch bend at ±48', () => checkHeard(synthCheckPlan(settings({}), pythagorean, 1000), 440, 0.3));
  it('multitimbral pitch bend at ±2, reference A4=415', () => checkHeard(synthCheckPlan(settings({ layout: 'multi', channels: [0, 1, 2, 3], bendRange: 2, reference: parseReference('A4=415') }), pythagorean, 1000), 415, 0.02));
  it('MTS single note tuning, on a synth tuned to A4=442', () => checkHeard(synthCheckPlan(settings({ mode: 'mts-note', channels: [0], synthA4: 442 }), pythagorean, 1000), 440, 0.01, 442));
  it('MTS scale/octave tuning, 2-byte and 1-byte', () => {
    checkHeard(synthCheckPlan(settings({ mode: 'mts-octave', channels: [0] }), pythagorean, 1000), 440, 0.01, 440, true);
    checkHeard(synthCheckPlan(settings({ mode: 'mts-octave', channels: [0], octaveForm: 1 }), pythagorean, 1000), 440, 0.5, 440, true);
  });

  it('a wrong bend range is heard: a synth left at ±2 while diesis assumes ±12 bends C4 only a sixth of the way', () => {
    const plan = synthCheckPlan(settings({ layout: 'multi', channels: [0, 1], bendRange: 12, sendBendRange: false }), pythagorean, 1000);
    const { heard } = sound(plan); // the model's ranges start at ±2 (MIDI 1.0's default)
    const moved = heard.find((h) => h.what === 'moved')!.hz[0]!;
    const neighbour = heard.find((h) => h.what === 'neighbour')!.hz[0]!;
    expect(cents(neighbour, moved)).toBeCloseTo(100 - 100 / 6, 0);
  });
});

describe('diesis synth-check --out, on a virtual synth', () => {
  it('plays the sequence with its cues and ends with the panic sequence', async () => {
    const synth = new SynthModel(440);
    const onsets: number[] = [];
    const port = virtualOutput('check synth 1', (bytes) => {
      const v = synth.receive(performance.now(), bytes);
      if (v) onsets.push(synth.frequency(v));
    });
    let stdout = '';
    const code = await main(['node', 'diesis', 'synth-check', '--out', port.name, '--layout', 'multi', '--channels', '1-4', '--bend-range', '2', '--note-seconds', '0.05'], {
      stdout: { write: (s) => void (stdout += s) },
      stderr: { write: (s) => void (stdout += s) },
    });
    expect(code).toBe(0);
    expect(stdout).toContain('synth check: pitch bend, multitimbral on channels 1,2,3,4, range ±2 (sent as RPN 0)');
    expect(stdout).toContain('the 12-ET one beats slowly, about 1.3 times a second'); // |3·392.00 − 2·587.33| (12-ET at A4=440)
    expect(stdout).toContain('C4 bent up one semitone (bend 12288 of 16383 at ±2)'); // 8192 + 8192/2
    expect(stdout).toMatch(/done: every note off/u);
    const want = expected(440, 440 * 2 ** (-8 / 12));
    const order = [...want['pure fifth']!, ...want['12-ET fifth']!, ...want['pure fifth']!, ...want.moved!, ...want.neighbour!, ...want.moved!, ...want.neighbour!];
    expect(onsets).toHaveLength(order.length);
    onsets.forEach((hz, i) => expect(Math.abs(cents(hz, order[i]!)), `note ${i}`).toBeLessThan(0.02));
    expect(synth.active()).toEqual([]);
    expect(synth.channels.every((c) => c.bend === 8192)).toBe(true);
  });

  it('stopped early, it still sends every note-off and the panic', async () => {
    const synth = new SynthModel(440);
    const plan = synthCheckPlan(settings({ mode: 'mts-note', channels: [0] }), pythagorean, 5000);
    const stop = new AbortController();
    let stdout = '';
    const code = await runSynthCheck(
      plan,
      (bytes) => {
        synth.receive(0, bytes);
        if (synth.active().length === 2) stop.abort(); // the first fifth is sounding
      },
      { stdout: { write: (s) => void (stdout += s) }, stderr: { write: () => undefined } },
      stop.signal,
    );
    expect(code).toBe(0);
    expect(stdout).toContain('stopped (asked to stop)');
    expect(synth.active()).toEqual([]);
    expect(synth.keyTable.every((k, i) => Math.abs(k - i) < 1e-3)).toBe(true);
  });
});
