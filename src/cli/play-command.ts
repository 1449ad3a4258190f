import type { Command } from 'commander';
import { disableMidi, enableMidi, listPorts } from '../io/midi-system.js';
import { runUntilStopped } from '../live/run.js';
import type { SessionOptions } from '../live/session.js';
import { formatRange } from '../pitch/index.js';
import { resolveEngineOptions } from '../router/setup.js';
import { UserError } from '../util/errors.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import type { CommandIo } from '../util/io.js';
import { describeSetup } from './render-command.js';
import { renderTable } from '../text/table.js';
import { numberOption } from './options.js';

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

export function registerPlay(program: Command, io: CommandIo): void {
  const command = program
    .command('play')
    .description('the live bridge: keyboard (and pedals) in, a synth out, every note spelled and tuned')
    .option('--in <port>', 'input port: name (case-insensitive substring) or index; repeat to merge inputs', (v: string, all: string[] = []) => [...all, v])
    .option('--out <port>', 'output port: name (case-insensitive substring) or index')
    .option('--wait', 'wait for missing ports instead of failing')
    .option('--quiet', 'no display')
    .option('--log <file>', 'append every decision to a JSON Lines file')
    .option('--record <file.mid>', 'write the take (input and output tracks) as a Standard MIDI File at the end')
    .option('--ascii', 'write # and b instead of ♯ and ♭')
    .option('--stop-after <seconds>', 'stop by itself after this long (for scripted runs)', numberOption('--stop-after', 0, 86_400));
  addEngineOptions(command).action(async (cli: PlayOptions) => {
    const resolved = resolveEngineCli(cli);
    const inputs = cli.in ?? [];
    if (inputs.length === 0 || !cli.out) throw new UserError('play needs --in PORT and --out PORT (run "diesis ports" to list them)', 2);
    const { engine, title } = sessionTitle(resolved);
    const code = await runUntilStopped(
      { inputs, output: cli.out, engine, speller: resolved.speller, strategy: resolved.strategy, title, wait: cli.wait, quiet: cli.quiet, logFile: cli.log, recordFile: cli.record, ascii: cli.ascii },
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
  const title = `diesis · ${describeSetup(preset.name, resolveEngineOptions(options))} · ${strategy} from ${formatRange(speller.currentWindow())}`;
  return { engine: options, title };
}
