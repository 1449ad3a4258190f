import type { Speller } from '../spelling/speller.js';
import { ScoreSpeller, type MatchCounts, type NoteMatch } from './score-speller.js';

/** The score speller inside a speller (directly, or as the base of the player's controls), if any. */
export function scoreSpellerOf(speller: Speller): ScoreSpeller | undefined {
  if (speller instanceof ScoreSpeller) return speller;
  const base = (speller as { base?: unknown }).base;
  return base instanceof ScoreSpeller ? base : undefined;
}

/** One status line for a screen: the bar the player is in, or that the follower is lost. */
export function scoreStatus(speller: Speller): string | undefined {
  const score = scoreSpellerOf(speller);
  if (!score) return undefined;
  const bar = score.currentBar();
  if (!score.follower.following) return 'score  LOST: the spelling strategy spells until the follower finds its place';
  return `score  following${bar === null ? ', waiting for the first note' : `, bar ${bar}`}`;
}

/** How many notes each way of spelling took, for a summary. */
export function matchSummary(counts: MatchCounts): string {
  const total = counts.score + counts.ornament + counts.fallback;
  return `${counts.score} matched to the score, ${counts.ornament} spelled from it (ornaments, extra or wrong notes), ${counts.fallback} by the fallback strategy while lost (of ${total})`;
}

/**
 * A warning when most notes were spelled without the score: the performance and the score do not
 * seem to be the same piece (or the same parts).
 */
export function mismatchWarning(counts: MatchCounts): string | undefined {
  const total = counts.score + counts.ornament + counts.fallback;
  if (total < 20 || counts.fallback <= total / 2) return undefined;
  return `warning: ${Math.round((100 * counts.fallback) / total)}% of the notes could not be followed in the score: is it the score of this piece, with only the parts played?`;
}

/** The match of a note just spelled (by input source, channel and key), when a score is in use. */
export function matchOf(speller: Speller, source: number, channel: number, key: number): NoteMatch | undefined {
  return scoreSpellerOf(speller)?.lastMatches().find((m) => m.key === key && m.channel === channel && m.source === source);
}
