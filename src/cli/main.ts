import { Command, CommanderError } from 'commander';
import { disableMidi } from '../io/midi-system.js';
import { UserError } from '../util/errors.js';
import { registerChart } from './chart-command.js';
import type { CommandEnd, CommandIo } from '../util/io.js';
import { registerPresetCommands } from './preset-commands.js';
import { registerRender } from './render-command.js';
import { registerSpell } from './spell-command.js';
import { registerPlay } from './play-command.js';
import { registerProgramme } from './programme-command.js';
import { registerSamples } from './samples-command.js';
import { registerSynthCheck } from './synth-check-command.js';

const VERSION = '0.1.0';

/** A commander error as one line: "error: " dropped, a suggestion on the same line in diesis's words ("…: did you mean chart?"). */
function oneLine(message: string): string {
  return message
    .replace(/^error: /u, '')
    .trim()
    .replace(/\s*\n\(Did you mean (.*)\)$/u, ': did you mean $1')
    .replace(/\s*\n\s*/gu, ' ');
}

export function buildProgram(io: CommandIo, end: CommandEnd = { code: 0 }): Command {
  const program = new Command('diesis')
    .description('spell each key the way the music means it and sound it in tune: meantone, Pythagorean, just and well temperaments over MIDI')
    .version(VERSION)
    .exitOverride()
    .configureOutput({
      writeOut: (s) => io.stdout.write(s),
      writeErr: (s) => io.stderr.write(s),
      outputError: (s, write) => write(`diesis: ${oneLine(s)}\n`),
    });
  registerChart(program, io);
  registerPresetCommands(program, io);
  registerRender(program, io);
  registerSpell(program, io);
  registerPlay(program, io, end);
  registerProgramme(program, io);
  registerSamples(program, io);
  registerSynthCheck(program, io, end);
  for (const command of program.commands) command.exitOverride().configureOutput(program.configureOutput());
  return program;
}

/** Runs the CLI; resolves to the process exit code. A UserError prints as one line. */
export async function main(argv: readonly string[], io: CommandIo = { stdout: process.stdout, stderr: process.stderr }): Promise<number> {
  const end: CommandEnd = { code: 0 };
  const program = buildProgram(io, end);
  // `diesis help NAME` when there is no command NAME: commander would print the whole help as the
  // error; asking for NAME itself gives the one line (and suggestion) of any unknown command instead.
  const [node = 'node', script = 'diesis', first, second] = argv;
  const noSuchHelp = first === 'help' && second !== undefined && !second.startsWith('-') && !program.commands.some((c) => c.name() === second);
  try {
    await program.parseAsync(noSuchHelp ? [node, script, second] : [...argv]);
    return end.code;
  } catch (error) {
    if (error instanceof CommanderError) return error.exitCode === 1 ? 2 : error.exitCode;
    const cause = error instanceof CommanderError ? undefined : error;
    if (cause instanceof UserError) {
      io.stderr.write(`diesis: ${cause.message}\n`);
      return cause.exitCode;
    }
    throw error;
  } finally {
    await disableMidi(); // let the process end: an open MIDI system keeps it alive
  }
}
