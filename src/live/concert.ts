import type { ProgrammeFile, ProgrammePiece } from '../presets/programme-file.js';
import type { PieceChange, PieceSource } from '../router/pieces.js';
import { ScoreSpeller } from '../score/score-speller.js';
import type { Speller } from '../spelling/speller.js';
import { createStrategy } from '../spelling/strategy.js';

/** A fresh speller for a piece: its strategy, over its score when it follows one (from the first bar). */
export function pieceSpeller(piece: ProgrammePiece): Speller {
  const base = createStrategy({ strategy: piece.strategy, window: piece.window, key: piece.key, follow: piece.follow });
  return piece.score === undefined ? base : new ScoreSpeller(piece.score, base);
}

/** The running order of a programme, and where the concert is in it: what the engine's piece actions move through. */
export class Concert implements PieceSource {
  private current = -1;

  constructor(
    readonly programme: ProgrammeFile,
    /** The synth's A4 of the base setup (or the command line): a piece that does not change it has this one. */
    private readonly baseSynthA4: number | undefined = undefined,
  ) {}

  /** 0-based; −1 before the first piece has begun. */
  get index(): number {
    return this.current;
  }

  get count(): number {
    return this.programme.pieces.length;
  }

  step(step: 1 | -1): PieceChange | undefined {
    return this.at(this.current + step);
  }

  at(index: number): PieceChange | undefined {
    const piece = this.programme.pieces[index];
    if (!piece) return undefined;
    this.current = index;
    return {
      index,
      count: this.count,
      title: piece.title,
      tuning: { id: piece.tuning.id, name: piece.tuning.name, tuning: piece.tuning.tuning, reference: piece.reference, synthA4: piece.synthA4 ?? this.baseSynthA4 },
      spelling: { base: pieceSpeller(piece), key: piece.key, strategy: piece.score === undefined ? piece.strategy : `score, else ${piece.strategy}` },
    };
  }
}
