import { DEFAULT_WINDOW, type KeyboardWindow } from '../pitch/index.js';
import { ControlMap } from '../spelling/control-map.js';
import { ControlledSpeller } from '../spelling/controlled.js';
import { fixedSpeller, type Speller } from '../spelling/speller.js';
import type { Reference, Tuning } from '../tuning/index.js';
import type { GatherSetting } from './chord-gatherer.js';
import type { RouterEvent } from './events.js';
import { OUTPUT_MODES, type OutputMode } from './output-modes.js';
import type { OutputRequest, OutputStrategy } from './output.js';
import type { PieceSource } from './pieces.js';
import { PitchTable } from './pitch-table.js';
import { Router } from './router.js';
import { Tally } from './tally.js';

export { OUTPUT_MODE_IDS, OUTPUT_MODES, type OutputMode } from './output-modes.js';

/** Everything the engine needs; `resolveEngineOptions` fills the defaults. */
export interface EngineOptions extends OutputRequest {
  readonly tuning: Tuning;
  readonly reference: Reference;
  readonly mode: OutputMode;
  readonly speller: Speller;
  readonly controls?: ControlMap | undefined;
  /** Chord gathering: milliseconds to wait, or `'same-time'` for files. */
  readonly gather?: GatherSetting | undefined;
  readonly observer?: ((event: RouterEvent) => void) | undefined;
  /** The tuning's preset id and name (what a tuning change reports it changed from). */
  readonly tuningAbout?: { readonly id: string; readonly name: string } | undefined;
  /** A concert programme's pieces (next-piece and previous-piece move through them). */
  readonly pieces?: PieceSource | undefined;
}

export type EngineOptionsInput = Partial<Omit<EngineOptions, 'octaveForm'>> &
  Pick<EngineOptions, 'tuning' | 'reference'> & { readonly octaveForm?: 1 | 2 | undefined };

/** The default member channels of the bend output: 2–16. */
export const DEFAULT_CHANNELS: readonly number[] = OUTPUT_MODES.bend.defaultChannels;
export const DEFAULT_RELEASE_GUARD_MS = 400;
/** MPE's default member bend range (RP-053), and the usual default elsewhere. */
export const MPE_BEND_RANGE = 48;
export const MULTI_BEND_RANGE = 2;

export function resolveEngineOptions(input: EngineOptionsInput): EngineOptions {
  const mode = input.mode ?? 'bend';
  const layout = input.layout ?? 'mpe';
  const window: KeyboardWindow = input.window ?? DEFAULT_WINDOW;
  return {
    tuning: input.tuning,
    reference: input.reference,
    mode,
    channels: input.channels ?? OUTPUT_MODES[mode].defaultChannels,
    layout,
    bendRange: input.bendRange ?? (layout === 'mpe' ? MPE_BEND_RANGE : MULTI_BEND_RANGE),
    sendBendRange: input.sendBendRange ?? true,
    wheelRange: input.wheelRange ?? 2,
    releaseGuardMs: input.releaseGuardMs ?? DEFAULT_RELEASE_GUARD_MS,
    synthA4: input.synthA4 ?? 440,
    mtsDevice: input.mtsDevice ?? 0x7f,
    mtsProgram: input.mtsProgram ?? 0,
    octaveForm: input.octaveForm ?? 2,
    sampleLayout: input.sampleLayout,
    sampleKeys: input.sampleKeys,
    speller: input.speller ?? fixedSpeller(window),
    window: input.speller ? input.speller.currentWindow() : window,
    // A controlled speller always has a control map, so pages and programmes can act as pedals do.
    controls: input.controls ?? (input.speller instanceof ControlledSpeller ? new ControlMap([], input.speller) : undefined),
    gather: input.gather,
    observer: input.observer,
    tuningAbout: input.tuningAbout,
    pieces: input.pieces,
  };
}

export function createOutput(options: EngineOptions, table: PitchTable): OutputStrategy {
  return OUTPUT_MODES[options.mode].create(options, table);
}

/** Builds the whole engine from options. */
export function createRouter(input: EngineOptionsInput): Router {
  return buildRouter(resolveEngineOptions(input));
}

/** The engine with its counts: a tally folded from its events, beside the caller's own observer. */
export function createEngine(input: EngineOptionsInput): { router: Router; tally: Tally; options: EngineOptions } {
  const tally = new Tally();
  const observer = input.observer;
  const options = resolveEngineOptions({ ...input, observer: observer ? (e) => (tally.observe(e), observer(e)) : tally.observe });
  return { router: buildRouter(options), tally, options: { ...options, observer } };
}

function buildRouter(options: EngineOptions): Router {
  const table = new PitchTable(options.tuning, options.reference, options.synthA4);
  return new Router({
    table,
    tuningAbout: options.tuningAbout,
    pieces: options.pieces,
    releaseGuardMs: options.releaseGuardMs,
    speller: options.speller,
    output: createOutput(options, table),
    wheelRange: options.wheelRange,
    controls: options.controls,
    gather: options.gather,
    observer: options.observer,
  });
}
