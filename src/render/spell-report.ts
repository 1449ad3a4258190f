import { chromaOf, formatPitchClass, formatSpelledPitch, nearestSpelling, pitchClass, type NameStyle, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import type { RouterEvent } from '../router/router.js';
import { PURE_FIFTH_INTERVAL, PURE_MAJOR_THIRD, pureCents, type WolfLimits } from '../tuning/index.js';
import { mod } from '../util/errors.js';

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
  /** With a score: the measure number (null while lost) and how the note was placed. */
  readonly score?: { readonly bar: string | null; readonly match: string } | undefined;
}

export interface WolfCount {
  readonly kind: 'fifth' | 'third';
  readonly lower: PitchClass;
  readonly upper: PitchClass;
  readonly deviation: number;
  count: number;
}

/** Collects rows and the summary from the router's note events, tracking which notes sound together. */
export class SpellReport {
  readonly rows: SpellRow[] = [];
  private readonly held = new Map<number, SpellRow>();
  private readonly wolves = new Map<string, WolfCount>();

  constructor(private readonly limits: WolfLimits) {}

  note(event: Extract<RouterEvent, { type: 'note' }>, tick: number, score?: SpellRow['score']): void {
    const row: SpellRow = {
      tick,
      time: event.time / 1000,
      key: event.inKey,
      channel: event.inChannel + 1,
      pitch: event.pitch,
      hz: event.hz,
      cents: event.cents,
      score,
    };
    for (const other of this.held.values()) this.checkPair(other, row);
    this.held.set(event.source * 2048 + event.inChannel * 128 + event.inKey, row);
    this.rows.push(row);
  }

  noteOff(source: number, channel: number, key: number): void {
    this.held.delete(source * 2048 + channel * 128 + key);
  }

  /** A fifth (7 keys apart, octaves aside) or major third (4) between two sounding notes, measured from the tuning. */
  private checkPair(a: SpellRow, b: SpellRow): void {
    const [low, high] = a.key <= b.key ? [a, b] : [b, a];
    const distance = mod(high.key - low.key, 12);
    const kind = distance === 7 ? 'fifth' : distance === 4 ? 'third' : undefined;
    if (!kind || high.key === low.key) return;
    const size = mod(1200 * Math.log2(high.hz / low.hz), 1200); // octaves folded away
    const deviation = size - pureCents(kind === 'fifth' ? PURE_FIFTH_INTERVAL : PURE_MAJOR_THIRD);
    if (Math.abs(deviation) <= (kind === 'fifth' ? this.limits.fifth : this.limits.third)) return;
    const id = `${kind} ${low.pitch.fifths} ${high.pitch.fifths}`;
    const entry = this.wolves.get(id) ?? { kind, lower: pitchClass(low.pitch.fifths), upper: pitchClass(high.pitch.fifths), deviation, count: 0 };
    entry.count++;
    this.wolves.set(id, entry);
  }

  /** For each black key, how many notes took each spelling (C♯ 120, D♭ 3 …). */
  blackKeys(): Array<{ chroma: number; spellings: Array<{ pitch: PitchClass; count: number }> }> {
    return [1, 3, 6, 8, 10].map((chroma) => {
      const counts = new Map<number, number>();
      for (const r of this.rows) if (chromaOf(r.pitch) === chroma) counts.set(r.pitch.fifths, (counts.get(r.pitch.fifths) ?? 0) + 1);
      const spellings = [...counts.entries()].map(([fifths, count]) => ({ pitch: pitchClass(fifths), count })).sort((x, y) => y.count - x.count);
      return { chroma, spellings };
    });
  }

  wolfList(): WolfCount[] {
    return [...this.wolves.values()].sort((a, b) => b.count - a.count);
  }

  /** The rows as JSON Lines (the documented fields). */
  jsonLines(): string {
    return this.rows
      .map((r) => JSON.stringify({ tick: r.tick, time: r.time, key: r.key, channel: r.channel, spelling: formatSpelledPitch(r.pitch), hz: r.hz, cents: r.cents, ...(r.score && { bar: r.score.bar !== null && /^\d+$/u.test(r.score.bar) ? Number(r.score.bar) : r.score.bar, match: r.score.match }) }))
      .join('\n') + (this.rows.length ? '\n' : '');
  }

  summaryText(style: NameStyle): string {
    const name = (pc: PitchClass): string => formatPitchClass(pc, style);
    const lines = ['black keys:'];
    for (const b of this.blackKeys()) {
      const label = `${name(nearestSpelling(b.chroma, 6))}/${name(nearestSpelling(b.chroma, -6))}`;
      lines.push(`  ${label.padEnd(7)} ${b.spellings.map((s) => `${s.count} ${name(s.pitch)}`).join(', ') || 'none'}`);
    }
    const wolves = this.wolfList();
    lines.push(wolves.length === 0 ? 'wolves: none sounded' : 'wolves sounded:');
    for (const w of wolves.slice(0, 12)) {
      const pair = `${name(w.lower)}${style.accidentals === 'ascii' ? '-' : '–'}${name(w.upper)}`;
      lines.push(`  ${w.kind.padEnd(6)}${pair.padEnd(8)} ${w.deviation >= 0 ? '+' : ''}${w.deviation.toFixed(1)} cents from pure, ${w.count}×`);
    }
    return lines.join('\n') + '\n';
  }
}
