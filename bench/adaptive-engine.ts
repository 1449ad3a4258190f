import { performance } from 'node:perf_hooks';
import { DEFAULT_WINDOW, keyOf, type PitchClass, type SpelledPitch } from '../src/pitch/index.js';
import { createEngine } from '../src/router/setup.js';
import type { Speller } from '../src/spelling/speller.js';
import { SynthModel, type ModelVoice } from '../src/synth/reference-synth.js';
import type { SoundingEvent } from '../src/tuning/adaptive/purity.js';
import { A440, type Tuning } from '../src/tuning/index.js';

/** A note of a piece with its written spelling: on at `on`, off at `off` (milliseconds). */
export interface WrittenNote {
  readonly id: number;
  readonly on: number;
  readonly off: number;
  readonly pitch: SpelledPitch;
}

/** A speller that says what the score wrote (the tuning is measured, not the spelling). */
function writtenSpeller(notes: readonly WrittenNote[], tonic: PitchClass | undefined): Speller {
  const byOnset = new Map<string, SpelledPitch[]>();
  for (const n of notes) {
    const slot = `${n.on}:${keyOf(n.pitch)}`;
    byOnset.set(slot, [...(byOnset.get(slot) ?? []), n.pitch]);
  }
  const at = (time: number, key: number): SpelledPitch => byOnset.get(`${time}:${key}`)?.shift() ?? { fifths: 0, octave: 4 };
  return {
    spell: (contexts) => contexts.map((c) => at(c.time, c.key)),
    peek: (c) => byOnset.get(`${c.time}:${c.key}`)?.[0] ?? { fifths: 0, octave: 4 },
    noteOff: () => undefined,
    currentWindow: () => DEFAULT_WINDOW,
    currentTonic: () => tonic,
    declaredTonic: () => tonic,
  };
}

/**
 * Plays written notes through the whole engine (mts-note, so every note's frequency is said to
 * 0.006 cent) into the reference synth and reports what the synth sounds: each voice's start with
 * the frequency the synth gives it, any change of that frequency while it sounds, and its end.
 * `costPerNote` receives, for each onset, the engine's microseconds (its `process` and `flush`
 * calls, the synth excluded) divided by the notes that begin there.
 */
export function soundedThroughEngine(notes: readonly WrittenNote[], tuning: Tuning, tonic: PitchClass | undefined, costPerNote?: number[]): SoundingEvent[] {
  const pending: Array<{ channel: number; key: number; pitch: SpelledPitch }> = [];
  const { router } = createEngine({
    tuning,
    reference: A440,
    mode: 'mts-note',
    gather: 'same-time',
    speller: writtenSpeller(notes, tonic),
    observer: (e) => e.type === 'note' && pending.push({ channel: e.placement.channel, key: e.placement.key, pitch: e.pitch }),
  });
  const synth = new SynthModel(440, 0);
  const events: SoundingEvent[] = [];
  const ids = new Map<ModelVoice, number>();
  const heard = new Map<ModelVoice, number>();
  const deliver = (out: ReadonlyArray<{ time: number; data: readonly number[] }>): void => {
    for (const m of out) {
      const voice = synth.receive(m.time, m.data);
      if (voice) {
        const i = pending.findIndex((p) => p.channel === voice.channel && p.key === voice.key);
        const pitch = i >= 0 ? pending.splice(i, 1)[0]!.pitch : undefined;
        ids.set(voice, ids.size);
        heard.set(voice, synth.frequency(voice));
        events.push({ kind: 'on', time: m.time, id: ids.get(voice)!, hz: heard.get(voice)!, ...(pitch ? { pitch } : {}) });
      }
      for (const [v, hz] of heard) {
        if (v.state === 'tail') {
          events.push({ kind: 'off', time: m.time, id: ids.get(v)! });
          heard.delete(v);
          continue;
        }
        const now = synth.frequency(v);
        if (now !== hz) {
          heard.set(v, now);
          events.push({ kind: 'change', time: m.time, id: ids.get(v)!, hz: now });
        }
      }
    }
  };
  deliver(router.start(0));
  const times = [...new Set(notes.flatMap((n) => [n.on, n.off]))].sort((a, b) => a - b);
  const ons = new Map<number, WrittenNote[]>();
  const offs = new Map<number, WrittenNote[]>();
  for (const n of notes) {
    ons.set(n.on, [...(ons.get(n.on) ?? []), n]);
    offs.set(n.off, [...(offs.get(n.off) ?? []), n]);
  }
  // Parts in unison need a key each: a note whose key is already down takes the next input channel,
  // as a second manual or a second player would.
  const channelOf = new Map<WrittenNote, number>();
  const down = new Set<number>();
  for (const t of times) {
    for (const n of offs.get(t) ?? []) {
      const channel = channelOf.get(n) ?? 0;
      down.delete(channel * 128 + keyOf(n.pitch));
      deliver(router.process(t, [0x80 | channel, keyOf(n.pitch), 0]));
    }
    // the engine's own time for the onset's notes (decode, spell, tune, place, encode), per note
    let spent = 0;
    const starting = ons.get(t) ?? [];
    for (const n of starting) {
      let channel = 0;
      while (down.has(channel * 128 + keyOf(n.pitch)) && channel < 15) channel++;
      down.add(channel * 128 + keyOf(n.pitch));
      channelOf.set(n, channel);
      const start = performance.now();
      const out = router.process(t, [0x90 | channel, keyOf(n.pitch), 80]);
      spent += performance.now() - start;
      deliver(out);
    }
    const start = performance.now();
    const out = router.flush(t);
    spent += performance.now() - start;
    if (starting.length > 0) costPerNote?.push((spent * 1000) / starting.length);
    deliver(out);
  }
  deliver(router.releaseAll(times[times.length - 1] ?? 0));
  return events;
}
