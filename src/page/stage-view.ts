import { formatPitchClass, formatRange, formatSpelledPitch, type NameStyle, type SpelledPitch } from '../pitch/index.js';
import type { Router, RouterEvent } from '../router/router.js';
import { keyOfNote, type NoteId } from '../midi/note-id.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import { equalTemperedDeviation, formatReference, type Reference, type Tuning } from '../tuning/index.js';
import type { StageKey, StageNote, StagePiece, StageState, StageWarning } from './stage-state.js';

const UNICODE: NameStyle = { accidentals: 'unicode' };
const BLACK = new Set([1, 3, 6, 8, 10]);
/** How many warnings the page keeps. */
export const STAGE_WARNINGS = 5;

interface Held {
  readonly pitch: SpelledPitch;
  readonly key: number;
  readonly cents: number;
  readonly hz: number;
  pedalHeld: boolean;
}

/**
 * The page's fold over the engine's events: which notes sound (a key released under a pedal stays,
 * marked as held by the pedal, until the pedals are up) and the latest warnings in words.
 */
export class StageTracker {
  private readonly held = new Map<NoteId, Held>();
  private readonly recent: StageWarning[] = [];
  private nextWarning = 1;

  event(e: RouterEvent): void {
    switch (e.type) {
      case 'note':
        this.held.set(e.id, { pitch: e.pitch, key: keyOfNote(e.id), cents: e.cents, hz: e.hz, pedalHeld: false });
        return;
      case 'key-up': {
        const note = this.held.get(e.id);
        if (note) note.pedalHeld = true; // its voice sounds on until it ends
        return;
      }
      case 'voice-ended':
        this.held.delete(e.id);
        return;
      case 'panic':
        this.held.clear();
        this.warn(`PANIC (${e.reason}): every note was stopped`);
        return;
      case 'steal':
        this.warn(`ran out of synth channels: ${e.ids.length} ${e.ids.length === 1 ? 'note was' : 'notes were'} cut short to make room`);
        return;
      case 'out-of-range':
        this.warn(`${formatSpelledPitch(e.pitch, UNICODE)} needs ${e.neededCents.toFixed(1)} cents, more than the synth’s bend range: it sounds out of tune`);
        return;
      case 'note-dropped':
        this.warn(`${formatSpelledPitch(e.pitch, UNICODE)} was not played: ${e.reason}`);
        return;
    }
  }

  /** A warning from outside the engine (a port came or went). */
  warn(text: string): void {
    this.recent.push({ id: this.nextWarning++, text });
    if (this.recent.length > STAGE_WARNINGS) this.recent.shift();
  }

  sounding(): StageNote[] {
    return [...this.held.values()]
      .sort((a, b) => a.hz - b.hz)
      .map((n) => ({ spelling: formatSpelledPitch(n.pitch, UNICODE), key: n.key, cents: n.cents, hz: n.hz, pedalHeld: n.pedalHeld }));
  }

  warnings(): StageWarning[] {
    return [...this.recent];
  }
}

/** Everything the page shows comes from here: the session's engine, speller and setup. */
export interface StageSources {
  readonly router: Router;
  readonly speller: ControlledSpeller;
  readonly tuning: Tuning;
  readonly reference: Reference;
  readonly tuningId: string;
  readonly tuningName: string;
  readonly strategy: string;
  readonly piece: StagePiece;
  /** The tuning picture (SVG), drawn once per tuning. */
  readonly picture?: string | undefined;
  readonly synthConnected: () => boolean;
  /** The bar when following a score. */
  readonly bar?: (() => number | null) | undefined;
}

/** A lone piece: one of one, nowhere to go. */
export function lonePiece(title: string): StagePiece {
  return { title, index: 0, count: 1, canPrevious: false, canNext: false };
}

/** The key `follow` believes it is in (`D minor`); for the other strategies the tonic alone (`tonic D`), or null. */
function keyInForce(speller: ControlledSpeller): string | null {
  const key = speller.currentKey();
  return key ? `${formatPitchClass(key.tonic, UNICODE)} ${key.mode}` : null;
}

/** Cents from 12-ET of a spelling in a tuning, remembered: the exact arithmetic is not redone 30 times a second. */
const centsMemo = new WeakMap<Tuning, WeakMap<Reference, Map<number, number>>>();
function centsFromEt(tuning: Tuning, reference: Reference, pitch: SpelledPitch): number {
  let byReference = centsMemo.get(tuning);
  if (!byReference) centsMemo.set(tuning, (byReference = new WeakMap()));
  let memo = byReference.get(reference);
  if (!memo) byReference.set(reference, (memo = new Map()));
  const id = pitch.fifths * 64 + pitch.octave;
  let cents = memo.get(id);
  if (cents === undefined) memo.set(id, (cents = equalTemperedDeviation(tuning, reference, pitch)));
  return cents;
}

/** The snapshot the page shows now. Reads only; `peek` asks the speller without letting it hear anything. */
export function stageStateOf(sources: StageSources, tracker: StageTracker, time: number): StageState {
  const { router, speller, reference } = sources;
  const tonic = speller.currentTonic();
  const tuning = sources.tuning.kind === 'just' && tonic ? sources.tuning.withTonic(tonic) : sources.tuning;
  const keys: StageKey[] = [];
  for (let chroma = 0; chroma < 12; chroma++) {
    const pitch = speller.peek({ key: 60 + chroma, velocity: 64, time, channel: 0, source: 0 });
    keys.push({
      chroma,
      black: BLACK.has(chroma),
      spelling: formatPitchClass(pitch, UNICODE),
      cents: router.passing ? 0 : centsFromEt(tuning, reference, pitch),
    });
  }
  return {
    piece: sources.piece,
    tuning: { id: sources.tuningId, name: sources.tuningName, picture: sources.picture },
    reference: `${formatReference(reference, UNICODE).replace('=', ' = ')} Hz`,
    strategy: sources.strategy,
    key: keyInForce(speller),
    window: formatRange(speller.currentWindow(), UNICODE),
    keys,
    sounding: tracker.sounding(),
    pedals: { sustain: router.sustainDown, sostenuto: router.sostenutoDown },
    latches: { flip: speller.overrides.flip, freeze: speller.overrides.frozen, force: speller.overrides.force ?? null, shift: speller.overrides.shift },
    bar: sources.bar?.() ?? null,
    warnings: tracker.warnings(),
    passing: router.passing,
    synthConnected: sources.synthConnected(),
  };
}
