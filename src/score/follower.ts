import type { SpelledPitch } from '../pitch/index.js';
import { impliedSpelling } from './implied-spelling.js';
import type { Score } from './score.js';

/** How a played note was placed: a written note, a note the score implies (ornament, extra, wrong note), or not at all (lost). */
export type MatchKind = 'score' | 'ornament' | 'fallback';

export interface FollowResult {
  readonly kind: MatchKind;
  /** The onset group the note was matched to or heard beside; −1 when lost. */
  readonly group: number;
  /** Index into `score.measures`; −1 when lost. */
  readonly measure: number;
  /** The spelling from the score; undefined when lost (the fallback strategy spells). */
  readonly pitch: SpelledPitch | undefined;
}

export interface FollowerParameters {
  /** Reward for a played note matched to a written one. */
  readonly match: number;
  /** Cost of a played note the score does not have here. */
  readonly extra: number;
  /** Cost of each written note passed over unplayed (grace and hidden notes cost `optionalMiss`). */
  readonly miss: number;
  readonly optionalMiss: number;
  /** How many onset groups ahead (along the written order and the jumps) one note may move. */
  readonly reach: number;
  /** A note this soon (ms) after its chord began may still belong to it (a spread chord). */
  readonly chordMs: number;
  /** Cost per unit of log-ratio by which an advance comes too early for the tempo heard so far. */
  readonly tempoWeight: number;
  /** How much earlier than the tempo expects an advance may come before it costs anything. */
  readonly tempoSlack: number;
  /** States kept (the best few, within `margin` of the best). */
  readonly beam: number;
  readonly margin: number;
  /** Played notes compared when searching the whole score for where the player is. */
  readonly window: number;
  /** An advance that gains less than this (a match after skipping written notes, or too early) counts as a poor fit. */
  readonly goodGain: number;
  /** How many of the newest notes must be a tight run of written notes elsewhere to move there (more while lost). */
  readonly relocateMin: number;
  readonly relocateMinLost: number;
  /** How many equally good places a relocation keeps as hypotheses. */
  readonly relocateKeep: number;
  /** Lost: this many of the last 8 notes fit poorly and lie far from the written notes (or none of the 8 fits well). */
  readonly lostAfter: number;
}

export const DEFAULT_FOLLOWER: FollowerParameters = {
  match: 1,
  extra: 0.6,
  miss: 0.5,
  optionalMiss: 0.1,
  reach: 6,
  chordMs: 80,
  tempoWeight: 3,
  tempoSlack: Math.log(2.5),
  beam: 12,
  margin: 4,
  window: 10,
  goodGain: 0.45,
  relocateMin: 4,
  relocateMinLost: 5,
  relocateKeep: 4,
  lostAfter: 5,
};

/** One hypothesis of where the player is: a group, the notes of it heard so far, and its recent history. */
interface State {
  readonly group: number;
  readonly mask: number;
  readonly value: number;
  /** When the path entered `group` (ms), the group it came from and what of that group was heard. */
  readonly enteredAt: number;
  readonly previous: number;
  readonly previousMask: number;
  /** One bit per recent note, newest lowest: 1 = the note fitted poorly on this path (an extra, or a match after a skip). */
  readonly history: number;
  /** The same for notes that fit poorly and lie far from the written notes here (not an ornament or a slip). */
  readonly stray: number;
  /** Where the newest note went on this path: a group, or −1 for an extra. */
  readonly matched: number;
}

interface Reach {
  readonly targets: Int32Array;
  /** Written notes passed over between the group and the target (weighted), and score time to it (quarters). */
  readonly cost: Float64Array;
  readonly span: Float64Array;
}

function popcount(n: number): number {
  let c = 0;
  for (let x = n; x !== 0; x &= x - 1) c++;
  return c;
}

