import type { NoteId } from '../midi/note-id.js';

/**
 * How note-ons are gathered into chords before spelling: a number of milliseconds to wait for the
 * rest of a chord (0: each note at once), or `'same-time'` for files, where a chord's notes share
 * one timestamp.
 */
export type GatherSetting = number | 'same-time';

/**
 * The gathering of a file: its equal onsets are always a chord, so no setting (or 0, the live
 * default) means `'same-time'`; a window of `ms` > 0 also gathers notes up to that far apart, as
 * live, and a chord then sounds when its window is up.
 */
export function fileGather(ms: GatherSetting | undefined): GatherSetting {
  return ms === undefined || ms === 0 ? 'same-time' : ms;
}

export interface PendingNote {
  readonly id: NoteId;
  readonly velocity: number;
}

/** Collects the note-ons of one chord: the first note opens it; it closes when its time is up. */
export class ChordGatherer {
  private pending: PendingNote[] = [];
  private since = 0;

  constructor(private readonly setting: GatherSetting) {}

  get empty(): boolean {
    return this.pending.length === 0;
  }

  /** When the open chord must be sounded at the latest (live), or undefined. */
  dueAt(): number | undefined {
    return this.pending.length === 0 || this.setting === 'same-time' ? undefined : this.since + this.setting;
  }

  /** True when a note-on at `now` belongs to a new chord, so the open one must be sounded first. */
  closesAt(now: number): boolean {
    if (this.pending.length === 0) return false;
    return this.setting === 'same-time' ? now !== this.since : now - this.since > this.setting;
  }

  /** Adds a note-on; returns true when the chord is complete at once (no gathering). */
  add(now: number, note: PendingNote): boolean {
    if (this.pending.length === 0) this.since = now;
    this.pending.push(note);
    return this.setting === 0;
  }

  /** Takes the open chord's notes, leaving it empty. */
  take(): PendingNote[] {
    const notes = this.pending;
    this.pending = [];
    return notes;
  }
}
