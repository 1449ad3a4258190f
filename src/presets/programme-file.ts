import { z } from 'zod';
import type { KeyboardWindow } from '../pitch/index.js';
import type { OutputMode } from '../router/output-modes.js';
import type { Score } from '../score/score.js';
import type { DeclaredKey } from '../spelling/keys.js';
import type { Strategy } from '../spelling/strategy.js';
import { A440, isAdaptive, type Reference } from '../tuning/index.js';
import { readTextFile } from '../util/files.js';
import { UserError } from '../util/errors.js';
import { parseJsonSource, pathSegments, type JsonSource } from './json-source.js';
import { jsonPath, throwProblems, zodProblems, type Problem } from './problems.js';
import { adaptiveFits, adaptiveRefusal, checkSetup, semanticChecks, setupPath, type SetupCheck, type SetupFile } from './setup-file.js';
import { setupSchema, type SetupJson } from './setup-schema.js';
import { loadTuningPreset, type TuningPreset } from './tuning-presets.js';

const shape = setupSchema.shape;

/** One piece: a title and what it changes. A field it leaves out is the base setup's. */
export const pieceSchema = z.strictObject({
  title: z.string().min(1, { error: 'must not be empty' }),
  tuning: shape.tuning,
  reference: shape.reference,
  score: shape.score,
  spelling: shape.spelling,
  output: shape.output,
});

/**
 * A concert programme: one base setup (the instrument, the output, the pedals) and an ordered list
 * of pieces, each naming the parts of a setup it changes. Paths are read from the programme's own
 * folder.
 */
export const programmeSchema = z.strictObject({
  $schema: z.string().optional(),
  name: z.string().optional(),
  description: z.string().optional(),
  /** The base setup, relative to the programme's folder. */
  setup: z.string(),
  /** Checked one by one below, so every piece's problems show in one pass. */
  pieces: z.array(z.unknown()).min(1),
});

export type PieceJson = z.infer<typeof pieceSchema>;

/**
 * The output settings a piece may change. `synthA4` is part of how new notes are tuned and applies
 * at once; the others re-configure the synth (ranges, channels, the release guard), so they take
 * over only when nothing sounds. The output mode and the bend layout are the instrument's (the
 * synth is set up for them) and stay for the whole concert.
 */
export const PIECE_OUTPUT_SETTINGS = ['synthA4', 'channels', 'bendRange', 'sendBendRange', 'releaseGuardMs', 'mtsDevice', 'mtsProgram', 'octaveForm'] as const;

/** A piece's output settings beyond the synth's A4 (undefined when it has none). */
export type PieceOutput = Omit<NonNullable<SetupJson['output']>, 'mode' | 'synthA4' | 'layout'>;

/** A piece as it plays: every value resolved over the base setup and loaded. */
export interface ProgrammePiece {
  readonly title: string;
  readonly tuning: TuningPreset;
  readonly reference: Reference;
  readonly strategy: Strategy;
  readonly window: KeyboardWindow | undefined;
  readonly key: DeclaredKey | undefined;
  readonly follow: NonNullable<SetupJson['spelling']>['follow'];
  /** The score it follows, and the path as written. */
  readonly score: Score | undefined;
  readonly scorePath: string | undefined;
  /** The synth's own A4 for this piece, when the piece changes it. */
  readonly synthA4: number | undefined;
  /** The output settings the piece changes (besides `synthA4`), with its channels parsed. */
  readonly output: (PieceOutput & { readonly channelList: readonly number[] | undefined }) | undefined;
}

export interface ProgrammeFile {
  readonly file: string;
  readonly name: string | undefined;
  readonly setupFile: string;
  readonly base: SetupFile;
  readonly pieces: readonly ProgrammePiece[];
}

