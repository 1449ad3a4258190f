import type { ScaleOctaveForm } from '../midi/mts.js';
import { DEFAULT_WINDOW, type KeyboardWindow } from '../pitch/index.js';
import type { ControlMap } from '../spelling/control-map.js';
import { fixedSpeller, type Speller } from '../spelling/speller.js';
import type { Reference, Tuning } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { BendOutput, type BendLayout } from './bend-output.js';
import { MtsNoteOutput } from './mts-note-output.js';
import { MtsOctaveOutput } from './mts-octave-output.js';
import type { OutputStrategy } from './output.js';
import { PassOutput } from './pass-output.js';
import { SamplesOutput } from './samples-output.js';
import { PitchTable } from './pitch-table.js';
import { Router, type RouterEvent } from './router.js';

export const OUTPUT_MODES = ['bend', 'mts-note', 'mts-octave', 'pass', 'samples'] as const;
export type OutputMode = (typeof OUTPUT_MODES)[number];

/** Everything the engine needs; `resolveEngineOptions` fills the defaults. */
export interface EngineOptions {
  readonly tuning: Tuning;
  readonly reference: Reference;
  readonly mode: OutputMode;
  /** Output channels 0…15: the member channels for `bend`, the first one for the other modes. */
  readonly channels: readonly number[];
  readonly layout: BendLayout;
  /** Member-channel bend range in semitones (the synth's setting). */
  readonly bendRange: number;
  readonly sendBendRange: boolean;
  readonly wheelRange: number;
  readonly releaseGuardMs: number;
  /** The synth's own A4 in Hz. */
  readonly synthA4: number;
  readonly mtsDevice: number;
  readonly mtsProgram: number;
  readonly octaveForm: ScaleOctaveForm;
  readonly speller: Speller;
  /** For `samples`: each spelling's channel in the sample set (line-of-fifths position → 0…15). */
  readonly sampleLayout?: ReadonlyMap<number, number> | undefined;
  readonly controls?: ControlMap | undefined;
  /** Chord gathering: milliseconds to wait live, or `'same-time'` for files. */
  readonly gather?: number | 'same-time' | undefined;
  readonly observer?: ((event: RouterEvent) => void) | undefined;
}

export type EngineOptionsInput = Partial<EngineOptions> & Pick<EngineOptions, 'tuning' | 'reference'> & { readonly window?: KeyboardWindow };

export const DEFAULT_CHANNELS: readonly number[] = Array.from({ length: 15 }, (_, i) => i + 1); // 2–16
export const DEFAULT_RELEASE_GUARD_MS = 400;
/** MPE's default member bend range (RP-053), and the usual default elsewhere. */
export const MPE_BEND_RANGE = 48;
export const MULTI_BEND_RANGE = 2;

export function resolveEngineOptions(input: EngineOptionsInput): EngineOptions {
  const layout = input.layout ?? 'mpe';
  return {
    tuning: input.tuning,
    reference: input.reference,
    mode: input.mode ?? 'bend',
    channels: input.channels ?? DEFAULT_CHANNELS,
    layout,
    bendRange: input.bendRange ?? (layout === 'mpe' ? MPE_BEND_RANGE : MULTI_BEND_RANGE),
    sendBendRange: input.sendBendRange ?? true,
    wheelRange: input.wheelRange ?? 2,
    releaseGuardMs: input.releaseGuardMs ?? DEFAULT_RELEASE_GUARD_MS,
    synthA4: input.synthA4 ?? 440,
    mtsDevice: input.mtsDevice ?? 0x7f,
    mtsProgram: input.mtsProgram ?? 0,
    octaveForm: input.octaveForm ?? 2,
    speller: input.speller ?? fixedSpeller(input.window ?? DEFAULT_WINDOW),
    sampleLayout: input.sampleLayout,
    controls: input.controls,
    gather: input.gather,
    observer: input.observer,
  };
}

