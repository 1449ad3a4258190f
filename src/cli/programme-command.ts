import type { Command } from 'commander';
import { relative } from 'node:path';
import { formatKey } from '../spelling/keys.js';
import { DEFAULT_WINDOW, formatRange } from '../pitch/index.js';
import { formatProblem } from '../presets/problems.js';
import { checkProgramme, loadProgrammeFile, type ProgrammeCheck, type ProgrammePiece } from '../presets/programme-file.js';
import { formatReference } from '../tuning/index.js';
import { readTextFile } from '../util/files.js';
import type { CommandIo } from '../util/io.js';
import { renderTable } from '../text/table.js';
import { UserError } from '../util/errors.js';

/** A path from here when it lies below here, else as it is. */
function shortPath(path: string): string {
  const near = relative(process.cwd(), path);
  return near.startsWith('..') ? path : near;
}

/** The spelling of a piece in a player's words. */
export function pieceSpelling(piece: ProgrammePiece): string {
  if (piece.strategy === 'fixed') return `fixed ${formatRange(piece.window ?? DEFAULT_WINDOW)}`;
  if (piece.strategy === 'key') return `key ${piece.key ? formatKey(piece.key) : '-'}`;
  return `follow${piece.key ? ` from ${formatKey(piece.key)}` : ''}`;
}

/** The running order, one row a piece: what a player writes on the card beside the music. */
export function runningOrder(pieces: readonly ProgrammePiece[]): string {
  return renderTable(
    [
      { header: '#', align: 'right' },
      { header: 'piece', align: 'left' },
      { header: 'tuning', align: 'left' },
      { header: 'reference', align: 'left' },
      { header: 'spelling', align: 'left' },
      { header: 'score', align: 'left' },
    ],
    pieces.map((p, i) => [String(i + 1), p.title, p.tuning.id, formatReference(p.reference), pieceSpelling(p), p.scorePath ?? '-']),
  );
}

/** `check` on a programme: its own problems, then the base setup's in its own file. Returns whether it loads. */
export function reportProgrammeCheck(file: string, io: CommandIo): ProgrammeCheck {
  const check = checkProgramme(readTextFile(file), file);
  for (const problem of check.problems) io.stderr.write(formatProblem(file, problem, check.source) + '\n');
  const setupName = check.setupFile && shortPath(check.setupFile);
  if (check.setup && setupName) for (const problem of check.setup.problems) io.stderr.write(formatProblem(setupName, problem, check.setup.source) + '\n');
  if (check.programme) {
    const p = check.programme;
    io.stdout.write(`${file}: ok: programme${p.name ? ` "${p.name}"` : ''}, ${p.pieces.length} piece${p.pieces.length === 1 ? '' : 's'} on ${setupName}\n`);
    return check;
  }
  const count = check.problems.filter((p) => !p.warning && p.path !== '$.setup').length + (check.setup?.problems.filter((p) => !p.warning).length ?? 0);
  throw new UserError(`${file}: ${count} problem${count === 1 ? '' : 's'}`);
}

export function registerProgramme(program: Command, io: CommandIo): void {
  program
    .command('programme')
    .description('print a concert programme as a running order: each piece with its tuning, reference, spelling and score')
    .argument('<concert.json>', 'a programme file (run "diesis check" on it to see every problem)')
    .action((file: string) => {
      const programme = loadProgrammeFile(file);
      io.stdout.write(`${programme.name ?? file}  (setup ${programme.base.json.name ?? shortPath(programme.setupFile)})\n`);
      io.stdout.write(runningOrder(programme.pieces) + '\n');
    });
}