export interface ProgrammeCheck {
  readonly programme: ProgrammeFile | undefined;
  /** The programme's own problems, warnings included. */
  readonly problems: readonly Problem[];
  readonly source: JsonSource;
  /** The base setup's check (its problems are located in its own file, `setupFile`). */
  readonly setup: SetupCheck | undefined;
  readonly setupFile: string | undefined;
}

/** Whether a file's value looks like a programme (it has pieces). */
export function isProgrammeValue(value: unknown): boolean {
  return typeof value === 'object' && value !== null && 'pieces' in value;
}

/** A piece's spelling over the base's: a piece naming its strategy brings its whole block, else its fields replace the base's one by one. */
function spellingOf(base: SetupJson['spelling'], piece: PieceJson['spelling']): SetupJson['spelling'] {
  if (!piece) return base;
  if (piece.strategy !== undefined) return { ...piece, follow: piece.follow ?? base?.follow, gatherMs: base?.gatherMs };
  return { ...base, ...piece };
}

/** Where a problem found in a piece's merged setup lies in the programme: the deepest part the piece itself wrote. */
function placeIn(piece: Record<string, unknown>, path: string, at: string): string {
  const segments = pathSegments(path);
  let value: unknown = piece;
  let depth = 0;
  for (const s of segments) {
    if (typeof value !== 'object' || value === null || !(s in value)) break;
    value = (value as Record<string | number, unknown>)[s];
    depth++;
  }
  return jsonPath([...pathSegments(at), ...segments.slice(0, depth)]);
}

/**
 * Validates a programme as `play --programme` loads it, every problem in one pass: the file's
 * shape, the base setup (its problems in its own file), and each piece's tuning, reference,
 * spelling and key, score and output settings, resolved over the base exactly as they will play.
 */
