import { createWriteStream, type WriteStream } from 'node:fs';
import { formatSpelledPitch } from '../pitch/index.js';
import { formatReference } from '../tuning/index.js';
import type { RouterEvent } from '../router/router.js';
import { createEngine, type EngineOptionsInput } from '../router/setup.js';
import { channelOf, keyOfNote, sourceOf } from '../midi/note-id.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import { UserError } from '../util/errors.js';
import { enableMidi, midiSystemNote } from '../io/midi-system.js';
import type { CommandIo } from '../util/io.js';
import { makeStyle, wantsColour } from '../text/style.js';
import { outputNumber } from '../text/output-numbers.js';
import { writeOutputFile } from '../util/files.js';
import { Bridge, type BridgeNotice } from './bridge.js';
import { LiveView } from './display.js';
import { Recorder } from './recorder.js';
import { openStagePage, type StageLink, type StagePageRequest } from '../page/stage-link.js';
import type { StageControlResult } from '../page/stage-state.js';

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
  /** Also serve the stage page (src/page). */
  readonly page?: StagePageRequest | undefined;
  /** Ends the wait for missing ports (`--stop-after` counts from the start, waiting included). */
  readonly stopWaiting?: AbortSignal | undefined;
  /** A concert programme (its pieces are in `engine.pieces`): the piece to begin with, 0-based. */
  readonly startPiece?: number | undefined;
}

/** Thrown by `startSession` when `stopWaiting` fires while it still waits for a port. */
export class StoppedWhileWaiting extends Error {
  constructor() {
    super('stopped while waiting for the ports');
  }
}

/** A running performance: `stop` ends every note, then closes the log and writes the take. */
export interface Session {
  readonly bridge: Bridge;
  readonly page: StageLink | undefined;
  panic(): void;
  stop(reason: string): void;
}

/**
 * One JSON line per event: spellings as names, a note's identity as source, channel (1–16) and
 * key; figures rounded as the other JSON outputs round them (`outputNumber`: time in ms to the
 * microsecond, Hz to 6 places, cents to 4).
 */
export function logLine(e: RouterEvent): string {
  const time = outputNumber(e.time, 'milliseconds');
  if (e.type === 'tuning') return JSON.stringify({ type: e.type, time, tuning: e.tuningId, name: e.name, reference: formatReference(e.reference) }) + '\n';
  const fields: Record<string, unknown> = { ...e, time };
  if (e.type === 'note') {
    fields.hz = outputNumber(e.hz, 'hz');
    fields.cents = outputNumber(e.cents, 'cents');
    if (e.adaptive) fields.adaptive = { ...e.adaptive, fromTable: outputNumber(e.adaptive.fromTable, 'cents') };
  }
  if (e.type === 'out-of-range') fields.neededCents = outputNumber(e.neededCents, 'cents');
  if ('id' in e) {
    delete fields.id;
    Object.assign(fields, { source: sourceOf(e.id), channel: channelOf(e.id) + 1, key: keyOfNote(e.id) });
  }
  if ('pitch' in e) fields.pitch = formatSpelledPitch(e.pitch);
  if (e.type === 'note') fields.wanted = e.wanted && formatSpelledPitch(e.wanted);
  if ('pitch' in e) {
    fields.spelling = fields.pitch;
    delete fields.pitch;
  }
  return JSON.stringify(fields) + '\n';
}

const sleep = (ms: number): Promise<void> => new Promise((resolve) => setTimeout(resolve, ms));

export async function startSession(options: SessionOptions, io: CommandIo): Promise<Session> {
  await enableMidi({ virtualOnly: options.virtualOnly });
  if (options.wait) {
    const note = midiSystemNote();
    if (note) throw new UserError(`--wait: ${note.replace(/: only virtual ports$/u, '')}, so no port can appear`);
    let told = false;
    while (!Bridge.portsPresent(options.inputs, options.output)) {
      if (options.stopWaiting?.aborted) throw new StoppedWhileWaiting();
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
  const page = options.page ? await openStagePage(options.page) : undefined;
  if (page && !screen) io.stderr.write(`${page.banner}\n`);
  let bridge: Bridge | undefined;
  let view: LiveView | undefined;
  const lines = !screen && !options.quiet;
  const print = (line: string | undefined): void => {
    if (line !== undefined && lines) io.stdout.write(line + '\n');
  };
  let countPieces = (): void => undefined;
  const { router, tally } = createEngine({
    ...options.engine,
    speller: options.speller,
    observer: (e) => {
      if (e.type === 'piece') countPieces();
      options.onEvent?.(e);
      page?.event(e);
      log?.write(logLine(e));
      if (screen) view?.event(e);
      else if (lines) print(view?.line(e));
    },
  });
  view = new LiveView(
    {
      tally,
      speller: options.speller,
      strategy: options.strategy,
      title: page && screen ? `${options.title}\n${page.banner}` : options.title,
      lostMessages: () => bridge?.lostMessages ?? 0,
      ports: () => bridge?.portStates() ?? { inputs: options.inputs.map((name) => ({ name, connected: false })), output: { name: options.output, connected: false } },
    },
    style,
    { accidentals: options.ascii ? 'ascii' : 'unicode' },
  );
  const onNotice = (n: BridgeNotice): void => {
    page?.notice(n);
    print(view?.notice(n));
  };
  try {
    bridge = Bridge.open({ inputs: options.inputs, output: options.output, router, recorder, onNotice });
  } catch (error) {
    await page?.stop();
    throw error;
  }
  const redraw = screen ? setInterval(() => io.stdout.write(`\u001b[H\u001b[2J${view?.frame() ?? ''}\n`), 100) : undefined;
  const opened = bridge;
  if (options.startPiece !== undefined) opened.send(router.goToPiece(performance.now(), options.startPiece).messages);
  let pieceChanges = 0;
  const piece = options.engine.pieces
    ? (step: 1 | -1): StageControlResult => {
        const before = pieceChanges;
        opened.send(router.act(performance.now(), { action: { name: step > 0 ? 'next-piece' : 'previous-piece' }, on: true }));
        return pieceChanges > before ? { ok: true } : { ok: false, reason: step > 0 ? 'this is the last piece of the programme' : 'this is the first piece of the programme' };
      }
    : undefined;
  countPieces = () => pieceChanges++;
  page?.attach({ router, speller: options.speller, tuning: options.engine.tuning, reference: options.engine.reference, strategy: options.strategy, send: (m) => opened.send(m), clock: () => performance.now(), synthConnected: () => opened.outputConnected, piece });
  let stopped = false;
  return {
    bridge: opened,
    page,
    panic: () => opened.panic('panic key'),
    stop(reason) {
      if (stopped) return;
      stopped = true;
      opened.stop(reason);
      if (redraw) clearInterval(redraw);
      void page?.stop();
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
