import { SynthModel, type ModelVoice } from '../synth/reference-synth.js';
import type { Audio } from './wav.js';

export type VoiceKind = 'pluck' | 'organ';

/** A built-in voice: partial amplitudes, how fast each dies away, attack and release. */
interface VoiceShape {
  readonly partials: readonly number[];
  /** Seconds for the fundamental to fall by 1/e (higher partials faster); Infinity holds. */
  readonly decay: number;
  readonly attack: number;
  readonly release: number;
}

const SHAPES: Readonly<Record<VoiceKind, VoiceShape>> = {
  pluck: { partials: [1, 0.55, 0.4, 0.28, 0.2, 0.14, 0.1, 0.07], decay: 2.2, attack: 0.002, release: 0.12 },
  organ: { partials: [1, 0.5, 0.3, 0.25, 0, 0.15, 0, 0.1], decay: Infinity, attack: 0.03, release: 0.08 },
};

export interface PreviewOptions {
  readonly sampleRate: number;
  readonly voice: VoiceKind;
  /** The synth's own A4, as the engine was told. */
  readonly synthA4?: number;
  /** Called with the share done, now and then (for a progress bar). */
  readonly progress?: (share: number) => void;
}

interface Oscillator {
  /** Phase of the fundamental in cycles, kept in double precision so pitch stays exact. */
  phase: number;
  age: number;
  released: number | undefined;
  readonly gain: number;
}

/**
 * Renders what a synth would sound from diesis's MIDI output: the messages drive the reference
 * synth (bends, MPE zones, MTS, pedals), and every voice it holds sings with a built-in voice at
 * the frequency the synth gives it. So the preview hears exactly the engine's decisions.
 */
export function renderPreview(messages: ReadonlyArray<{ time: number; data: readonly number[] }>, options: PreviewOptions): Audio {
  const shape = SHAPES[options.voice];
  const rate = options.sampleRate;
  const synth = new SynthModel(options.synthA4 ?? 440, shape.release * 2000); // voices ring on twice the release, by then 90 dB down
  const sorted = [...messages].sort((a, b) => a.time - b.time);
  const endTime = (sorted[sorted.length - 1]?.time ?? 0) / 1000 + 2 * shape.release + 0.5;
  const out = new Float32Array(Math.ceil(endTime * rate));
  const oscillators = new Map<ModelVoice, Oscillator>();
  let cursor = 0;
  const renderUntil = (frame: number): void => {
    for (const [voice, osc] of oscillators) {
      const hz = synth.frequency(voice);
      const step = hz / rate;
      const ended = voice.state === 'tail';
      if (ended && osc.released === undefined) osc.released = osc.age;
      for (let n = cursor; n < frame && n < out.length; n++) {
        const t = osc.age / rate;
        let env = Math.min(1, t / shape.attack);
        if (osc.released !== undefined) env *= Math.exp(-((osc.age - osc.released) / rate) / (shape.release / 5)); // −43 dB at `release`
        let sample = 0;
        for (let h = 0; h < shape.partials.length; h++) {
          const a = shape.partials[h]!;
          if (a === 0 || hz * (h + 1) > rate * 0.45) continue;
          const decay = shape.decay === Infinity ? 1 : Math.exp(-t / (shape.decay / (1 + 0.6 * h)));
          sample += a * decay * Math.sin(2 * Math.PI * (h + 1) * osc.phase);
        }
        out[n]! += osc.gain * env * sample;
        osc.phase += step;
        if (osc.phase > 1e6) osc.phase -= Math.floor(osc.phase);
        osc.age++;
      }
    }
    cursor = Math.max(cursor, frame);
    for (const voice of [...oscillators.keys()]) if (!synth.voices.includes(voice)) oscillators.delete(voice);
  };
  sorted.forEach((m, i) => {
    renderUntil(Math.round((m.time / 1000) * rate));
    const voice = synth.receive(m.time, m.data);
    if (voice) oscillators.set(voice, { phase: 0, age: 0, released: undefined, gain: 0.12 * (voice.velocity / 127) ** 1.5 });
    if (i % 2000 === 0) options.progress?.(i / sorted.length);
  });
  // Let every note end and its release die away.
  for (let t = sorted[sorted.length - 1]?.time ?? 0; cursor < out.length; t += 50) {
    synth.advance(t);
    renderUntil(cursor + Math.round(0.05 * rate));
  }
  options.progress?.(1);
  let peak = 0;
  for (const v of out) peak = Math.max(peak, Math.abs(v));
  if (peak > 0.89) for (let n = 0; n < out.length; n++) out[n]! *= 0.89 / peak; // −1 dBFS at most
  return { sampleRate: rate, channels: [out] };
}

/** Sustained dyads, one after another, to hear an interval's beats: `pairs` of frequencies, `seconds` each. */
export function renderDyads(pairs: ReadonlyArray<readonly [number, number]>, sampleRate: number, seconds = 2.5, gap = 0.4): Audio {
  const shape = SHAPES.organ;
  const per = Math.round((seconds + gap) * sampleRate);
  const out = new Float32Array(per * pairs.length);
  pairs.forEach(([low, high], i) => {
    for (let n = 0; n < seconds * sampleRate; n++) {
      const t = n / sampleRate;
      const env = Math.min(1, t / shape.attack, (seconds - t) / shape.release);
      let v = 0;
      for (const hz of [low, high]) shape.partials.forEach((a, h) => (v += hz * (h + 1) < sampleRate * 0.45 ? a * Math.sin(2 * Math.PI * hz * (h + 1) * t) : 0));
      out[i * per + n] = 0.15 * env * v;
    }
  });
  return { sampleRate, channels: [out] };
}