/**
 * An online, causal score follower: each note is placed when it arrives, from what was heard
 * before it only.
 *
 * The local tracker is the dynamic-programming matcher of R. B. Dannenberg, "An On-Line
 * Algorithm for Real-Time Accompaniment" (ICMC 1984): every played note either matches a written
 * note ahead (rewarded) or is an extra (penalised), and written notes passed over are penalised,
 * keeping the best-scoring alignments in a window around the current place. Here the score is a
 * sequence of onset groups (chords, matched in any order, as in Dannenberg and Bloch's 1985
 * extension to polyphony), the window follows the repeat and da capo jumps as well as the written
 * order, a note that comes just after its chord began may still join it (a spread chord), and an
 * advance that comes far sooner than the tempo heard so far allows is penalised (so a trill or an
 * arpeggio does not run ahead through the score).
 *
 * When the recent notes fit the place poorly the whole score is searched for places where the
 * newest notes are a tight run of written notes (a restart at another bar); when eight notes in a
 * row fit nowhere near, the follower declares itself lost and searches on with every note until it
 * finds its place again.
 */
export class ScoreFollower {
  private states: State[] = [];
  private readonly reaches: Array<Reach | undefined> = [];
  private readonly jumpTargets = new Map<number, number[]>();
  private readonly keyGroups = new Map<number, number[]>();
  private readonly recentKeys: number[] = [];
  /** Per group, the keys of it and the two groups before it, as a 128-bit set (a quick filter for relocation). */
  private readonly nearKeys: Uint32Array;
  private lost = false;
  private tempo = 0; // ms per quarter note, 0 until heard
  private tempoSamples = 0;
  private lastAdvance = { group: -1, time: 0 };
  private lastGroup = -1;
  /** Where a control put the player, shown until the next note (−1: the start, nothing shown). */
  private cue = -1;

  constructor(
    readonly score: Score,
    private readonly p: FollowerParameters = DEFAULT_FOLLOWER,
  ) {
    for (const j of score.jumps) this.jumpTargets.set(j.from, [...(this.jumpTargets.get(j.from) ?? []), j.to]);
    score.groups.forEach((g) => {
      for (const k of g.keys) this.keyGroups.set(k, [...(this.keyGroups.get(k) ?? []), g.index]);
    });
    for (let g = -1; g < score.groups.length; g++) this.reachOf(g); // nothing to compute on the live path
    this.nearKeys = new Uint32Array(4 * score.groups.length);
    score.groups.forEach((g) => {
      for (let q = g.index; q >= 0 && q >= g.index - 2; q--) for (const k of score.groups[q]!.keys) this.nearKeys[4 * g.index + (k >> 5)]! |= 1 << (k & 31);
    });
    this.restart();
  }

  /** Start again from the beginning (the `score-restart` control). */
  restart(): void {
    this.placeBefore(0);
  }

  /**
   * Go to the measure numbered `number` (the `score-bar N` control): the first one ahead of the
   * current place when a score repeats a number (pick-ups are often all "0"), else the first;
   * false when there is none.
   */
  goToBar(number: string): boolean {
    const named = this.score.measures.filter((m) => m.number === number && m.endGroup > m.firstGroup);
    const measure = named.find((m) => m.firstGroup > this.lastGroup) ?? named[0];
    if (!measure) return false;
    this.placeBefore(measure.firstGroup);
    return true;
  }

  /** True while the follower knows where the player is. */
  get following(): boolean {
    return !this.lost;
  }

  /** The onset group of the best hypothesis (−1 before the first note). */
  get group(): number {
    return this.lastGroup;
  }

  /** The measure the player is in, or −1 when lost or not begun. */
  get measure(): number {
    if (this.lost) return -1;
    const g = this.score.groups[this.lastGroup < 0 ? this.cue : this.lastGroup];
    return g ? g.measure : -1;
  }

  /** The spelling the score implies for a key here and now, without hearing it (undefined when lost). */
  implied(key: number): SpelledPitch | undefined {
    return this.lost ? undefined : impliedSpelling(this.score, Math.max(0, this.lastGroup < 0 ? this.cue : this.lastGroup), key);
  }

