import { noteOff, noteOn, pitchBend, type TimedMessage } from '../midi/bytes.js';
import { encodeFrequency, scaleOctaveTuning, singleNoteTuning } from '../midi/mts.js';
import { BEND_CENTRE, centsToBend } from '../midi/pitch-bend.js';
import { ControlledSpeller } from '../spelling/controlled.js';
import { createStrategy } from '../spelling/strategy.js';
import { equalTemperedHz, type Reference, type Tuning } from '../tuning/index.js';
import { createEngine, type EngineOptions, type EngineOptionsInput } from './setup.js';

// `diesis synth-check`: a short, known sequence that lets a player hear whether the synth takes
// diesis's retuning as diesis sends it (the bend range, MTS reception) before a performance.
// Pure: the whole sequence is made in advance, with its times; the shell sends it on a clock.

/** The output settings the check uses (the tuning and spelling are its own). */
export type CheckSettings = Pick<EngineOptionsInput, 'mode' | 'layout' | 'channels' | 'bendRange' | 'sendBendRange' | 'synthA4' | 'mtsDevice' | 'mtsProgram' | 'octaveForm' | 'releaseGuardMs'> & {
  readonly reference: Reference;
};

/** What should sound at a moment of the check, for the player's ears and the tests' model. */
export type ListenPoint =
  | { readonly at: number; readonly what: 'pure fifth' | '12-ET fifth'; readonly keys: readonly [number, number] }
  | { readonly at: number; readonly what: 'moved' | 'neighbour'; readonly keys: readonly [number] };

export interface CheckStep {
  readonly at: number;
  readonly messages: ReadonlyArray<readonly number[]>;
  /** Printed when the step is sent. */
  readonly cue?: string | undefined;
}

export interface SynthCheckPlan {
  readonly steps: readonly CheckStep[];
  /** Sent at the end, and on every early way out: note-offs for every key the check plays, the synth's tuning put back (MTS), then the engine's panic. */
  readonly closing: ReadonlyArray<readonly number[]>;
  readonly listen: readonly ListenPoint[];
  readonly options: EngineOptions;
}

const FIFTH = [67, 74] as const; // G4 and D5
const LOWER = 60; // C4, moved up to the pitch of C♯4
const UPPER = 61;
const VELOCITY = 80;

/** Beats a second of the 12-ET fifth G4–D5 at the reference: |3·f(G4) − 2·f(D5)| (common practice, no source). */
export function equalFifthBeats(ref: Reference): number {
  return Math.abs(3 * equalTemperedHz(ref, FIFTH[0]) - 2 * equalTemperedHz(ref, FIFTH[1]));
}

/**
 * The check for these settings. `pureFifths` is a tuning whose fifths are pure (the Pythagorean
 * preset); `noteMs` is how long each note sounds.
 */
