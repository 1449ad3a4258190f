import { releaseEnvelope, renderThroughSynth } from './synth-render.js';
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

/**
 * Renders what a synth would sound from diesis's MIDI output: every voice the reference synth
 * holds sings with a built-in voice at the frequency the synth gives it, so the preview hears
 * exactly the engine's decisions.
 */
export function renderPreview(messages: ReadonlyArray<{ time: number; data: readonly number[] }>, options: PreviewOptions): Audio {
  const shape = SHAPES[options.voice];
  const rate = options.sampleRate;
  const out = renderThroughSynth(
    messages,
    rate,
    shape.release,
    (voice) => {
      let phase = 0; // cycles of the fundamental, in double precision so the pitch stays exact
      let age = 0;
      let endedAt: number | undefined;
      const gain = 0.12 * (voice.velocity / 127) ** 1.5;
      return {
        play(buffer, from, to, hz, ended) {
          if (ended && endedAt === undefined) endedAt = age;
          const step = hz / rate;
          for (let n = from; n < to; n++) {
            const t = age / rate;
            const env = Math.min(1, t / shape.attack) * releaseEnvelope(endedAt === undefined ? undefined : age - endedAt, rate, shape.release);
            let sample = 0;
            for (let h = 0; h < shape.partials.length; h++) {
              const a = shape.partials[h]!;
              if (a === 0 || hz * (h + 1) > rate * 0.45) continue;
              const decay = shape.decay === Infinity ? 1 : Math.exp(-t / (shape.decay / (1 + 0.6 * h)));
              sample += a * decay * Math.sin(2 * Math.PI * (h + 1) * phase);
            }
            buffer[n]! += gain * env * sample;
            phase += step;
            if (phase > 1e6) phase -= Math.floor(phase);
            age++;
          }
        },
      };
    },
    options.progress,
    options.synthA4,
  );
  let peak = 0;
  for (const v of out) peak = Math.max(peak, Math.abs(v));
  if (peak > 0.89) for (let n = 0; n < out.length; n++) out[n]! *= 0.89 / peak; // −1 dBFS at most
  return { sampleRate: rate, channels: [out] };
}

/** How long each dyad of `renderDyads` sounds and the silence after it, in seconds. */
export const DYAD_SECONDS = 2.5;
export const DYAD_GAP_SECONDS = 0.4;

/** When each of `count` dyads starts in `renderDyads`' audio, in seconds (whole samples, as rendered). */
export function dyadStartTimes(count: number, sampleRate: number, seconds = DYAD_SECONDS, gap = DYAD_GAP_SECONDS): number[] {
  const per = Math.round((seconds + gap) * sampleRate);
  return Array.from({ length: count }, (_, i) => (i * per) / sampleRate);
}

/** Sustained dyads, one after another, to hear an interval's beats: `pairs` of frequencies, `seconds` each. */
export function renderDyads(pairs: ReadonlyArray<readonly [number, number]>, sampleRate: number, seconds = DYAD_SECONDS, gap = DYAD_GAP_SECONDS): Audio {
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
