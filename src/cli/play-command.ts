import type { Command } from 'commander';
import { disableMidi, enableMidi, listPorts } from '../io/midi-system.js';
import { startSession, type Session, type SessionOptions } from '../live/session.js';
import { formatRange } from '../pitch/index.js';
import { UserError } from '../util/errors.js';
import { checkSessionOutputs, engineInputFiles } from './command-files.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import type { CommandIo } from './io.js';
import { channelsOf, describeSetup } from './render-command.js';
import { renderTable } from './table.js';
import { numberOption } from './options.js';

/** Exit codes: 0 quit, 130 SIGINT (Ctrl-C), 143 SIGTERM, 129 SIGHUP (terminal closed), 70 an internal error. */
export const EXIT_CODES = { quit: 0, SIGINT: 130, SIGTERM: 143, SIGHUP: 129, error: 70 } as const;

interface PlayOptions extends EngineCliOptions {
  in?: string[];
  out?: string;
  wait?: boolean;
  quiet?: boolean;
  log?: string;
  record?: string;
  ascii?: boolean;
  stopAfter?: number;
}

/**
 * Runs a session until the player quits, a signal arrives, an error escapes or `stopAfter`
 * passes; every one of these ends with the panic sequence sent before the process exits.
 */
export async function runUntilStopped(options: SessionOptions, io: CommandIo, stopAfterSeconds?: number): Promise<number> {
  const session: Session = await startSession(options, io);
  return new Promise<number>((resolve) => {
    const cleanups: Array<() => void> = [];
    const finish = (reason: string, code: number): void => {
      session.stop(reason);
      for (const c of cleanups) c();
      resolve(code);
    };
    const on = (event: NodeJS.Signals, code: number): void => {
      const handler = (): void => finish(event, code);
      process.once(event, handler);
      cleanups.push(() => process.removeListener(event, handler));
    };
    on('SIGINT', EXIT_CODES.SIGINT);
    on('SIGTERM', EXIT_CODES.SIGTERM);
    on('SIGHUP', EXIT_CODES.SIGHUP);
    const crash = (error: unknown): void => {
      io.stderr.write(`diesis: internal error: ${error instanceof Error ? error.message : String(error)}\n`);
      finish('internal error', EXIT_CODES.error);
    };
    process.once('uncaughtException', crash);
    process.once('unhandledRejection', crash);
    cleanups.push(() => {
      process.removeListener('uncaughtException', crash);
      process.removeListener('unhandledRejection', crash);
    });
    if (stopAfterSeconds !== undefined) {
      const timer = setTimeout(() => finish('the end', EXIT_CODES.quit), stopAfterSeconds * 1000);
      cleanups.push(() => clearTimeout(timer));
    }
    const stdin = process.stdin;
    if (stdin.isTTY && !options.quiet) {
      stdin.setRawMode(true);
      stdin.resume();
      const key = (data: Buffer): void => {
        const text = data.toString();
        if (text === '\u0003') finish('SIGINT', EXIT_CODES.SIGINT); // Ctrl-C while the terminal is raw
        else if (text === 'q') finish('quit', EXIT_CODES.quit);
        else if (text === 'p' || text === ' ') session.panic();
      };
      stdin.on('data', key);
      cleanups.push(() => {
        stdin.removeListener('data', key);
        stdin.setRawMode(false);
        stdin.pause();
      });
    }
  });
}

export function registerPlay(program: Command, io: CommandIo): void {
  const command = program
    .command('play')
    .description('the live bridge: keyboard (and pedals) in, a synth out, every note spelled and tuned')
    .option('--in <port>', 'input port: name (case-insensitive substring) or index; repeat to merge inputs', (v: string, all: string[] = []) => [...all, v])
    .option('--out <port>', 'output port: name (case-insensitive substring) or index')
    .option('--wait', 'wait for missing ports instead of failing')
    .option('--quiet', 'no display')
    .option('--log <file.jsonl>', 'append every decision to a JSON Lines file')
    .option('--record <file.mid>', 'write the take (input and output tracks) as a Standard MIDI File at the end')
    .option('--ascii', 'write # and b instead of ♯ and ♭')
    .option('--stop-after <seconds>', 'stop by itself after this long (for scripted runs)', numberOption('--stop-after', 0, 86_400));
  addEngineOptions(command).action(async (cli: PlayOptions) => {
    const resolved = resolveEngineCli(cli);
    const inputs = cli.in ?? [];
    if (inputs.length === 0 || !cli.out) throw new UserError('play needs --in PORT and --out PORT (run "diesis ports" to list them)', 2);
    const inputFiles = engineInputFiles(resolved);
    checkSessionOutputs(cli.log, cli.record, inputFiles);
    const { engine, title } = sessionTitle(resolved);
    const code = await runUntilStopped(
      { inputs, output: cli.out, engine, speller: resolved.speller, strategy: resolved.strategy, title, wait: cli.wait, quiet: cli.quiet, logFile: cli.log, recordFile: cli.record, inputFiles, ascii: cli.ascii },
      io,
      cli.stopAfter,
    );
    await disableMidi();
    process.exitCode = code;
  });

  program
    .command('demo')
    .description('the live bridge on a built-in performance, through virtual ports: no hardware needed')
    .action(async () => {
      const { runDemo } = await import('../live/demo.js');
      process.exitCode = await runDemo(io);
    });

  program
    .command('ports')
    .description('list the MIDI inputs and outputs')
    .action(async () => {
      await enableMidi();
      const { inputs, outputs } = listPorts();
      for (const [label, ports] of [['inputs', inputs], ['outputs', outputs]] as const) {
        if (ports.length === 0) {
          io.stdout.write(`no MIDI ${label}\n`);
          continue;
        }
        io.stdout.write(`${label}\n`);
        io.stdout.write(
          renderTable(
            [
              { header: 'index', align: 'right' },
              { header: 'name', align: 'left' },
              { header: 'manufacturer', align: 'left' },
              { header: 'state', align: 'left' },
            ],
            ports.map((p) => [String(p.index), p.name, p.manufacturer, p.state]),
          ) + '\n',
        );
      }
      await disableMidi();
    });
}

export function sessionTitle(resolved: ReturnType<typeof resolveEngineCli>): { engine: SessionOptions['engine']; title: string } {
  const { options, preset, speller, strategy } = resolved;
  const channels = channelsOf({ mode: options.mode ?? 'bend', channels: options.channels ?? [], sampleLayout: options.sampleLayout });
  const title = `diesis · ${describeSetup(preset.name, options.reference, options.mode ?? 'bend', options.layout ?? 'mpe', channels)} · ${strategy} from ${formatRange(speller.currentWindow())}`;
  return { engine: options, title };
}
