import { createWriteStream, type WriteStream } from 'node:fs';
import { formatSpelledPitch } from '../pitch/index.js';
import type { RouterEvent } from '../router/router.js';
import { createRouter, type EngineOptionsInput } from '../router/setup.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import { UserError } from '../util/errors.js';
import { enableMidi } from '../io/midi-system.js';
import type { CommandIo } from '../cli/io.js';
import { makeStyle, wantsColour } from '../cli/style.js';
import { writeOutputFile } from '../util/files.js';
import { Bridge } from './bridge.js';
import { LiveView } from './display.js';
import { Recorder } from './recorder.js';

export interface SessionOptions {
  readonly inputs: readonly string[];
  readonly output: string;
  readonly engine: EngineOptionsInput;
  readonly speller: ControlledSpeller;
  readonly strategy: string;
  readonly title: string;
  /** Wait for missing ports instead of failing. */
  readonly wait?: boolean | undefined;
  readonly quiet?: boolean | undefined;
  /** Print one line per decision even on a terminal (the demo). */
  readonly lines?: boolean | undefined;
  readonly logFile?: string | undefined;
  readonly recordFile?: string | undefined;
  /** Files the session reads (tuning, setup, sample set): never replaced by the log or the take. */
  readonly inputFiles?: readonly string[] | undefined;
  readonly ascii?: boolean | undefined;
  readonly virtualOnly?: boolean | undefined;
  /** Also hears every engine decision (the demo checks what the synth sounded against them). */
  readonly onEvent?: ((event: RouterEvent) => void) | undefined;
}

/** A running performance: `stop` ends every note, then closes the log and writes the take. */
export interface Session {
  readonly bridge: Bridge;
  panic(): void;
  stop(reason: string): void;
}

function logLine(e: RouterEvent): string {
  const { pitch, ...rest } = e as RouterEvent & { pitch?: Parameters<typeof formatSpelledPitch>[0] };
  return JSON.stringify(pitch ? { ...rest, spelling: formatSpelledPitch(pitch) } : rest) + '\n';
}

const sleep = (ms: number): Promise<void> => new Promise((resolve) => setTimeout(resolve, ms));

export async function startSession(options: SessionOptions, io: CommandIo): Promise<Session> {
  await enableMidi({ virtualOnly: options.virtualOnly });
  if (options.wait) {
    let told = false;
    while (!Bridge.portsPresent(options.inputs, options.output)) {
      if (!told) io.stderr.write(`diesis: waiting for ${[...options.inputs, options.output].map((p) => `"${p}"`).join(', ')}…\n`);
      told = true;
      await sleep(250);
    }
  }
  let log: WriteStream | undefined;
  if (options.logFile) {
    log = createWriteStream(options.logFile, { flags: 'a' });
    log.on('error', (error) => io.stderr.write(`diesis: ${options.logFile}: cannot be written (${error.message})\n`));
  }
  const screen = io.stdout.isTTY === true && !options.quiet && !options.lines;
  const style = makeStyle(wantsColour(io.stdout));
  const recorder = options.recordFile ? new Recorder() : undefined;
  let bridge: Bridge | undefined;
  let view: LiveView | undefined;
  const lines = !screen && !options.quiet;
  const print = (line: string | undefined): void => {
    if (line !== undefined && lines) io.stdout.write(line + '\n');
  };
  const router = createRouter({
    ...options.engine,
    speller: options.speller,
    observer: (e) => {
      options.onEvent?.(e);
      log?.write(logLine(e));
      if (screen) view?.event(e);
      else if (lines) print(view?.line(e));
    },
  });
  view = new LiveView(
    {
      router,
      speller: options.speller,
      strategy: options.strategy,
      title: options.title,
      lostMessages: () => bridge?.lostMessages ?? 0,
      ports: () => ({ inputs: bridge?.inputsConnected ?? [], output: bridge?.outputConnected ?? false }),
    },
    style,
    { accidentals: options.ascii ? 'ascii' : 'unicode' },
  );
  bridge = Bridge.open({ inputs: options.inputs, output: options.output, router, recorder, onNotice: (n) => print(view?.notice(n)) });
  const redraw = screen ? setInterval(() => io.stdout.write(`\u001b[H\u001b[2J${view?.frame() ?? ''}\n`), 100) : undefined;
  const opened = bridge;
  let stopped = false;
  return {
    bridge: opened,
    panic: () => opened.panic('panic key'),
    stop(reason) {
      if (stopped) return;
      stopped = true;
      opened.stop(reason);
      if (redraw) clearInterval(redraw);
      log?.end();
      if (recorder && options.recordFile) {
        try {
          writeOutputFile('--record', options.recordFile, 'midi', recorder.toMidiFile(), options.inputFiles);
        } catch (error) {
          io.stderr.write(`diesis: ${error instanceof UserError ? error.message : String(error)}\n`);
        }
      }
    },
  };
}
