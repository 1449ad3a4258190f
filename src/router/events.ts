import type { SpelledPitch } from '../pitch/index.js';
import type { Reference, Tuning } from '../tuning/index.js';
import type { NoteId } from '../midi/note-id.js';
import type { Placement } from './output.js';
import type { EndCause } from './voice-book.js';

/**
 * What the engine decided, as it happened. Never needed for the output itself: displays, logs,
 * reports and counters are folds over these events and never reach into the engine.
 */
export type RouterEvent =
  | {
      readonly type: 'note';
      readonly time: number;
      readonly id: NoteId;
      readonly velocity: number;
      /** The spelling that sounds. */
      readonly pitch: SpelledPitch;
      /** The spelling decided, when the output could not sound it and `pitch` stands in for it. */
      readonly wanted: SpelledPitch | undefined;
      readonly hz: number;
      /** From 12-ET at the reference. */
      readonly cents: number;
      readonly placement: Placement;
      /** Adaptive tunings: cents from the same spelling in the fixed table, and whether it is a compromise. */
      readonly adaptive?: { readonly fromTable: number; readonly compromise: boolean } | undefined;
    }
  | { readonly type: 'key-up'; readonly time: number; readonly id: NoteId }
  | { readonly type: 'voice-ended'; readonly time: number; readonly id: NoteId; readonly placement: Placement; readonly cause: EndCause }
  | { readonly type: 'note-dropped'; readonly time: number; readonly id: NoteId; readonly pitch: SpelledPitch; readonly reason: string }
  | { readonly type: 'out-of-range'; readonly time: number; readonly pitch: SpelledPitch; readonly neededCents: number }
  | { readonly type: 'steal'; readonly time: number; readonly ids: readonly NoteId[] }
  | { readonly type: 'retune'; readonly time: number }
  | { readonly type: 'pedal'; readonly time: number; readonly pedal: 'sustain' | 'sostenuto'; readonly down: boolean }
  | { readonly type: 'pass'; readonly time: number; readonly on: boolean }
  | { readonly type: 'malformed'; readonly time: number; readonly source: number; readonly bytes: number }
  | { readonly type: 'panic'; readonly time: number; readonly reason: string }
  /** New notes take this tuning and reference from now on (notes sounding keep theirs). */
  | { readonly type: 'tuning'; readonly time: number; readonly tuningId: string; readonly name: string; readonly tuning: Tuning; readonly reference: Reference }
  /** A piece's output settings: `waiting` while notes still sound, then taken over (`waited`: after those notes ended). */
  | { readonly type: 'output'; readonly time: number; readonly waiting: boolean; readonly waited?: boolean | undefined }
  /** A concert programme moved to a piece (0-based `index` of `count`). */
  | { readonly type: 'piece'; readonly time: number; readonly index: number; readonly count: number; readonly title: string; readonly strategy: string };

export type RouterEventType = RouterEvent['type'];
export type NoteEvent = Extract<RouterEvent, { type: 'note' }>;