  private placeBefore(group: number): void {
    const before = group - 1;
    const full = before >= 0 ? this.fullMask(before) : 0;
    this.states = [{ group: before, mask: full, value: 0, enteredAt: -Infinity, previous: -1, previousMask: 0, history: 0, stray: 0, matched: -1 }];
    this.lost = false;
    this.lastGroup = -1;
    this.cue = group > 0 ? group : -1;
    this.recentKeys.length = 0;
  }

  private fullMask(group: number): number {
    const n = Math.min(31, this.score.groups[group]?.keys.length ?? 0);
    return n >= 31 ? 0x7fffffff : (1 << n) - 1;
  }

  /** Leaving a group with notes unheard: a chord played thinner costs at most one missed note. */
  private missCost(group: number, mask: number): number {
    const g = this.score.groups[group];
    if (!g) return 0;
    const left = g.keys.length - popcount(mask);
    const each = g.optional ? this.p.optionalMiss : this.p.miss;
    return mask === 0 ? left * each : Math.min(left, 1) * each;
  }

  private reachOf(group: number): Reach {
    const cached = this.reaches[group + 1];
    if (cached) return cached;
    const groups = this.score.groups;
    const best = new Map<number, { cost: number; span: number }>();
    const visit = (from: number, depth: number, cost: number, span: number): void => {
      if (depth >= this.p.reach) return;
      const next = [from + 1, ...(this.jumpTargets.get(from) ?? [])];
      for (const t of next) {
        const target = groups[t];
        if (!target) continue;
        const linear = t === from + 1;
        const dt = linear && from >= 0 ? target.time - groups[from]!.time : 0;
        const known = best.get(t);
        if (!known || cost < known.cost) best.set(t, { cost, span: span + dt });
        const passCost = cost + target.keys.length * (target.optional ? this.p.optionalMiss : this.p.miss);
        visit(t, depth + 1, passCost, span + dt);
      }
    };
    visit(group, 0, 0, 0);
    const entries = [...best.entries()];
    const reach: Reach = {
      targets: Int32Array.from(entries.map(([t]) => t)),
      cost: Float64Array.from(entries.map(([, v]) => v.cost)),
      span: Float64Array.from(entries.map(([, v]) => v.span)),
    };
    this.reaches[group + 1] = reach;
    return reach;
  }

  /**
   * Within two keys, or octaves, of a written note of this group, the one before or the next: a
   * neighbour note (trill, mordent, appoggiatura), a wrong key, a doubling, a tremolo's other note.
   */
  private isNear(group: number, key: number): boolean {
    for (let g = Math.max(0, group - 1); g <= group + 1; g++) {
      const keys = this.score.groups[g]?.keys;
      if (keys) for (const k of keys) if ((k - key <= 2 && key - k <= 2) || (k - key) % 12 === 0) return true;
    }
    return false;
  }

  /** The penalty for an advance over `span` quarter notes that took `elapsed` ms. */
  private tempoCost(span: number, elapsed: number): number {
    if (this.tempoSamples < 3 || span <= 0 || !Number.isFinite(elapsed)) return 0;
    const expected = span * this.tempo;
    const early = Math.log((expected + 60) / (Math.max(0, elapsed) + 60)) - this.p.tempoSlack;
    return early > 0 ? early * this.p.tempoWeight : 0;
  }

  /** Hears one played note (key, time in ms) and places it. */
  hear(key: number, time: number): FollowResult {
    if (this.score.groups.length === 0) return { kind: 'fallback', group: -1, measure: -1, pitch: undefined };
    this.recentKeys.unshift(key);
    if (this.recentKeys.length > this.p.window) this.recentKeys.length = this.p.window;
    const next = this.step(key, time);
    const best = next[0]!;
    this.states = next;
    // search elsewhere when the newest note fits poorly and so do recent ones: one of the last four
    // far from the written notes, or three of them at all (ornaments near the place are no reason)
    const recentPoor = popcount(best.history & 0x0f);
    const recentStray = popcount(best.stray & 0x0f);
    if (this.lost || ((best.history & 1) === 1 && (recentStray >= 1 || recentPoor >= 3))) {
      const relocated = this.relocate(key, time, best);
      if (relocated) return this.result(relocated.group, key, 'score');
    }
    if (!this.lost && (popcount(best.stray & 0xff) >= this.p.lostAfter || (best.history & 0xff) === 0xff)) this.lost = true;
    if (this.lost) return { kind: 'fallback', group: -1, measure: -1, pitch: undefined };
    if (best.matched >= 0) {
      this.learnTempo(best, time);
      return this.result(best.matched, key, 'score');
    }
    return this.result(best.group, key, 'ornament');
  }