export function synthCheckPlan(settings: CheckSettings, pureFifths: Tuning, noteMs: number): SynthCheckPlan {
  // A speller under controls, so the engine's own 12-ET comparison control can be fired.
  const { router, options } = createEngine({ ...settings, tuning: pureFifths, speller: new ControlledSpeller(createStrategy({ strategy: 'fixed' })) });
  if (options.mode === 'pass' || options.mode === 'samples') throw new Error(`no synth check for mode ${options.mode}`);
  const steps: CheckStep[] = [];
  const listen: ListenPoint[] = [];
  const played = new Set<string>();
  const put = (at: number, messages: ReadonlyArray<readonly number[]>, cue?: string): void => {
    for (const m of messages) if ((m[0]! & 0xf0) === 0x90) played.add(`${m[0]! & 0x0f} ${m[1]}`);
    steps.push({ at, messages, cue });
  };
  const engine = (out: readonly TimedMessage[]): number[][] => out.map((m) => [...m.data]);
  const gap = Math.max(300, options.releaseGuardMs + 100); // a slot or channel may be retuned again
  const range = options.bendRange;
  const beats = equalFifthBeats(settings.reference);
  let t = 0;
  put(t, engine(router.start(t)), describeSettings(options));

  // 1. A pure fifth, the same fifth in 12-ET (the engine's comparison control), pure again.
  const fifth = (what: 'pure fifth' | '12-ET fifth', cue?: string): void => {
    t += gap;
    put(t, engine(FIFTH.flatMap((k) => router.process(t, noteOn(0, k, VELOCITY)))), cue);
    listen.push({ at: t + noteMs / 2, what, keys: FIFTH });
    t += noteMs;
    put(t, engine(FIFTH.flatMap((k) => router.process(t, noteOff(0, k)))));
  };
  fifth(
    'pure fifth',
    `1/2  the fifth G4–D5 pure, then in 12-ET, then pure again. The pure fifth is still, without beats; ` +
      `the 12-ET one beats slowly, about ${beats.toFixed(1)} times a second. If the "pure" fifth beats as much or more, ` +
      `the retuning does not reach the synth as diesis sends it (${options.mode === 'bend' ? `its bend range is not ±${range}` : 'it does not take MTS'}).`,
  );
  put(t, engine(router.act(t, { action: { name: 'pass' }, on: true })));
  fifth('12-ET fifth');
  put(t, engine(router.act(t, { action: { name: 'pass' }, on: true })));
  fifth('pure fifth');

  // 2. A key moved by exactly a semitone (bend) or retuned (MTS), against the key above it.
  const channel = options.channels[0] ?? 0;
  const restore: number[][] = [];
  let move: { before: number[][]; after: number[][]; cue: string };
  if (options.mode === 'bend') {
    const bend = centsToBend(100, range);
    move = {
      before: [pitchBend(channel, bend.value)],
      after: [pitchBend(channel, BEND_CENTRE)],
      cue:
        `2/2  C4 bent up one semitone (bend ${bend.value} of 16383 at ±${range}) on channel ${channel + 1}, then C♯4 unbent, twice. ` +
        `They should be the same pitch. Higher bent: the synth's range is wider than ±${range}; lower: narrower ` +
        `(a whole tone up means ±${2 * range}); a semitone apart: it ignores pitch bend on that channel.`,
    };
  } else if (options.mode === 'mts-note') {
    // As the engine sends MTS (src/router/mts-note-output.ts), key positions are counted from the synth's own A4.
    const tone = (key: number): number => options.synthA4 * 2 ** ((key - 69) / 12);
    const etTable = Array.from({ length: 128 }, (_, key) => ({ key, data: encodeFrequency(tone(key), options.synthA4) }));
    restore.push(singleNoteTuning(options.mtsDevice, options.mtsProgram, etTable.slice(0, 64)), singleNoteTuning(options.mtsDevice, options.mtsProgram, etTable.slice(64)));
    move = {
      before: [singleNoteTuning(options.mtsDevice, options.mtsProgram, [{ key: LOWER, data: encodeFrequency(tone(UPPER), options.synthA4) }, { key: UPPER, data: encodeFrequency(tone(UPPER), options.synthA4) }])],
      after: [],
      cue:
        `2/2  key C4 retuned to the pitch of C♯4 (MTS single note tuning, device ${options.mtsDevice}, program ${options.mtsProgram}), then C♯4, twice. ` +
        `They should be the same pitch. A semitone apart: the synth does not take MTS note tuning on that device ID and program.`,
    };
  } else {
    const offsets = (c: number, cs: number): number[] => [c, cs, ...new Array<number>(10).fill(0)];
    restore.push(scaleOctaveTuning(options.mtsDevice, options.channels, offsets(0, 0), options.octaveForm));
    move = {
      before: [scaleOctaveTuning(options.mtsDevice, options.channels, offsets(50, -50), options.octaveForm)],
      after: [],
      cue:
        `2/2  every C raised 50 cents and every C♯ lowered 50 cents (MTS scale/octave tuning, ${options.octaveForm}-byte), then C4 and C♯4 in turn, twice. ` +
        `They should be the same pitch, a quarter tone between the two keys. A semitone apart: the synth does not take MTS scale/octave tuning.`,
    };
  }
  for (let round = 0; round < 2; round++) {
    t += gap;
    put(t, [...move.before, noteOn(channel, LOWER, VELOCITY)], round === 0 ? move.cue : undefined);
    listen.push({ at: t + noteMs / 2, what: 'moved', keys: [LOWER] });
    t += noteMs;
    put(t, [noteOff(channel, LOWER), ...move.after]);
    t += gap / 3;
    put(t, [noteOn(channel, UPPER, VELOCITY)]);
    listen.push({ at: t + noteMs / 2, what: 'neighbour', keys: [UPPER] });
    t += noteMs;
    put(t, [noteOff(channel, UPPER)]);
  }
  t += gap;
  const offs = [...played].map((id) => id.split(' ').map(Number) as [number, number]).map(([c, k]) => noteOff(c, k));
  const closing = [...offs, ...restore, ...engine(router.panic(t, 'synth check over'))];
  return { steps, closing, listen, options };
}

function describeSettings(o: EngineOptions): string {
  const channels = o.channels.map((c) => c + 1).join(',');
  const how =
    o.mode === 'bend'
      ? `pitch bend, ${o.layout === 'mpe' ? 'MPE' : 'multitimbral'} on channels ${channels}, range ±${o.bendRange}${o.sendBendRange ? ' (sent as RPN 0)' : ' (set by hand on the synth)'}`
      : o.mode === 'mts-note'
        ? `MTS single note tuning on channel ${channels}, device ${o.mtsDevice}, program ${o.mtsProgram}`
        : `MTS scale/octave tuning (${o.octaveForm}-byte) on channel ${channels}, device ${o.mtsDevice}`;
  return `synth check: ${how}. Start with the synth's volume low.`;
}
