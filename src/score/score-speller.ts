import type { KeyboardWindow, PitchClass, SpelledPitch } from '../pitch/index.js';
import type { DeclaredKey } from '../spelling/keys.js';
import { noteIdOf, type NoteContext, type Speller } from '../spelling/speller.js';
import { DEFAULT_FOLLOWER, ScoreFollower, type FollowerParameters, type MatchKind } from './follower.js';
import type { Score } from './score.js';

/** What the score made of one played note, for reports and the stage display. */
export interface NoteMatch {
  readonly key: number;
  readonly channel: number;
  readonly source: number;
  readonly time: number;
  /** The measure's number as written in the score, or null when the follower is lost. */
  readonly bar: string | null;
  readonly match: MatchKind;
  readonly pitch: SpelledPitch;
}

export type MatchCounts = Record<MatchKind, number>;


/**
 * Spells from the score: each note takes the spelling of the written note the follower matches
 * it to, or the spelling its neighbours in the score imply (an ornament, an extra or a wrong
 * note); while the follower is lost the fallback strategy spells. The fallback hears every note,
 * so its context is warm when it is needed. Window, tonic, key and freezing are the fallback's.
 */
export class ScoreSpeller implements Speller {
  readonly follower: ScoreFollower;
  readonly counts: MatchCounts = { score: 0, ornament: 0, fallback: 0 };
  private last: NoteMatch[] = [];
  private readonly held = new Map<number, SpelledPitch>();

  constructor(
    readonly score: Score,
    readonly fallback: Speller,
    parameters: Partial<FollowerParameters> = {},
    /** Told of every note's match as it is decided (a display, a log, a report). */
    private readonly onMatch?: (match: NoteMatch) => void,
  ) {
    this.follower = new ScoreFollower(score, { ...DEFAULT_FOLLOWER, ...parameters });
  }

  spell(notes: readonly NoteContext[]): SpelledPitch[] {
    const guesses = this.fallback.spell(notes);
    this.last = [];
    return notes.map((note, i) => {
      const result = this.follower.hear(note.key, note.time);
      const pitch = result.pitch ?? guesses[i]!;
      const measure = result.measure >= 0 ? this.score.measures[result.measure] : undefined;
      const record: NoteMatch = { key: note.key, channel: note.channel, source: note.source, time: note.time, bar: measure ? measure.number : null, match: result.kind, pitch };
      this.counts[result.kind]++;
      this.last.push(record);
      this.held.set(noteIdOf(note), pitch);
      this.onMatch?.(record);
      return pitch;
    });
  }

  /** The matches of the notes of the last `spell` call, in the same order. */
  lastMatches(): readonly NoteMatch[] {
    return this.last;
  }

  peek(note: NoteContext): SpelledPitch {
    return this.held.get(noteIdOf(note)) ?? this.follower.implied(note.key) ?? this.fallback.peek(note);
  }

  noteOff(note: NoteContext): void {
    this.held.delete(noteIdOf(note));
    this.fallback.noteOff(note);
  }

  currentWindow(): KeyboardWindow {
    return this.fallback.currentWindow();
  }

  currentTonic(): PitchClass | undefined {
    return this.fallback.currentTonic();
  }

  currentKey(): DeclaredKey | undefined {
    return this.fallback.currentKey?.();
  }

  declaredTonic(): PitchClass | undefined {
    return this.fallback.declaredTonic?.();
  }

  setKey(key: DeclaredKey): void {
    this.fallback.setKey?.(key);
  }

  setFrozen(frozen: boolean): void {
    this.fallback.setFrozen?.(frozen);
  }

  /** The `score-restart` control: the player starts again from the beginning. */
  restart(): void {
    this.follower.restart();
  }

  restartScore(): void {
    this.restart();
  }

  /** The `score-bar N` control: the player is about to play measure N; false when the score has none. */
  goToBar(number: string | number): boolean {
    return this.follower.goToBar(String(number));
  }

  /** Where the player is, for a display: the measure number, or null when lost or not begun. */
  currentBar(): string | null {
    const m = this.follower.measure;
    return m >= 0 ? (this.score.measures[m]?.number ?? null) : null;
  }
}
