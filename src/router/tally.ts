import type { RouterEvent } from './events.js';

/** The engine's counts, folded from its events (for summaries, the live screen and tests). */
export class Tally {
  notesIn = 0;
  notesOut = 0;
  notesDropped = 0;
  /** Notes sounded as another spelling than the one decided (a sample set lacking it). */
  substitutions = 0;
  outOfRange = 0;
  malformedBytes = 0;
  retunes = 0;
  steals = 0;
  /** Voices ended by steals. */
  stolenVoices = 0;
  panics = 0;
  /** Adaptive tunings: notes placed at a compromise pitch. */
  compromises = 0;
  private readonly channels = new Set<number>();
  /** Why notes were dropped, and how often each reason. */
  readonly dropReasons = new Map<string, number>();

  /** Takes one event; pass it as (or inside) the engine's observer. */
  readonly observe = (e: RouterEvent): void => {
    switch (e.type) {
      case 'note':
        this.notesIn++;
        this.notesOut++;
        this.channels.add(e.placement.channel);
        if (e.wanted) this.substitutions++;
        if (e.adaptive?.compromise) this.compromises++;
        return;
      case 'note-dropped':
        this.notesIn++;
        this.notesDropped++;
        this.dropReasons.set(e.reason, (this.dropReasons.get(e.reason) ?? 0) + 1);
        return;
      case 'out-of-range':
        this.outOfRange++;
        return;
      case 'malformed':
        this.malformedBytes += e.bytes;
        return;
      case 'retune':
        this.retunes++;
        return;
      case 'steal':
        this.steals++;
        this.stolenVoices += e.ids.length;
        return;
      case 'panic':
        this.panics++;
        return;
      default:
        return;
    }
  };

  /** The reasons notes were dropped, in words, commonest first. */
  dropSummary(): string {
    return [...this.dropReasons].sort((a, b) => b[1] - a[1]).map(([reason, n]) => `${n}: ${reason}`).join('; ');
  }

  /** Output channels that have carried notes, 0…15, ascending. */
  channelsUsed(): number[] {
    return [...this.channels].sort((a, b) => a - b);
  }
}
