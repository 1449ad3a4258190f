import { chromaOf, formatPitchClass, formatSpelledPitch, nearestSpelling, pitchClass, type NameStyle, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import type { NoteEvent } from '../router/events.js';
import { channelOf, keyOfNote, type NoteId } from '../midi/note-id.js';
import { PURE_FIFTH_INTERVAL, PURE_MAJOR_THIRD, pureCents, type PureInterval, type WolfLimits } from '../tuning/index.js';
import { signed } from '../text/table.js';
import { mod } from '../util/errors.js';
import { outputNumber } from '../text/output-numbers.js';
import { formatKey, type DeclaredKey } from '../spelling/keys.js';

/** One spelled note-on of a file, as `diesis spell` reports it. */
export interface SpellRow {
  readonly tick: number;
  /** Seconds from the start. */
  readonly time: number;
  readonly key: number;
  /** Input channel 1…16. */
  readonly channel: number;
  readonly pitch: SpelledPitch;
  readonly hz: number;
  /** Cents from the 12-ET pitch of the same key at the same reference. */
  readonly cents: number;
  /** Adaptive tunings: cents from the same spelling in the fixed table. */
  readonly fromTable: number | undefined;
  /** With a score: the measure number (null while lost) and how the note was placed. */
  readonly score?: { readonly bar: string | null; readonly match: string } | undefined;
}

/**
 * The intervals the wolf list watches, by keys apart (octaves folded), with their pure ratios
 * (common practice, no source); octaves are watched as the fifths are, and only between two
 * spellings of one key class (G♭3 against F♯4), the one way an octave can be out of tune.
 */
const WATCHED: ReadonlyMap<number, { readonly kind: WolfKind; readonly pure: PureInterval; readonly limit: keyof WolfLimits }> = new Map([
  [0, { kind: 'octave', pure: { p: 2, q: 1, name: 'octave' }, limit: 'fifth' }],
  [7, { kind: 'fifth', pure: PURE_FIFTH_INTERVAL, limit: 'fifth' }],
  [4, { kind: 'major third', pure: PURE_MAJOR_THIRD, limit: 'third' }],
  [3, { kind: 'minor third', pure: { p: 6, q: 5, name: 'minor third' }, limit: 'third' }],
  [8, { kind: 'minor sixth', pure: { p: 8, q: 5, name: 'minor sixth' }, limit: 'third' }],
  [9, { kind: 'major sixth', pure: { p: 5, q: 3, name: 'major sixth' }, limit: 'third' }],
] as const);

/** Names of spelled intervals by their span on the line of fifths (upper − lower), for the ones the wolf list meets. */
const SPELLED: ReadonlyMap<number, string> = new Map([
  [1, 'fifth'],
  [-11, 'diminished sixth'],
  [4, 'major third'],
  [-8, 'diminished fourth'],
  [-3, 'minor third'],
  [9, 'augmented second'],
  [-4, 'minor sixth'],
  [8, 'augmented fifth'],
  [3, 'major sixth'],
  [-9, 'diminished seventh'],
  [12, 'augmented seventh'],
  [-12, 'diminished ninth'],
]);

export type WolfKind = 'octave' | 'fifth' | 'major third' | 'minor third' | 'minor sixth' | 'major sixth';

export interface WolfCount {
  readonly kind: WolfKind;
  readonly lower: PitchClass;
  readonly upper: PitchClass;
  readonly deviation: number;
  count: number;
}

/** Collects rows and the summary from the router's note events, tracking which notes sound together. */
export class SpellReport {
  readonly rows: SpellRow[] = [];
  private readonly held = new Map<NoteId, SpellRow>();
  private readonly wolves = new Map<string, WolfCount>();
  /** Notes heard in each key the speller followed, by key name (ASCII), with the key. */
  private readonly keys = new Map<string, { key: DeclaredKey; notes: number }>();

  constructor(private readonly limits: WolfLimits) {}

  note(event: NoteEvent, tick: number, score?: SpellRow['score']): void {
    const row: SpellRow = {
      tick,
      time: event.time / 1000,
      key: keyOfNote(event.id),
      channel: channelOf(event.id) + 1,
      pitch: event.pitch,
      hz: event.hz,
      cents: event.cents,
      fromTable: event.adaptive?.fromTable,
      score,
    };
    for (const other of this.held.values()) this.checkPair(other, row);
    this.held.set(event.id, row);
    this.rows.push(row);
  }

  /** Counts one note for the key the speller was following when it was spelled. */
  countKey(key: DeclaredKey): void {
    const name = formatKey(key);
    const entry = this.keys.get(name) ?? { key, notes: 0 };
    entry.notes++;
    this.keys.set(name, entry);
  }

  /** The keys followed, most notes first, with each one's share of the notes counted. */
  keysFollowed(): Array<{ key: DeclaredKey; share: number }> {
    const total = [...this.keys.values()].reduce((n, k) => n + k.notes, 0);
    return [...this.keys.values()].sort((a, b) => b.notes - a.notes).map((k) => ({ key: k.key, share: k.notes / total }));
  }

  noteOff(id: NoteId): void {
    this.held.delete(id);
  }

  /** A fifth, third or sixth (by keys apart, octaves aside) between two sounding notes, measured from the tuning. */
  private checkPair(a: SpellRow, b: SpellRow): void {
    const [low, high] = a.key <= b.key ? [a, b] : [b, a];
    const watched = WATCHED.get(mod(high.key - low.key, 12));
    if (!watched || high.key === low.key) return;
    const { kind } = watched;
    if (kind === 'octave' && high.pitch.fifths === low.pitch.fifths) return;
    const size = mod(1200 * Math.log2(high.hz / low.hz), 1200); // octaves folded away
    const deviation = kind === 'octave' ? (size > 600 ? size - 1200 : size) : size - pureCents(watched.pure);
    if (Math.abs(deviation) <= this.limits[watched.limit]) return;
    const id = `${kind} ${low.pitch.fifths} ${high.pitch.fifths}`;
    const entry = this.wolves.get(id) ?? { kind, lower: pitchClass(low.pitch.fifths), upper: pitchClass(high.pitch.fifths), deviation, count: 0 };
    entry.count++;
    this.wolves.set(id, entry);
  }

  /** For each black key, how many notes took each spelling (C♯ 120, D♭ 3 …). */
  blackKeys(): Array<{ chroma: number; spellings: Array<{ pitch: PitchClass; count: number }> }> {
    return [1, 3, 6, 8, 10].map((chroma) => ({ chroma, spellings: this.spellingsOf(chroma, () => true) }));
  }

  /** The spellings the notes of one key class took (those `counted`), most notes first. */
  private spellingsOf(chroma: number, counted: (fifths: number) => boolean): Array<{ pitch: PitchClass; count: number }> {
    const counts = new Map<number, number>();
    for (const r of this.rows) if (chromaOf(r.pitch) === chroma && counted(r.pitch.fifths)) counts.set(r.pitch.fifths, (counts.get(r.pitch.fifths) ?? 0) + 1);
    return [...counts.entries()].map(([fifths, count]) => ({ pitch: pitchClass(fifths), count })).sort((x, y) => y.count - x.count);
  }

  /** For each white key, how many notes took a spelling other than its own letter (E♯ 8, F♭ 2 …); keys spelled only as themselves are left out. */
  otherWhiteKeys(): Array<{ chroma: number; spellings: Array<{ pitch: PitchClass; count: number }> }> {
    // The naturals lie at F…B, −1…5 on the line of fifths.
    return [0, 2, 4, 5, 7, 9, 11].map((chroma) => ({ chroma, spellings: this.spellingsOf(chroma, (fifths) => Math.abs(fifths - 2) > 3) })).filter((w) => w.spellings.length > 0);
  }

  wolfList(): WolfCount[] {
    return [...this.wolves.values()].sort((a, b) => b.count - a.count);
  }

  /** The rows as JSON Lines (the documented fields), figures rounded by `outputNumber`. */
  jsonLines(): string {
    return this.rows
      .map((r) =>
        JSON.stringify({
          tick: r.tick,
          time: outputNumber(r.time, 'seconds'),
          key: r.key,
          channel: r.channel,
          spelling: formatSpelledPitch(r.pitch),
          hz: outputNumber(r.hz, 'hz'),
          cents: outputNumber(r.cents, 'cents'),
          ...(r.fromTable === undefined ? {} : { fromTable: outputNumber(r.fromTable, 'cents') }),
          ...(r.score && { bar: r.score.bar !== null && /^\d+$/u.test(r.score.bar) ? Number(r.score.bar) : r.score.bar, match: r.score.match }),
        }),
      )
      .join('\n') + (this.rows.length ? '\n' : '');
  }

  summaryText(style: NameStyle): string {
    const name = (pc: PitchClass): string => formatPitchClass(pc, style);
    const lines = ['black keys:'];
    for (const b of this.blackKeys()) {
      const label = `${name(nearestSpelling(b.chroma, 6))}/${name(nearestSpelling(b.chroma, -6))}`;
      lines.push(`  ${label.padEnd(7)} ${b.spellings.map((s) => `${s.count} ${name(s.pitch)}`).join(', ') || 'none'}`);
    }
    const others = this.otherWhiteKeys();
    if (others.length > 0) lines.push('white keys spelled otherwise:');
    for (const w of others) lines.push(`  ${name(nearestSpelling(w.chroma, 2)).padEnd(7)} ${w.spellings.map((s) => `${s.count} ${name(s.pitch)}`).join(', ')}`);
    const followed = this.keysFollowed().filter((k) => k.share >= 0.02);
    if (followed.length > 0) lines.push(`keys followed: ${followed.slice(0, 6).map((k) => `${name(k.key.tonic)} ${k.key.mode} ${Math.round(100 * k.share)} %`).join(', ')}`);
    const wolves = this.wolfList();
    lines.push(wolves.length === 0 ? 'wolves: none sounded' : 'wolves sounded:');
    for (const w of wolves.slice(0, 12)) {
      const pair = `${name(w.lower)}${style.accidentals === 'ascii' ? '-' : '–'}${name(w.upper)}`;
      const spelled = SPELLED.get(w.upper.fifths - w.lower.fifths);
      const as = spelled && spelled !== w.kind ? ` (spelled as ${/^[aeiou]/u.test(spelled) ? 'an' : 'a'} ${spelled})` : '';
      lines.push(`  ${w.kind.padEnd(12)}${pair.padEnd(8)} ${signed(w.deviation, 1, style.accidentals === 'ascii')} cents from pure, ${w.count}${style.accidentals === 'ascii' ? 'x' : '×'}${as}`);
    }
    return lines.join('\n') + '\n';
  }
}
