import { createInterface } from 'node:readline/promises';
import { Concert } from '../live/concert.js';
import { readConcertPlace, startingPiece, writeConcertPlace, type ResumeChoice } from '../live/concert-position.js';
import { loadProgrammeFile, type ProgrammeFile } from '../presets/programme-file.js';
import type { RouterEvent } from '../router/router.js';
import { UserError } from '../util/errors.js';
import type { CommandIo } from '../util/io.js';
import type { EngineCliOptions } from './engine-options.js';
import type { EngineOptionsInput } from '../router/setup.js';

/** What `play --programme` adds to a session: the pieces, where to begin, and keeping the place. */
export interface OpenConcert {
  readonly programme: ProgrammeFile;
  readonly pieces: Concert;
  readonly start: number;
  /** Hears the engine's events: on each new piece the place is kept (after the MIDI path has moved on). */
  readonly onEvent: (e: RouterEvent) => void;
  /** The engine options of the base setup and the command line, for what pieces do not change. */
  useBase(options: EngineOptionsInput): void;
}

/** The options a programme's pieces set: given beside --programme they would be overridden at the first piece. */
const PIECE_OPTIONS: ReadonlyArray<readonly [keyof EngineCliOptions, string]> = [
  ['setup', '--setup'],
  ['tuning', '--tuning'],
  ['ref', '--ref'],
  ['spelling', '--spelling'],
  ['key', '--key'],
  ['window', '--window'],
  ['score', '--score'],
];

/** Asks on the terminal; Enter or an answer starting with y is yes. */
async function askYes(question: string): Promise<boolean> {
  const rl = createInterface({ input: process.stdin, output: process.stderr });
  try {
    const text = (await rl.question(question)).trim().toLowerCase();
    return text === '' || text.startsWith('y');
  } finally {
    rl.close();
  }
}

/** Loads the programme (every problem refused before anything starts) and decides where the concert begins. */
export async function openConcert(cli: EngineCliOptions & { programme?: string; resume?: boolean; fromStart?: boolean }, io: CommandIo): Promise<OpenConcert> {
  const file = cli.programme!;
  for (const [option, flag] of PIECE_OPTIONS) {
    if (cli[option] !== undefined) throw new UserError(`${flag} cannot be given with --programme: the programme's base setup and its pieces set it`, 2);
  }
  if (cli.resume && cli.fromStart) throw new UserError('--resume and --from-start cannot both be given', 2);
  const programme = loadProgrammeFile(file);
  const choice: ResumeChoice = cli.resume ? 'resume' : cli.fromStart ? 'from-start' : process.stdin.isTTY && process.stderr.isTTY ? 'ask' : 'tell';
  const titles = programme.pieces.map((p) => p.title);
  const { index, note } = await startingPiece(readConcertPlace(file), titles, choice, askYes);
  if (note) io.stderr.write(`diesis: ${note}\n`);
  let pieces = new Concert(programme);
  let warned = false;
  return {
    programme,
    get pieces() {
      return pieces;
    },
    start: index,
    useBase(options) {
      pieces = new Concert(programme, options);
    },
    onEvent(e) {
      if (e.type !== 'piece') return;
      const place = { index: e.index, title: e.title };
      setImmediate(() => {
        try {
          writeConcertPlace(file, place, [file, programme.setupFile]);
        } catch (error) {
          if (!(error instanceof UserError)) throw error;
          if (!warned) io.stderr.write(`diesis: the concert's place is not kept: ${error.message}\n`);
          warned = true;
        }
      });
    },
  };
}
