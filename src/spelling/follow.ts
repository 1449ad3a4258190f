import { DEFAULT_WINDOW, keyboardWindow, onKey, pitchClass, type KeyboardWindow, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { isMajorLike, type DeclaredKey } from './keys.js';
import { mod } from '../util/errors.js';
import { noteIdOf, type NoteContext, type Speller } from './speller.js';
import { chromaAt, HomeKey, nameKey, windowCentreOf, type Key, type NamingContext } from './key-names.js';

export { signatureOf, windowCentreOf, type Key } from './key-names.js';

/** Parameters of the following speller (all have defaults; the setup file may change them). */
export interface FollowParameters {
  /** Half-life of a note's weight in the key estimate, in milliseconds. */
  readonly halfLifeMs: number;
  /** Extra weight of each note while it is held, relative to a fresh note. */
  readonly heldWeight: number;
  /** How much better a new key must correlate (0…2) before it replaces the current one. */
  readonly hysteresis: number;
  /**
   * The key declared for the start, or undefined to start from a guess of C major (whose name
   * does not bind the first key found: see `namingCentre`); and the weight of the starting key as
   * if that many notes had been heard in it.
   */
  readonly initialKey: Key | undefined;
  readonly initialWeight: number;
  /** The home window: the 12-note window the music is written for (E♭..G♯), the centre of the style prior. */
  readonly homeWindow: KeyboardWindow;
  /**
   * Strength of the pull towards home (0: none; 0.5 or more: everything in the home window): a key
   * whose window centre lies `d` fifths from the home window's must correlate `homeStrength · d`
   * better to be chosen, and notes are spelled around a centre drawn `2 · homeStrength` of the way
   * towards home.
   */
  readonly homeStrength: number;
  /** Half-life of a chroma's weight in the local centre of the notes just spelled, in milliseconds. */
  readonly localHalfLifeMs: number;
  /** Share (0…1) of the local centre in the centre notes are spelled around; the rest is the key's. */
  readonly localShare: number;
  /** Weight of a chord's spread on the line of fifths against each note's distance from the centre. */
  readonly chordCompactness: number;
  /**
   * How sharply the key's window centre follows the best key: the centres of all keys, named from
   * the current one, are weighted by exp(fit / keySoftness), fit being the correlation less the
   * home cost (0: the current key's centre alone). Keys that fit almost as well (a relative major
   * or minor) then move the centre part of the way, before the key itself changes.
   */
  readonly keySoftness: number;
  /** How many fifths beyond the key's window a spelling may lie (the key bounds the local pull). */
  readonly windowReach: number;
  /**
   * Where a key with two names (C♯ or D♭ major) is named when nothing heard before decides it, as
   * a position on the line of fifths: the name whose window centre is nearer wins. 4 gives the names
   * of Baroque keyboard music (C♯ and F♯ major, C♯, D♯ and G♯ minor, but A♭ major and B♭ minor);
   * 0 gives D♭ and G♭ major and E♭ minor. Once a key is known, a new key takes the name nearer it;
   * with no key declared, the piece's home key keeps its name from here (see `HOME_NOTES` in
   * key-names.ts).
   */
  readonly namingCentre: number;
  /**
   * How many fifths sharpward a note's centre moves when the note lies a semitone below the nearest
   * note of the group just before it (a chromatic lower neighbour: E–D♯–E, not E–E♭).
   */
  readonly lowerNeighbourShift: number;
  /** Notes of the group just before count as the approach only within this many milliseconds. */
  readonly approachMs: number;
  /**
   * How many fifths a note's centre moves towards the way its key last moved on by a semitone
   * (sharpward if up, flatward if down), within `resolutionMs` of that move.
   */
  readonly resolutionShift: number;
  readonly resolutionMs: number;
  /**
   * A second, short-memory key estimate (chroma weights halving every `shortHalfLifeMs`) whose soft
   * window centre moves the key's by `shortShare` (0…1): a passing tonicisation (V of vi) moves the
   * spelling before the long estimate changes key. After Chew and Chen's real-time spelling on the
   * spiral array, which combines a cumulative and a sliding window.
   */
  readonly shortHalfLifeMs: number;
  readonly shortShare: number;
}

export const DEFAULT_FOLLOW: FollowParameters = {
  halfLifeMs: 4000,
  heldWeight: 1,
  hysteresis: 0.02,
  initialKey: undefined,
  initialWeight: 4,
  homeWindow: DEFAULT_WINDOW,
  homeStrength: 0.02,
  localHalfLifeMs: 2000,
  localShare: 0.6,
  chordCompactness: 0.3,
  keySoftness: 0.2,
  windowReach: 3,
  namingCentre: 4,
  lowerNeighbourShift: 1,
  approachMs: 600,
  resolutionShift: 1,
  resolutionMs: 4000,
  shortHalfLifeMs: 1000,
  shortShare: 0.3,
};

/**
 * Key profiles of Krumhansl and Kessler (1982), as tabulated in Krumhansl, Cognitive Foundations
 * of Musical Pitch (1990): the fit of each chroma above the tonic (from memory).
 */
const MAJOR_PROFILE = [6.35, 2.23, 3.48, 2.33, 4.38, 4.09, 2.52, 5.19, 2.39, 3.66, 2.29, 2.88];
const MINOR_PROFILE = [6.33, 2.68, 3.52, 5.38, 2.6, 3.53, 2.54, 4.75, 3.98, 2.69, 3.34, 3.17];

/** A major or minor triad spans four fifths (C–G–E, C–E♭–G); its subsets fewer. */
const TRIAD_SPREAD = 4;

/** The share of the home centre in the spelling centre, per unit of `homeStrength` (0.5 and more: all of it). */
const HOME_PULL = 2;

/** Where the speller starts when no key is declared. */
const GUESS: Key = { tonic: 0, mode: 'major' };

/** The region's half-life (see `SHARP_REGION` in key-names.ts). */
const REGION_HALF_LIFE_MS = 60_000;

/** A profile centred on its mean and scaled to unit length, so a correlation is one dot product. */
function normalise(profile: readonly number[]): Float64Array {
  const mean = profile.reduce((a, b) => a + b, 0) / profile.length;
  const centred = profile.map((v) => v - mean);
  const length = Math.sqrt(centred.reduce((a, v) => a + v * v, 0));
  return Float64Array.from(centred, (v) => v / length);
}

const PROFILES = { major: normalise(MAJOR_PROFILE), minor: normalise(MINOR_PROFILE) } as const;
const MODES = ['major', 'minor'] as const;

/**
 * Follows the harmony causally, in two layers.
 *
 * The key: a time-decayed weight per chroma of the notes heard, plus the notes held, and the key
 * that fits them best (Krumhansl–Schmuckler key finding), changed only when the new key fits
 * clearly better (hysteresis). Working from chromas rather than from spelled notes, the key cannot
 * drift by feeding on its own spellings. Each key is a point on the line of fifths: of the
 * enharmonic spellings of a tonic (F♯ or G♭ major) it takes the one nearest the key it leaves,
 * within seven sharps or flats; a home window (the style prior) makes keys far from it cost more.
 *
 * The spelling: each note takes the spelling nearest a centre on the line of fifths, the
 * line-of-fifths proximity of Longuet-Higgins's and Temperley's spellers and the "centre of
 * effect" of Chew and Chen's spiral array: here a blend of the key's window centre (softened over
 * the keys that fit almost as well) and the local centre of the notes just spelled. Notes that begin together are spelled as a chord: of the
 * spellings near the centre the set that is most compact on the line of fifths (a triad rather
 * than an augmented second or a diminished fourth); notes already held do not enter that choice.
 */
export class FollowSpeller implements Speller {
  private readonly weights = new Float64Array(12);
  private readonly shortWeights = new Float64Array(12);
  /** The notes heard, time-decayed as `weights` but without the starting guess. */
  private readonly heardWeights = new Float64Array(12);
  private lastTime = 0;
  private current: Key;
  private readonly held = new Map<number, number>();
  private frozen = false;
  /** Notes spelled lately (time-decayed): how much the local centre counts. */
  private localWeight = 0;
  private localTime = 0;
  /** The latest spelling of each chroma and when it was heard. */
  private readonly chromaF = new Float64Array(12);
  private readonly chromaT = new Float64Array(12).fill(-Infinity);

  private readonly homeCentre: number;
  /** True until a key is declared or found: the key the speller starts in is then only a guess. */
  private guessing = true;
  /** Notes heard (time-decayed like the chroma weights). */
  private heard = 0;
  /** The keys of the group spelled last and when it began: the approach of the next notes. */
  private lastKeys: number[] = [];
  private lastOnset = -Infinity;
  /** The piece's home key, counted since the start or the last key declared (see `HOME_NOTES` in key-names.ts). */
  private readonly home = new HomeKey();
  /** Per chroma: +1 when it last moved up a semitone to the next note, −1 down; and when. */
  private readonly resolvedDir = new Float64Array(12);
  private readonly resolvedT = new Float64Array(12).fill(-Infinity);

  constructor(private readonly p: FollowParameters = DEFAULT_FOLLOW) {
    this.current = p.initialKey ?? GUESS;
    this.homeCentre = p.homeWindow.lowest + 5.5;
    this.believe(this.current);
    this.guessing = p.initialKey === undefined;
    if (p.initialKey !== undefined) this.declaredCentre = windowCentreOf(p.initialKey);
  }

  /** Starts over in `key`, as if `initialWeight` notes had been heard in it. */
  private believe(key: Key): void {
    this.current = key;
    const profile = key.mode === 'major' ? MAJOR_PROFILE : MINOR_PROFILE;
    const tonicChroma = chromaAt(key.tonic);
    const total = profile.reduce((a, b) => a + b, 0);
    profile.forEach((v, i) => (this.weights[(tonicChroma + i) % 12] = (this.p.initialWeight * v) / total));
    this.shortWeights.set(this.weights);
    this.heardWeights.fill(0);
    this.localWeight = 0;
    this.chromaT.fill(-Infinity);
    this.resolvedT.fill(-Infinity);
    this.softCentre = NaN;
    this.region = NaN;
    this.home.reset();
  }

  /**
   * The window centre of the key the player declared (`initialKey`, a set-key control), if any:
   * keys are then named nearest it rather than the current one, so a piece declared in C♯ major or
   * D♯ minor names its modulations on the sharp side however far they go.
   */
  private declaredCentre: number | undefined;
  /** Where the music has been: the key's window centre averaged over time (NaN until a key is found), and when last updated. */
  private region = NaN;
  private regionTime = 0;

  setKey(key: DeclaredKey): void {
    this.believe({ tonic: key.tonic.fifths, mode: isMajorLike(key.mode) ? 'major' : 'minor' });
    this.declaredCentre = windowCentreOf(this.current);
    this.guessing = false;
  }

  setFrozen(frozen: boolean): void {
    this.frozen = frozen;
  }

  currentTonic(): PitchClass {
    return pitchClass(this.current.tonic);
  }

  /**
   * The local centre: the mean of the latest spelling of each chroma, each weighted by how recently
   * it was heard (halving every `localHalfLifeMs`), so that a repeated note does not outweigh the
   * harmony around it: the centre of effect of the pitch-class set just heard.
   */
  private localCentre(): number {
    let sum = 0;
    let weight = 0;
    for (let c = 0; c < 12; c++) {
      const t = this.chromaT[c]!;
      if (t === -Infinity) continue;
      const w = 0.5 ** ((this.localTime - t) / this.p.localHalfLifeMs);
      sum += w * this.chromaF[c]!;
      weight += w;
    }
    return weight > 0 ? sum / weight : windowCentreOf(this.current);
  }

  private decayTo(time: number): void {
    if (time > this.lastTime) {
      const factor = 0.5 ** ((time - this.lastTime) / this.p.halfLifeMs);
      for (let i = 0; i < 12; i++) this.weights[i]! *= factor;
      const shortFactor = 0.5 ** ((time - this.lastTime) / this.p.shortHalfLifeMs);
      for (let i = 0; i < 12; i++) this.shortWeights[i]! *= shortFactor;
      for (let i = 0; i < 12; i++) this.heardWeights[i]! *= factor;
      this.heard *= factor;
      this.lastTime = time;
    }
    if (time > this.localTime) {
      const factor = 0.5 ** ((time - this.localTime) / this.p.localHalfLifeMs);
      this.localWeight *= factor;
      this.localTime = time;
    }
  }

  private readonly scratch = new Float64Array(12);
  /** The 24 keys as they would be spelled from `candidatesFor`. */
  private candidates: Key[] = [];
  private candidatesFor: Key | undefined;
  private candidatesGuessing = true;
  private readonly scores = new Float64Array(24);
  /**
   * The key's window centre as a soft estimate: the window centres of the 24 keys (named from the
   * current one), weighted by exp(fit / keySoftness); NaN until keys have been weighed.
   */
  private softCentre = NaN;

  /** Correlation of the weights (centred, in `scratch`) with a key's profile, over `norm`. */
  private correlation(tonicChroma: number, mode: Key['mode'], norm: number): number {
    const profile = PROFILES[mode];
    let dot = 0;
    for (let i = 0; i < 12; i++) dot += this.scratch[(tonicChroma + i) % 12]! * profile[i]!;
    return norm === 0 ? 0 : dot / norm;
  }

  /** How far (in fifths) a key's window lies beyond the home window, times the prior's strength. */
  private homeCost(key: Key): number {
    if (this.p.homeStrength === 0) return 0;
    return this.p.homeStrength * Math.abs(windowCentreOf(key) - this.homeCentre);
  }

  /** Fills `scratch` with `weights` plus the held notes, centred; returns its length. */
  private centred(weights: Float64Array): number {
    const w = this.scratch;
    for (let i = 0; i < 12; i++) w[i] = weights[i]!;
    for (const chroma of this.held.values()) w[chroma]! += this.p.heldWeight;
    let mean = 0;
    for (let i = 0; i < 12; i++) mean += w[i]!;
    mean /= 12;
    let norm = 0;
    for (let i = 0; i < 12; i++) {
      w[i]! -= mean;
      norm += w[i]! * w[i]!;
    }
    return Math.sqrt(norm);
  }

  /** The soft window centre of the keys, from the weights in `scratch` (see `softCentre`). */
  private softOf(norm: number): number {
    const scores = this.scores;
    let top = -Infinity;
    this.candidates.forEach((key, i) => {
      scores[i] = this.correlation(chromaAt(key.tonic), key.mode, norm) - this.homeCost(key);
      if (scores[i]! > top) top = scores[i]!;
    });
    return this.weightedCentre(top);
  }

  /** The window centres of the candidate keys, weighted by how near each one's score (in `scores`) is to the best, `top`. */
  private weightedCentre(top: number): number {
    let sum = 0;
    let weight = 0;
    this.candidates.forEach((key, i) => {
      const w = Math.exp((this.scores[i]! - top) / this.p.keySoftness);
      sum += w * windowCentreOf(key);
      weight += w;
    });
    return sum / weight;
  }

  private update(): void {
    const norm = this.centred(this.weights);
    const currentScore = this.correlation(chromaAt(this.current.tonic), this.current.mode, norm) - this.homeCost(this.current);
    if (this.candidatesFor !== this.current || this.candidatesGuessing !== this.guessing) {
      this.candidatesGuessing = this.guessing;
      const at = this.naming();
      this.candidates = MODES.flatMap((mode) => Array.from({ length: 12 }, (_, chroma) => nameKey(chroma, mode, at)));
      this.candidatesFor = this.current;
    }
    let best: Key | undefined;
    let bestScore = currentScore;
    let top = -Infinity;
    const scores = this.scores;
    this.candidates.forEach((key, i) => {
      const s = this.correlation(chromaAt(key.tonic), key.mode, norm) - this.homeCost(key);
      scores[i] = s;
      if (s > top) top = s;
      if (s > bestScore) {
        best = key;
        bestScore = s;
      }
    });
    if (this.p.keySoftness > 0) {
      this.softCentre = this.weightedCentre(top);
      if (this.p.shortShare > 0) {
        const short = this.softOf(this.centred(this.shortWeights));
        this.softCentre += this.p.shortShare * (short - this.softCentre);
      }
    }
    // A guessed start gives way only once as many notes have been heard as it counts for.
    // Meanwhile the notes are spelled around the keys that fit what has been heard (from two notes
    // on), named from the naming centre, not around the guess: a piece that opens on a C♯ major
    // triad hears C♯–E♯–G♯, not D♭–F–A♭.
    if (this.guessing && this.heard < this.p.initialWeight) {
      if (this.heard >= 2 && this.p.keySoftness > 0) this.softCentre = this.softOf(this.centred(this.heardWeights));
      return;
    }
    if (best && bestScore - currentScore > this.p.hysteresis) {
      this.current = best;
      this.guessing = false;
    }
  }

  /** Where the speller stands, for naming keys. */
  private naming(): NamingContext {
    return { guessing: this.guessing, current: this.current, declaredCentre: this.declaredCentre, homeCentre: this.homeCentre, region: this.region, namingCentre: this.p.namingCentre };
  }

  /** Renames every key 12 fifths the other way when the home key is misnamed (see `HOME_NOTES` in key-names.ts). */
  private reframe(): void {
    const shift = this.home.shift(this.naming());
    if (shift === 0) return;
    this.current = { tonic: this.current.tonic + shift, mode: this.current.mode };
    for (let c = 0; c < 12; c++) this.chromaF[c]! += shift;
    this.softCentre += shift;
    this.region += shift;
  }

  /** Moves the region towards the key in force (see `SHARP_REGION` in key-names.ts). */
  private followRegion(time: number): void {
    if (this.guessing) return;
    const centre = windowCentreOf(this.current);
    if (Number.isNaN(this.region)) this.region = centre;
    else this.region += (1 - 0.5 ** ((time - this.regionTime) / REGION_HALF_LIFE_MS)) * (centre - this.region);
    this.regionTime = time;
  }

  /** The key the speller believes it is in. */
  currentKey(): DeclaredKey | undefined {
    if (this.guessing) return undefined; // nothing heard has named a key yet: the starting guess is no key to show
    return { tonic: pitchClass(this.current.tonic), mode: this.current.mode };
  }

  /** The centre new notes are spelled around: the key's window centre, drawn towards the local centre. */
  private centre(): number {
    const keyCentre = Number.isNaN(this.softCentre) ? windowCentreOf(this.current) : this.softCentre;
    let centre = keyCentre;
    if (this.localWeight > 0 && this.p.localShare > 0) {
      const share = (this.p.localShare * this.localWeight) / (this.localWeight + 1);
      centre = (1 - share) * keyCentre + share * this.localCentre();
    }
    const pull = Math.min(1, HOME_PULL * this.p.homeStrength);
    return centre + pull * (this.homeCentre - centre);
  }

  spell(notes: readonly NoteContext[]): SpelledPitch[] {
    if (notes.length === 0) return [];
    if (!this.frozen) {
      this.decayTo(notes[0]!.time);
      for (const n of notes) {
        this.weights[mod(n.key, 12)]! += 1;
        this.shortWeights[mod(n.key, 12)]! += 1;
        this.heardWeights[mod(n.key, 12)]! += 1;
      }
      this.heard += notes.length;
      this.home.count(notes.length, this.current, this.guessing);
      this.update();
      this.reframe();
      this.followRegion(notes[0]!.time);
    }
    // The whole group counts before any of it is spelled, and it is spelled as one chord.
    const centre = this.centre();
    const steps = notes.map((n) => this.stepFrom(n));
    const centres = notes.map((n, i) => centre + this.approachShift(steps[i]!) + this.resolutionShift(n));
    this.lastKeys = notes.map((n) => n.key);
    this.lastOnset = notes[0]!.time;
    const fifths = this.spellChord(notes, centres);
    // How each note of the group just before moved on, remembered for its key's next return.
    if (!this.frozen)
      notes.forEach((n, i) => {
        const step = steps[i]!;
        if (step !== 1 && step !== -1) return;
        const from = mod(n.key - step, 12);
        this.resolvedDir[from] = step;
        this.resolvedT[from] = n.time;
      });
    return notes.map((n, i) => {
      this.held.set(noteIdOf(n), mod(n.key, 12));
      const f = this.withinReach(fifths[i]!);
      if (!this.frozen) {
        this.localWeight += 1;
        const c = mod(n.key, 12);
        this.chromaF[c] = f;
        this.chromaT[c] = n.time;
      }
      return onKey(pitchClass(f), n.key);
    });
  }

  /**
   * The shift of a note's centre from how it is approached: a chromatic note reached by a falling
   * semitone is most often a lower neighbour or an appoggiatura that returns upwards (E–D♯–E,
   * A–G♯–A), written as the raised letter below; it leans sharpward by `lowerNeighbourShift`. Causal:
   * only the approach is known, not the resolution (the melodic side of Cambouropoulos's interval
   * spelling, and of Meredith's ps13 stage 2, reduced to what has been heard).
   */
  private approachShift(step: number): number {
    return step === -1 ? this.p.lowerNeighbourShift : 0;
  }

  /** Semitones from the nearest note of the group just before (within `approachMs`), or Infinity. */
  private stepFrom(note: NoteContext): number {
    if (note.time - this.lastOnset > this.p.approachMs) return Infinity;
    let step = Infinity;
    for (const k of this.lastKeys) if (Math.abs(note.key - k) < Math.abs(step)) step = note.key - k;
    return step;
  }

  /**
   * The shift of a note's centre from how its key last moved on: a chromatic note that went up a
   * semitone (D♯–E) was a leading tone, one that went down (E♭–D) a lowered degree, and a figure
   * that comes back usually comes back in the same role. The resolution is heard only after the
   * note, so it is remembered for the key's next return (causal; the resolution rule of Meredith's
   * ps13 stage 2 and Cambouropoulos's interval spelling look ahead instead).
   */
  private resolutionShift(note: NoteContext): number {
    const c = mod(note.key, 12);
    if (this.p.resolutionShift === 0 || note.time - this.resolvedT[c]! > this.p.resolutionMs) return 0;
    return this.p.resolutionShift * this.resolvedDir[c]!;
  }

  /**
   * Line-of-fifths positions for a chord: each note's spelling nearest its centre, or, where the
   * chord has two or more chromas, the set (each note nearest the centre or one enharmonic step
   * beyond) that minimises the distance from each note's centre plus `chordCompactness` times the chord's
   * spread on the line of fifths.
   */
  private spellChord(notes: readonly NoteContext[], centres: readonly number[]): number[] {
    const nearest = notes.map((n, i) => nearestFifths(mod(n.key, 12), centres[i]!));
    if (notes.length < 2 || this.p.chordCompactness === 0) return nearest;
    const chromas: number[] = [];
    const near: number[] = [];
    const centreOf: number[] = [];
    for (let i = 0; i < notes.length; i++) {
      const chroma = mod(notes[i]!.key, 12);
      if (!chromas.includes(chroma)) {
        chromas.push(chroma);
        near.push(nearest[i]!);
        centreOf.push(centres[i]!);
      }
    }
    if (chromas.length < 2 || chromas.length > 8) return nearest;
    // Each chroma may move to its other spelling on the far side of the centre (2 choices each).
    let bestMask = 0;
    let bestCost = Infinity;
    let bestSpread = 0;
    let triadMask = -1;
    let triadDistance = Infinity;
    const count = 1 << chromas.length;
    for (let mask = 0; mask < count; mask++) {
      let lo = Infinity;
      let hi = -Infinity;
      let distance = 0;
      for (let i = 0; i < chromas.length; i++) {
        const f = (mask >> i) & 1 ? alternative(near[i]!, centreOf[i]!) : near[i]!;
        if (f < lo) lo = f;
        if (f > hi) hi = f;
        distance += Math.abs(f - centreOf[i]!);
      }
      const spread = hi - lo;
      const cost = distance + this.p.chordCompactness * spread;
      if (cost < bestCost - 1e-9) {
        bestCost = cost;
        bestMask = mask;
        bestSpread = spread;
      }
      if (spread <= TRIAD_SPREAD && distance < triadDistance - 1e-9) {
        triadDistance = distance;
        triadMask = mask;
      }
    }
    // Three or more chromas that can be spelled as a triad are not spelled with an augmented second
    // or a diminished fourth (a spread of 7 fifths or more).
    if (chromas.length >= 3 && bestSpread >= 7 && triadMask >= 0) bestMask = triadMask;
    if (bestMask === 0) return nearest;
    return notes.map((n) => {
      const i = chromas.indexOf(mod(n.key, 12));
      return (bestMask >> i) & 1 ? alternative(near[i]!, centreOf[i]!) : near[i]!;
    });
  }

  /** A position moved by 12 fifths where it lies more than `windowReach` beyond the key's window. */
  private withinReach(f: number): number {
    const lowest = windowCentreOf(this.current) - 5.5 - this.p.windowReach;
    if (f < lowest) return f + 12;
    if (f > lowest + 11 + 2 * this.p.windowReach) return f - 12;
    return f;
  }

  peek(note: NoteContext): SpelledPitch {
    return onKey(pitchClass(this.withinReach(nearestFifths(mod(note.key, 12), this.centre()))), note.key);
  }

  noteOff(note: NoteContext): void {
    this.held.delete(noteIdOf(note));
  }

  currentWindow(): KeyboardWindow {
    return keyboardWindow(Math.round(this.centre() - 5.5));
  }
}

/** The line-of-fifths position of `chroma` nearest `centre`, ties going sharpward (as a window's spelling). */
function nearestFifths(chroma: number, centre: number): number {
  const base = mod(7 * chroma, 12);
  return base + 12 * Math.round((centre - base) / 12);
}

/** The other spelling of a position, on the far side of the centre. */
function alternative(f: number, centre: number): number {
  return f <= centre ? f + 12 : f - 12;
}