export function checkProgramme(text: string, file: string): ProgrammeCheck {
  const source = parseJsonSource(text, file);
  const problems: Problem[] = [];
  const parsed = programmeSchema.safeParse(source.value, { reportInput: true });
  const raw = (typeof source.value === 'object' && source.value !== null ? source.value : {}) as Record<string, unknown>;
  if (!parsed.success) problems.push(...zodProblems(parsed.error).filter((p) => !p.path.startsWith('$.pieces[')));
  let setup: SetupCheck | undefined;
  const setupText = typeof raw.setup === 'string' ? raw.setup : undefined;
  const setupFile = setupText === undefined ? undefined : setupPath(file, setupText);
  if (setupFile !== undefined) {
    try {
      setup = checkSetup(readTextFile(setupFile), setupFile);
      if (!setup.setup) problems.push({ path: '$.setup', message: `the base setup ${setupText} has ${setup.problems.filter((p) => !p.warning).length} problem(s), shown with its own lines` });
    } catch (error) {
      if (!(error instanceof UserError)) throw error;
      problems.push({ path: '$.setup', message: error.message });
    }
  }
  const baseJson: SetupJson = setup?.setup?.json ?? {};
  const mode: OutputMode = baseJson.output?.mode ?? modeOf(setup?.source.value);
  const pieces: ProgrammePiece[] = [];
  const titles = new Map<string, number>();
  (Array.isArray(raw.pieces) ? raw.pieces : []).forEach((value: unknown, i) => {
    const at = `$.pieces[${i}]`;
    const result = pieceSchema.safeParse(value, { reportInput: true });
    if (!result.success) {
      for (const p of zodProblems(result.error)) problems.push({ ...p, path: at + p.path.slice(1) });
      return;
    }
    const piece = result.data;
    const first = titles.get(piece.title);
    if (first !== undefined) problems.push({ path: `${at}.title`, warning: true, message: `the same title as pieces[${first}]: the running order cannot tell them apart` });
    else titles.set(piece.title, i);
    for (const field of Object.keys(piece.output ?? {})) {
      if (!(PIECE_OUTPUT_SETTINGS as readonly string[]).includes(field)) {
        problems.push({ path: `${at}.output.${field}`, message: `belongs to the base setup: the output's ${field} stays the same for the whole concert (a piece may change ${PIECE_OUTPUT_SETTINGS.join(', ')})` });
        continue;
      }
    }
    if (piece.spelling?.gatherMs !== undefined) problems.push({ path: `${at}.spelling.gatherMs`, message: 'belongs to the base setup: chord gathering stays the same for the whole concert' });
    // The piece as a setup of its own, checked as a setup is: its own tuning and score (read from
    // the programme's folder; the base's were read from the base setup's), the reference and the
    // spelling merged over the base's, the base's output mode.
    const merged: SetupJson = {
      tuning: piece.tuning,
      reference: piece.reference ?? baseJson.reference,
      score: piece.score,
      spelling: spellingOf(baseJson.spelling, piece.spelling),
      output: { ...piece.output, synthA4: undefined, mode },
    };
    const found: Problem[] = [];
    const values = semanticChecks(merged, file, found);
    const fromBase = { tuning: baseJson.tuning === undefined || piece.tuning !== undefined ? undefined : setup?.setup?.tuning, score: piece.score !== undefined ? undefined : setup?.setup?.score };
    for (const p of found) problems.push({ ...p, path: placeIn(piece as Record<string, unknown>, p.path, at) });
    const tuning = values.tuning ?? fromBase.tuning ?? (piece.tuning === undefined ? defaultTuning() : undefined);
    if (tuning && isAdaptive(tuning.tuning) && !adaptiveFits(mode)) problems.push({ path: piece.tuning !== undefined ? `${at}.tuning` : at, message: adaptiveRefusal(tuning.id, mode) });
    if (!tuning || found.some((p) => !p.warning)) return;
    const spelling = merged.spelling ?? {};
    pieces.push({
      title: piece.title,
      tuning,
      reference: values.reference ?? tuning.reference ?? A440,
      strategy: spelling.strategy ?? (spelling.window !== undefined ? 'fixed' : 'follow'),
      window: values.window,
      key: values.key,
      follow: spelling.follow,
      score: values.score ?? fromBase.score,
      scorePath: piece.score ?? baseJson.score,
      synthA4: piece.output?.synthA4,
      output: outputOf(piece.output, values.channels),
    });
  });
  const ok = parsed.success && setup?.setup !== undefined && !problems.some((p) => !p.warning);
  const programme = ok && parsed.success && setup?.setup && setupFile !== undefined ? { file, name: parsed.data.name, setupFile, base: setup.setup, pieces } : undefined;
  return { programme, problems, source, setup, setupFile };
}

function outputOf(output: PieceJson['output'], channelList: readonly number[] | undefined): ProgrammePiece['output'] {
  if (!output) return undefined;
  const { mode: _mode, synthA4: _a4, layout: _layout, ...rest } = output;
  return Object.keys(rest).length === 0 ? undefined : { ...rest, channelList };
}

/** The output mode a setup names, even when the setup has problems elsewhere. */
function modeOf(value: unknown): OutputMode {
  const parsed = setupSchema.shape.output.safeParse((value as { output?: unknown } | undefined)?.output);
  return (parsed.success ? parsed.data?.mode : undefined) ?? 'bend';
}

function defaultTuning(): TuningPreset {
  return loadTuningPreset('meantone-1-4'); // as play without a tuning
}

export function loadProgrammeFile(file: string): ProgrammeFile {
  const check = checkProgramme(readTextFile(file), file);
  if (check.programme) return check.programme;
  const hint = `run "diesis check ${file}" to see them all`;
  const own = check.problems.filter((p) => p.path !== '$.setup');
  // The base setup's own problem first, in its own file and line, when that is all there is.
  if (check.setup && !check.setup.setup && check.setupFile && !own.some((p) => !p.warning)) throwProblems(check.setupFile, check.setup.problems, hint, check.setup.source);
  throwProblems(file, check.problems, hint, check.source);
}
