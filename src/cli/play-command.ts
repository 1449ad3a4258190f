import { basename, extname } from 'node:path';
import type { Command } from 'commander';
import { disableMidi, enableMidi, listPorts, midiSystemNote } from '../io/midi-system.js';
import { runUntilStopped } from '../live/run.js';
import type { SessionOptions } from '../live/session.js';
import { formatRange } from '../pitch/index.js';
import { resolveEngineOptions } from '../router/setup.js';
import { UserError } from '../util/errors.js';
import { checkSessionOutputs, engineInputFiles } from './command-files.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import type { CommandEnd, CommandIo } from '../util/io.js';
import { describeSetup } from './render-command.js';
import { renderTable } from '../text/table.js';
import { integerOption, numberOption } from './options.js';
import { stagePageRequest, type StagePageCli } from '../page/stage-cli.js';
import { addListenOptions, runListenCommand, type ListenCli } from './ports-learn.js';
import { openConcert } from './concert-cli.js';

interface PlayOptions extends EngineCliOptions, StagePageCli {
  in?: string[];
  out?: string;
  wait?: boolean;
  quiet?: boolean;
  log?: string;
  record?: string;
  ascii?: boolean;
  stopAfter?: number;
  programme?: string;
  resume?: boolean;
  fromStart?: boolean;
}

export function registerPlay(program: Command, io: CommandIo, end: CommandEnd): void {
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
    .option('--stop-after <seconds>', 'stop by itself after this long (for scripted runs)', numberOption('--stop-after', 0, 86_400))
    .option('--page [port]', 'serve the stage page for a tablet on the music stand (default port 8421; this computer only)', integerOption('--page', 0, 65_535))
    .option('--page-host <address>', 'open the stage page to the network on this address (0.0.0.0: every one); a token is then required')
    .option('--programme <concert.json>', 'play a concert programme: its base setup, piece after piece (next-piece and previous-piece controls, or the stage page)')
    .option('--resume', 'with --programme: start at the piece where the concert was when diesis last stopped')
    .option('--from-start', 'with --programme: start at the first piece, wherever the concert was');
  addEngineOptions(command).action(async (cli: PlayOptions) => {
    if (cli.programme === undefined && (cli.resume || cli.fromStart)) throw new UserError(`${cli.resume ? '--resume' : '--from-start'} belongs with --programme`, 2);
    const concert = cli.programme === undefined ? undefined : await openConcert(cli, io);
    const resolved = resolveEngineCli(concert ? { ...cli, setup: concert.programme.setupFile } : cli);
    if (concert) concert.useBase(resolved.options);
    const inputs = cli.in ?? [];
    if (inputs.length === 0 || !cli.out) throw new UserError('play needs --in PORT and --out PORT (run "diesis ports" to list them)', 2);
    const inputFiles = [...engineInputFiles(resolved), ...(concert ? [concert.programme.file] : [])];
    checkSessionOutputs(cli.log, cli.record, inputFiles);
    const titled = sessionTitle(resolved);
    const engine = concert ? { ...titled.engine, pieces: concert.pieces } : titled.engine;
    const title = concert ? `diesis · ${concert.programme.name ?? basename(concert.programme.file)} · ${concert.programme.pieces.length} pieces` : titled.title;
    const code = await runUntilStopped(
      {
        inputs,
        output: cli.out,
        engine,
        speller: resolved.speller,
        strategy: resolved.strategy,
        title,
        wait: cli.wait,
        quiet: cli.quiet,
        logFile: cli.log,
        recordFile: cli.record,
        inputFiles,
        ascii: cli.ascii,
        page: stagePageRequest(cli, { pieceTitle: cli.setup ? basename(cli.setup, extname(cli.setup)) : 'diesis', tuningId: resolved.preset.id, tuningName: resolved.preset.name }),
        startPiece: concert?.start,
        onEvent: concert?.onEvent,
      },
      io,
      cli.stopAfter,
    );
    await disableMidi();
    end.code = code;
  });

  program
    .command('demo')
    .description('the live bridge on a built-in performance, through virtual ports: no hardware needed; serves the stage page')
    .option('--loop', 'play the piece again and again until q or Ctrl-C, to watch the stage page (the default on a terminal)')
    .option('--once', 'play the piece once and end (the default off a terminal)')
    .option('--page [port]', 'the stage page’s port (default 8421, or any free one when that is taken)', integerOption('--page', 0, 65_535))
    .option('--page-host <address>', 'open the stage page to the network on this address; a token is then required')
    .option('--no-page', 'do not serve the stage page')
    .action(async (cli: StagePageCli & { loop?: boolean; once?: boolean }) => {
      if (cli.loop && cli.once) throw new UserError('demo: --loop and --once cannot both be given', 2);
      const { runDemo } = await import('../live/demo.js');
      // A player at a terminal can press q; a script cannot, so off a terminal the piece plays once.
      const loop = cli.loop === true || (cli.once !== true && process.stdin.isTTY === true);
      end.code = await runDemo(io, { loop, page: cli });
    });

  const portsCommand = program
    .command('ports')
    .description('list the MIDI inputs and outputs; --watch shows what a pedal or key sends, --learn binds it in a setup')
    .action(async (cli: ListenCli) => {
      if (Object.keys(cli).length > 0) {
        end.code = await runListenCommand(cli, io); // --watch, --learn (src/cli/ports-learn.ts)
        return;
      }
      await enableMidi();
      const { inputs, outputs } = listPorts();
      const note = midiSystemNote();
      if (note && inputs.length === 0 && outputs.length === 0) {
        io.stdout.write(`${note}\n`); // once, instead of "no MIDI inputs" and "no MIDI outputs"
        await disableMidi();
        return;
      }
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
  addListenOptions(portsCommand);
}

export function sessionTitle(resolved: ReturnType<typeof resolveEngineCli>): { engine: SessionOptions['engine']; title: string } {
  const { options, preset, speller, strategy } = resolved;
  const title = `diesis · ${describeSetup(preset.name, resolveEngineOptions(options))} · ${strategy} from ${formatRange(speller.currentWindow())}`;
  return { engine: options, title };
}
