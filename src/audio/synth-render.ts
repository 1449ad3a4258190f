import { SynthModel, type ModelVoice } from '../synth/reference-synth.js';
import { UserError } from '../util/errors.js';

/** The longest audio rendered (4 hours: 2.5 GB of samples at 44.1 kHz would not fit in memory much beyond). */
export const MAX_AUDIO_SECONDS = 4 * 3600;

function describeDuration(seconds: number): string {
  return seconds >= 86_400 ? `${(seconds / 86_400).toFixed(0)} days` : `${(seconds / 3600).toFixed(1)} hours`;
}

/** Frames rendered between two progress reports at most (about 0.1 s at 44.1 kHz). */
const BLOCK_FRAMES = 4096;

/** Sounds one voice: adds its samples for frames `from` to `to` at `hz`; `ended` once its key and pedal are up. */
export interface VoicePlayer {
  play(out: Float32Array, from: number, to: number, hz: number, ended: boolean): void;
}

/**
 * Sounds a stream of MIDI messages as a synth would: the messages drive the reference synth (bends,
 * MPE zones, MTS, pedals), and every voice it holds is played by the player `start` gives it, at the
 * frequency the synth gives it, for as long as it rings (its release `releaseSeconds` and as much again).
 */
export function renderThroughSynth(
  messages: ReadonlyArray<{ time: number; data: readonly number[] }>,
  sampleRate: number,
  releaseSeconds: number,
  start: (voice: ModelVoice) => VoicePlayer | undefined,
  progress?: (share: number) => void,
  /** The synth's own A4, as the engine was told. */
  a4 = 440,
): Float32Array {
  const synth = new SynthModel(a4, releaseSeconds * 2000);
  const sorted = [...messages].sort((a, b) => a.time - b.time);
  const lastMs = sorted[sorted.length - 1]?.time ?? 0;
  const seconds = lastMs / 1000 + 2 * releaseSeconds + 0.5;
  if (!(seconds <= MAX_AUDIO_SECONDS)) {
    throw new UserError(`the audio would last ${describeDuration(seconds)}; an audio preview is at most ${MAX_AUDIO_SECONDS / 3600} hours (is there a very long silence in the file?)`);
  }
  const out = new Float32Array(Math.ceil(seconds * sampleRate));
  const players = new Map<ModelVoice, VoicePlayer>();
  let cursor = 0;
  // Progress follows the frames rendered (the work), in blocks, so the bar moves steadily even
  // across a long stretch between two messages.
  let reported = -Infinity;
  const renderUntil = (frame: number): void => {
    const to = Math.min(frame, out.length);
    while (cursor < to) {
      const end = Math.min(to, cursor + BLOCK_FRAMES);
      for (const [voice, player] of players) player.play(out, cursor, end, synth.frequency(voice), voice.state === 'tail');
      cursor = end;
      if (progress && cursor / out.length - reported >= 0.005) progress((reported = cursor / out.length));
    }
    for (const voice of [...players.keys()]) if (!synth.voices.includes(voice)) players.delete(voice);
  };
  progress?.((reported = 0));
  for (const m of sorted) {
    renderUntil(Math.round((m.time / 1000) * sampleRate));
    const voice = synth.receive(m.time, m.data);
    const player = voice && start(voice);
    if (voice && player) players.set(voice, player);
  }
  for (let t = lastMs; cursor < out.length; t += 50) {
    synth.advance(t);
    renderUntil(cursor + Math.round(0.05 * sampleRate));
  }
  progress?.(1);
  return out;
}

/** An exponential release: 1 until the voice ends, then −43 dB after `seconds`. */
export function releaseEnvelope(framesSinceEnd: number | undefined, sampleRate: number, seconds: number): number {
  return framesSinceEnd === undefined ? 1 : Math.exp(-(framesSinceEnd / sampleRate) / (seconds / 5));
}