  private result(group: number, key: number, kind: MatchKind): FollowResult {
    this.lastGroup = group;
    const g = this.score.groups[Math.max(0, group)]!;
    const written = kind === 'score' ? g.notes.find((n) => n.key === key)?.pitch : undefined;
    return { kind, group, measure: g.measure, pitch: written ?? impliedSpelling(this.score, Math.max(0, group), key) };
  }

  /** Learns the player's tempo (ms per quarter note) from advances to the next group. */
  private learnTempo(best: State, time: number): void {
    if (best.matched !== best.group || best.enteredAt !== time) return;
    const from = this.lastAdvance;
    this.lastAdvance = { group: best.group, time };
    if (from.group < 0 || best.group !== from.group + 1) return;
    const span = this.score.groups[best.group]!.time - this.score.groups[from.group]!.time;
    const elapsed = time - from.time;
    if (span <= 0 || elapsed <= 20) return;
    const sample = elapsed / span;
    if (this.tempoSamples === 0) this.tempo = sample;
    else {
      const clamped = Math.min(this.tempo * 3, Math.max(this.tempo / 3, sample));
      this.tempo = Math.exp(0.85 * Math.log(this.tempo) + 0.15 * Math.log(clamped));
    }
    this.tempoSamples++;
  }

  /** One step of the dynamic programme: every kept state either takes the note here, moves on to take it, or counts it extra. */
  private step(key: number, time: number): State[] {
    const groups = this.score.groups;
    const { match, extra } = this.p;
    const out: State[] = [];
    // the best state per group only (a Viterbi step); objects are made only for an improvement
    const worse = (group: number, value: number): boolean => {
      for (const o of out) if (o.group === group) return o.value >= value;
      return false;
    };
    const offer = (state: State): void => {
      const at = out.findIndex((o) => o.group === state.group);
      if (at >= 0) out[at] = state;
      else out.push(state);
    };
    for (const s of this.states) {
      const history = (s.history << 1) & 0xffff;
      const stray = (s.stray << 1) & 0xffff;
      const here = groups[s.group];
      const index = here ? here.keys.indexOf(key) : -1;
      const before = groups[s.previous];
      const late = before && time - s.enteredAt <= this.p.chordMs ? before.keys.indexOf(key) : -1;
      if (index >= 0 && index < 31 && (s.mask & (1 << index)) === 0) {
        // a note of this group not yet heard
        if (!worse(s.group, s.value + match)) offer({ ...s, mask: s.mask | (1 << index), value: s.value + match, history, stray, matched: s.group });
      } else if (late >= 0 && late < 31 && (s.previousMask & (1 << late)) === 0) {
        // a late note of the chord just left (a spread chord): it was counted missing, so refund that
        const value = s.value + match + (before!.optional ? this.p.optionalMiss : this.p.miss);
        if (!worse(s.group, value)) offer({ ...s, previousMask: s.previousMask | (1 << late), value, history, stray, matched: s.previous });
      } else if (!worse(s.group, s.value - extra)) {
        // an extra note here; one beside a written note here or next (an ornament, a slip) is no sign of being lost
        offer({ ...s, value: s.value - extra, history: history | 1, stray: stray | (this.isNear(s.group, key) ? 0 : 1), matched: -1 });
      }
      // or move on to a group ahead that has it
      const reach = this.reachOf(s.group);
      const leave = this.missCost(s.group, s.mask);
      const elapsed = time - s.enteredAt;
      for (let i = 0; i < reach.targets.length; i++) {
        const t = reach.targets[i]!;
        const at = groups[t]!.keys.indexOf(key);
        if (at < 0 || at >= 31) continue;
        const gain = match - leave - reach.cost[i]! - this.tempoCost(reach.span[i]!, elapsed);
        if (worse(t, s.value + gain)) continue;
        const fit = gain >= this.p.goodGain ? 0 : 1;
        offer({ group: t, mask: 1 << at, value: s.value + gain, enteredAt: time, previous: s.group, previousMask: s.mask, history: history | fit, stray: stray | fit, matched: t });
      }
    }
    // best first (a match before an extra on equal value); keep the best few near the top
    out.sort((a, b) => b.value - a.value || (a.matched >= 0 ? 0 : 1) - (b.matched >= 0 ? 0 : 1));
    const floor = out[0]!.value - this.p.margin;
    let n = 1;
    while (n < out.length && n < this.p.beam && out[n]!.value >= floor) n++;
    out.length = n;
    return out;
  }

