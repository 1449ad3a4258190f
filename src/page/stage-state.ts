/**
 * What the stage page shows and what it may ask for. Plain data only (JSON as it travels): the
 * live shell builds a `StageState` from the session (`stageStateOf`), the page server publishes it,
 * and every request the page makes arrives as a `StageControl` that the shell carries out through
 * the engine's own control actions, so the page and the pedals never disagree.
 */

/** A note name as a player writes it: `G♯4` and `G♯` with the real sharp and flat signs. */
export type NoteName = string;

/** The piece in force; `index` and `count` are those of a concert programme (a lone piece is 1 of 1). */
export interface StagePiece {
  readonly title: string;
  readonly index: number;
  readonly count: number;
  /** Whether previous and next can move anywhere (false without a programme, or at its ends). */
  readonly canPrevious: boolean;
  readonly canNext: boolean;
}

export interface StageTuning {
  /** The preset id (or file name) and its full name. */
  readonly id: string;
  readonly name: string;
  /** The tuning picture (SVG text), or undefined when none was drawn. Sent to the page only when it changes. */
  readonly picture?: string | undefined;
}

/** One of the twelve keys of an octave and the spelling it gives now. */
export interface StageKey {
  /** 0 = C … 11 = B. */
  readonly chroma: number;
  readonly black: boolean;
  /** `G♯` or `A♭`. */
  readonly spelling: NoteName;
  /** That spelling's distance from 12-ET at the reference, in cents. */
  readonly cents: number;
}

export interface StageNote {
  readonly spelling: NoteName;
  readonly key: number;
  readonly cents: number;
  readonly hz: number;
  /** Its key is up and a pedal keeps it sounding. */
  readonly pedalHeld: boolean;
}

export interface StageLatches {
  readonly flip: boolean;
  readonly freeze: boolean;
  readonly force: 'sharps' | 'flats' | null;
  /** The window shifted by this many fifths (0: as the strategy has it). */
  readonly shift: number;
}

export interface StagePedals {
  readonly sustain: boolean;
  readonly sostenuto: boolean;
}

export interface StageWarning {
  /** Increases with every warning, so the page knows which it has shown. */
  readonly id: number;
  readonly text: string;
}

export interface StageState {
  readonly piece: StagePiece;
  readonly tuning: StageTuning;
  /** The reference pitch, as `A4 = 415 Hz`. */
  readonly reference: string;
  /** `follow`, `key`, `fixed`. */
  readonly strategy: string;
  /** The key in force in words (`D minor`, or the tonic alone when the mode is not known), or null. */
  readonly key: string | null;
  /** The window in force, as `E♭..G♯`. */
  readonly window: string;
  /** The twelve keys C … B with their spellings now. */
  readonly keys: readonly StageKey[];
  readonly sounding: readonly StageNote[];
  readonly pedals: StagePedals;
  readonly latches: StageLatches;
  /** The bar when following a score, else null. */
  readonly bar: number | null;
  /** The latest warnings, oldest first, in words. */
  readonly warnings: readonly StageWarning[];
  /** True while new notes sound in 12-ET at the reference (the comparison control). */
  readonly passing: boolean;
  /** The output is connected to the synth. */
  readonly synthConnected: boolean;
}

/**
 * What the page may ask for. The switches name the state wanted (`on`), not a toggle, so a
 * request sent twice, or crossing a pedal press, still ends where the player meant.
 */
export type StageControl =
  | { readonly kind: 'panic' }
  | { readonly kind: 'piece'; readonly step: 1 | -1 }
  | { readonly kind: 'set-key'; readonly key: string }
  | { readonly kind: 'flip'; readonly on: boolean }
  | { readonly kind: 'freeze'; readonly on: boolean }
  | { readonly kind: 'compare-12et'; readonly on: boolean };

/** What became of a request: done, or refused with a reason in words the page shows. */
export type StageControlResult = { readonly ok: true } | { readonly ok: false; readonly reason: string };

const SWITCHES = new Set(['flip', 'freeze', 'compare-12et']);

/**
 * Checks a request that came over the wire (anything at all) and returns it typed, or a reason.
 * Only these six shapes pass; no field beyond them is read.
 */
export function parseStageControl(value: unknown): StageControl | string {
  if (typeof value !== 'object' || value === null) return 'a control must be an object';
  const v = value as Record<string, unknown>;
  const kind = v['kind'];
  if (kind === 'panic') return { kind };
  if (kind === 'piece') {
    const step = v['step'];
    return step === 1 || step === -1 ? { kind, step } : 'piece: step must be 1 or -1';
  }
  if (kind === 'set-key') {
    const key = v['key'];
    return typeof key === 'string' && key.length > 0 && key.length <= 40 ? { kind, key } : 'set-key: key must be a short text such as "D minor"';
  }
  if (typeof kind === 'string' && SWITCHES.has(kind)) {
    const on = v['on'];
    if (typeof on !== 'boolean') return `${kind}: on must be true or false`;
    return { kind: kind as 'flip' | 'freeze' | 'compare-12et', on };
  }
  return `unknown control ${JSON.stringify(kind)}`;
}
