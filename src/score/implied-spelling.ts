import { keyOf, keyboardWindow, LETTER_SEMITONES, LETTERS_BY_FIFTHS, letterOf, alterationOf, onKey, pitchClassOf, spellKey, type Letter, type SpelledPitch } from '../pitch/index.js';
import { mod } from '../util/errors.js';
import type { Score } from './score.js';

/** How far (in onset groups) a written note of the same key may lie and still lend its spelling. */
const NEAR_GROUPS = 3;

/** The alteration each letter carries under a key signature (fifths > 0: F C G … sharp; < 0: B E A … flat). */
function signatureAlteration(letter: Letter, keyFifths: number): number {
  const position = LETTERS_BY_FIFTHS.indexOf(letter); // F = 0 … B = 6
  if (keyFifths > 0) return Math.max(0, Math.floor((keyFifths - 1 - position) / 7) + 1);
  if (keyFifths < 0) return -Math.max(0, Math.floor((-keyFifths - 1 - (6 - position)) / 7) + 1);
  return 0;
}

/**
 * The spelling a note the score does not have (an ornament, an extra or a wrong note) takes from
 * its neighbours in the score at onset group `group`: the marked upper or lower note of a written
 * ornament there, the written spelling of the same key (or
 * the same key class) within a few groups; else the letter whose alteration is in force there
 * (the measure's key signature, changed by the accidentals written earlier in the measure, as
 * common practice reads them, no source); else the window of the key signature's major key.
 */
export function impliedSpelling(score: Score, group: number, key: number): SpelledPitch {
  const groups = score.groups;
  const at = Math.max(0, Math.min(groups.length - 1, group));
  // a written ornament's marked auxiliary: on the note just played, on the next (a trill begun from
  // above comes before its note), or on one a little before
  for (const g of [at, at + 1, at - 1, at - 2, at - 3]) {
    for (const n of groups[g]?.notes ?? []) for (const a of n.auxiliaries) if (keyOf(a) === key) return a;
  }
  let sameClass: SpelledPitch | undefined;
  for (let d = 0; d <= NEAR_GROUPS; d++) {
    for (const g of d === 0 ? [at] : [at - d, at + d]) {
      const notes = groups[g]?.notes;
      if (!notes) continue;
      for (const n of notes) {
        if (n.key === key) return n.pitch;
        if (sameClass === undefined && mod(n.key - key, 12) === 0) sameClass = onKey(n.pitch, key);
      }
    }
  }
  if (sameClass) return sameClass;
  const here = groups[at];
  const keyFifths = here?.keyFifths ?? 0;
  const inForce = new Map<Letter, number>();
  const measure = here ? score.measures[here.measure] : undefined;
  if (measure) {
    for (let g = measure.firstGroup; g <= at; g++) for (const n of groups[g]!.notes) inForce.set(letterOf(n.pitch), alterationOf(n.pitch));
  }
  let best: SpelledPitch | undefined;
  for (const letter of LETTERS_BY_FIFTHS) {
    let alteration = mod(key - LETTER_SEMITONES[letter], 12);
    if (alteration > 6) alteration -= 12;
    if (Math.abs(alteration) > 2) continue;
    const force = inForce.get(letter) ?? signatureAlteration(letter, keyFifths);
    if (force !== alteration) continue;
    if (best === undefined || Math.abs(alteration) < Math.abs(alterationOf(best))) best = onKey(pitchClassOf(letter, alteration), key);
  }
  return best ?? spellKey(keyboardWindow(keyFifths - 3), key);
}