  /**
   * Searches the whole score for a place where the newest notes are a tight run of written notes:
   * aligned backwards from each group that has the newest note, every one of the last
   * `relocateMin` notes (more while lost) must match a note of the same group or of one of the two
   * before it. The places that explain most of the last `window` notes are kept as hypotheses (up
   * to `relocateKeep`, nearest ahead of the current place first: a player more often goes on than
   * far away), and the notes to come decide among them. Random notes rarely make such a run; a
   * restart does within a few notes.
   */
  private relocate(key: number, time: number, current: State): State | undefined {
    const candidates = this.keyGroups.get(key);
    const run = this.lost ? this.p.relocateMinLost : this.p.relocateMin;
    if (!candidates || this.recentKeys.length < run) return undefined;
    const groups = this.score.groups;
    let best: { group: number; mask: number; matched: number; distance: number } | undefined;
    const fits: Array<NonNullable<typeof best>> = [];
    const second = this.recentKeys[1]!;
    const word = second >> 5;
    const bit = 1 << (second & 31);
    for (const c of candidates) {
      if ((this.nearKeys[4 * c + word]! & bit) === 0) continue; // the note before is not here or just before
      let pos = c;
      let mask = 1 << groups[c]!.keys.indexOf(key);
      const firstMask = mask;
      let matched = 1;
      for (let i = 1; i < this.recentKeys.length; i++) {
        if (i >= run && best && matched + (this.recentKeys.length - i) < best.matched) break; // cannot win any more
        const k = this.recentKeys[i]!;
        let found = false;
        for (let q = pos; q >= 0 && q >= pos - 2; q--) {
          const idx = groups[q]!.keys.indexOf(k);
          if (idx < 0 || idx >= 31) continue;
          if (q === pos && (mask & (1 << idx)) !== 0) continue;
          mask = q === pos ? mask | (1 << idx) : 1 << idx;
          pos = q;
          found = true;
          break;
        }
        if (found) matched++;
        else if (i < run) break; // the newest notes must be a run
      }
      if (matched < run) continue;
      const distance = c >= current.group ? c - current.group : groups.length + current.group - c;
      const fit = { group: c, mask: firstMask, matched, distance };
      if (!best || matched > best.matched || (matched === best.matched && distance < best.distance)) best = fit;
      fits.push(fit);
    }
    if (!best || best.group === current.group) return undefined;
    // the places that fit as well as the best, nearest first, all kept: the notes to come decide among them
    const top = best.matched;
    const equal = fits.filter((f) => f.matched === top).sort((a, b) => a.distance - b.distance).slice(0, this.p.relocateKeep);
    this.states = equal.map((f, i) => ({ group: f.group, mask: f.mask, value: -0.01 * i, enteredAt: time, previous: -1, previousMask: 0, history: 0, stray: 0, matched: f.group }));
    this.lost = false;
    this.lastAdvance = { group: -1, time };
    return this.states[0];
  }
}
