import type { DeclaredKey } from '../spelling/keys.js';
import type { Speller } from '../spelling/speller.js';
import type { OutputStrategy } from './output.js';
import type { TuningChange } from './tuning-in-force.js';

/** What moving to a piece of a concert programme changes in the engine. */
export interface PieceChange {
  /** 0-based place in the programme, and how many pieces it has. */
  readonly index: number;
  readonly count: number;
  readonly title: string;
  /** The piece's tuning and reference (the base setup's when the piece names none). */
  readonly tuning: TuningChange;
  /** The piece's spelling strategy (over its score, when it follows one) and its declared key. */
  /** The piece's own output settings, made into an output: it takes over once nothing sounds. */
  readonly output?: PieceOutputChange | undefined;
  readonly spelling: { readonly base: Speller; readonly key: DeclaredKey | undefined; /** The strategy's name, for displays. */ readonly strategy: string };
}

/** An output to take over, and its release guard (how long after the last note it, in turn, must wait). */
export interface PieceOutputChange {
  readonly strategy: OutputStrategy;
  readonly releaseGuardMs: number;
}

/**
 * A concert programme as the engine sees it: where a step or a jump leads. It builds each piece's
 * speller afresh (a score is followed from its beginning every time its piece starts). Undefined:
 * there is no piece there (the ends of the programme).
 */
export interface PieceSource {
  step(step: 1 | -1): PieceChange | undefined;
  at(index: number): PieceChange | undefined;
}