/** The MPE master channel for a set of members: 1 below a zone starting at 2, 16 above one ending at 15. */
export function mpeMaster(channels: readonly number[]): number {
  const sorted = [...channels].sort((a, b) => a - b);
  const contiguous = sorted.every((c, i) => i === 0 || c === (sorted[i - 1] ?? -2) + 1);
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (contiguous && first === 1) return 0;
  if (contiguous && last === 14) return 15;
  throw new UserError('the MPE layout needs member channels 2…N (lower zone, master 1) or N…15 (upper zone, master 16); use --layout multi for any other set', 2);
}

export function createOutput(options: EngineOptions, table: PitchTable): OutputStrategy {
  const first = options.channels[0] ?? 0;
  switch (options.mode) {
    case 'bend':
      return new BendOutput({
        channels: options.channels,
        layout: options.layout,
        masterChannel: options.layout === 'mpe' ? mpeMaster(options.channels) : -1,
        bendRange: options.bendRange,
        sendBendRange: options.sendBendRange,
        releaseGuardMs: options.releaseGuardMs,
        wheelRange: options.wheelRange,
      });
    case 'mts-note':
      return new MtsNoteOutput({
        channel: first,
        device: options.mtsDevice,
        program: options.mtsProgram,
        releaseGuardMs: options.releaseGuardMs,
        synthA4: options.synthA4,
        wheelRange: options.wheelRange,
        sendBendRange: options.sendBendRange,
      });
    case 'mts-octave':
      return new MtsOctaveOutput(
        { channel: first, device: options.mtsDevice, form: options.octaveForm, wheelRange: options.wheelRange, sendBendRange: options.sendBendRange },
        table,
        options.speller.currentWindow(),
      );
    case 'pass':
      return new PassOutput(first);
    case 'samples':
      if (!options.sampleLayout) throw new UserError('--mode samples needs a sample set: give --sample-set DIR (made by "diesis samples")', 2);
      return new SamplesOutput(options.sampleLayout);
  }
}

/** Builds the whole engine from options. */
export function createRouter(input: EngineOptionsInput): Router {
  const options = resolveEngineOptions(input);
  const table = new PitchTable(options.tuning, options.reference, options.synthA4);
  return new Router({
    table,
    speller: options.speller,
    output: createOutput(options, table),
    wheelRange: options.wheelRange,
    controls: options.controls,
    gather: options.gather,
    observer: options.observer,
  });
}

/** Parses `2-16`, `1,3,5-8` (channels as a synth shows them, 1…16) into channels 0…15. */
export function parseChannels(text: string, what = '--channels'): number[] {
  const channels: number[] = [];
  for (const part of text.split(',')) {
    const match = /^\s*(\d+)\s*(?:-\s*(\d+)\s*)?$/u.exec(part);
    const from = Number(match?.[1]);
    const to = Number(match?.[2] ?? match?.[1]);
    if (!match || from < 1 || to > 16 || to < from) throw new UserError(`${what} "${text}": write channels 1–16 as a list or ranges, such as 2-16 or 1,3,5-8`, 2);
    for (let c = from; c <= to; c++) if (!channels.includes(c - 1)) channels.push(c - 1);
  }
  return channels;
}

/** Channels 0…15 as a synth shows them, ranges joined: `2–16`, `1,3,5–8`. */
export function formatChannels(channels: readonly number[]): string {
  const sorted = [...new Set(channels)].sort((a, b) => a - b).map((c) => c + 1);
  const parts: string[] = [];
  for (let i = 0; i < sorted.length; ) {
    let j = i;
    while (j + 1 < sorted.length && sorted[j + 1] === (sorted[j] ?? 0) + 1) j++;
    parts.push(j > i + 1 ? `${sorted[i]}–${sorted[j]}` : sorted.slice(i, j + 1).join(','));
    i = j + 1;
  }
  return parts.join(',');
}
