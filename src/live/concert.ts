import type { ProgrammeFile, ProgrammePiece } from '../presets/programme-file.js';
import type { PieceChange, PieceOutputChange, PieceSource } from '../router/pieces.js';
import { PitchTable } from '../router/pitch-table.js';
import { createOutput, resolveEngineOptions, type EngineOptionsInput } from '../router/setup.js';
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

  private readonly baseSynthA4: number | undefined;
  /** Whether any piece changes the output: then every piece brings its output (the base's when it changes nothing). */
  private readonly outputs: boolean;

  constructor(
    readonly programme: ProgrammeFile,
    /** The engine options of the base setup (and the command line): what a piece does not change. */
    private readonly base: EngineOptionsInput | undefined = undefined,
  ) {
    this.baseSynthA4 = base && resolveEngineOptions(base).synthA4;
    this.outputs = base !== undefined && programme.pieces.some((p) => p.output !== undefined);
  }

  /** The piece's output: the base's options with the piece's settings over them, tuned from its table. */
  private outputOf(piece: ProgrammePiece, speller: Speller, synthA4: number | undefined): PieceOutputChange | undefined {
    if (!this.outputs || !this.base) return undefined;
    const o = piece.output;
    const options = resolveEngineOptions({
      ...this.base,
      tuning: piece.tuning.tuning,
      reference: piece.reference,
      speller,
      synthA4,
      ...(o && {
        channels: o.channelList ?? this.base.channels,
        bendRange: o.bendRange ?? this.base.bendRange,
        sendBendRange: o.sendBendRange ?? this.base.sendBendRange,
        releaseGuardMs: o.releaseGuardMs ?? this.base.releaseGuardMs,
        mtsDevice: o.mtsDevice ?? this.base.mtsDevice,
        mtsProgram: o.mtsProgram ?? this.base.mtsProgram,
        octaveForm: o.octaveForm ?? this.base.octaveForm,
      }),
    });
    return { strategy: createOutput(options, new PitchTable(options.tuning, options.reference, options.synthA4)), releaseGuardMs: options.releaseGuardMs };
  }

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
    const speller = pieceSpeller(piece);
    const synthA4 = piece.synthA4 ?? this.baseSynthA4;
    return {
      index,
      count: this.count,
      title: piece.title,
      tuning: { id: piece.tuning.id, name: piece.tuning.name, tuning: piece.tuning.tuning, reference: piece.reference, synthA4 },
      output: this.outputOf(piece, speller, synthA4),
      spelling: { base: speller, key: piece.key, strategy: piece.score === undefined ? piece.strategy : `score, else ${piece.strategy}` },
    };
  }
}
