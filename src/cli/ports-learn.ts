import { existsSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { createInterface } from 'node:readline/promises';
import type { Command } from 'commander';
import { enableMidi } from '../io/midi-system.js';
import { listenToInputs } from '../live/listen.js';
import { EXIT_CODES } from '../live/run.js';
import { describeGesture, GestureTracker, type Gesture } from '../midi/gesture.js';
import { describeMessage } from '../midi/heard.js';
import { addControlText, compactJson, controlOf, latchApplies, newSetupText, type LearnedAction } from '../presets/learned-control.js';
import { formatProblem } from '../presets/problems.js';
import { checkSetup } from '../presets/setup-file.js';
import { ACTION_NAMES, ACTIONS, type ActionName } from '../spelling/control-map.js';
import { parseKey } from '../spelling/keys.js';
import { UserError } from '../util/errors.js';
import { kindOfName, readTextFile, writeAgreedText } from '../util/files.js';
import type { CommandIo } from '../util/io.js';
import { numberOption } from './options.js';

// `diesis ports --watch` shows what each pedal, key and button sends, in a player's words;
// `diesis ports --learn` binds the next one to an action in a setup. A setup the player wrote is
// theirs: it is changed only when they say so (`--force`, or "y" at the question on a terminal),
// and `--save-as NEW.json` writes a copy with the new control instead.

export interface ListenCli {
  watch?: boolean;
  learn?: boolean;
  in?: string[];
  into?: string;
  saveAs?: string;
  action?: string;
  key?: string;
  latch?: boolean;
  force?: boolean;
  stopAfter?: number;
}

/** Asks the player a question on the terminal and gives the answer (undefined off a terminal). */
export type Asker = (question: string) => Promise<string>;

export function addListenOptions(command: Command): Command {
  return command
    .option('--watch', 'show what each pedal, key and button sends, in words, until q or Ctrl-C')
    .option('--learn', 'bind the next pedal, key switch or program button you press to an action (with --into, in a setup)')
    .option('--in <port>', 'listen to this input only (name or index); repeat for several (default: every input)', (v: string, all: string[] = []) => [...all, v])
    .option('--into <setup.json>', 'learn: the setup to add the control to (made when it does not exist)')
    .option('--save-as <new.json>', 'learn: write the setup with the new control here, and leave --into as it is')
    .option('--action <name>', `learn: what the control does: ${ACTION_NAMES.join(', ')}`)
    .option('--key <key>', 'learn: the key for set-key, as in "D minor"')
    .option('--latch', 'learn: a hold action toggles on each press instead of following the pedal')
    .option('--force', 'learn: change --into even though it is a setup you wrote (your comments stay)')
    .option('--stop-after <seconds>', 'stop listening after this long (for scripted runs)', numberOption('--stop-after', 0, 86_400));
}

/** A terminal's question-and-answer, when stdin is a terminal. */
export function terminalAsker(io: CommandIo): Asker | undefined {
  if (!process.stdin.isTTY || !io.stdout.isTTY) return undefined;
  return async (question) => {
    const rl = createInterface({ input: process.stdin, output: process.stdout });
    try {
      return (await rl.question(question)).trim();
    } finally {
      rl.close();
    }
  };
}

/**
 * Runs `ports --watch` or `--learn`; resolves to the exit code: for --watch, as for `play` (0 after
 * q or --stop-after, 130, 143 or 129 after a signal; `EXIT_CODES` in src/live/run.ts).
 */
export async function runListenCommand(cli: ListenCli, io: CommandIo, ask: Asker | undefined = terminalAsker(io)): Promise<number> {
  if (cli.watch && cli.learn) throw new UserError('ports: --watch and --learn cannot both be given', 2);
  const learnOnly = (['into', 'saveAs', 'action', 'key', 'latch', 'force'] as const).find((o) => cli[o] !== undefined);
  if (cli.watch) {
    if (learnOnly) throw new UserError(`ports --watch: ${flagOf(learnOnly)} belongs to --learn`, 2);
    return watch(cli, io);
  }
  await learn(cli, io, ask);
  return EXIT_CODES.quit;
}

/** An option as it is written on the command line: saveAs → --save-as. */
const flagOf = (name: string): string => `--${name.replace(/[A-Z]/gu, (c) => `-${c.toLowerCase()}`)}`;

/** Why listening ended: a gesture (learn), or the player (q, Ctrl-C), a signal or the time, with the exit code that stop means. */
type Ending = { readonly kind: 'gesture'; readonly gesture: Gesture; readonly input: string } | { readonly kind: 'stopped'; readonly why: string; readonly code: number };

/** Listens until `onGesture` says done, the player stops, or `--stop-after` passes. */
async function listen(cli: ListenCli, io: CommandIo, watching: boolean): Promise<Ending> {
  await enableMidi();
  const trackers = new Map<string, GestureTracker>(); // one per input, so each gesture keeps its input's name
  const trackerOf = (input: string): GestureTracker => trackers.get(input) ?? trackers.set(input, new GestureTracker()).get(input)!;
  const started = performance.now();
  return new Promise<Ending>((resolve, reject) => {
    const cleanups: Array<() => void> = [];
    let several = false;
    const end = (ending: Ending): void => {
      for (const c of cleanups.splice(0)) c();
      resolve(ending);
    };
    const heard = (input: string, gestures: readonly Gesture[]): void => {
      for (const gesture of gestures) {
        if (!watching) return end({ kind: 'gesture', gesture, input });
        if (gesture.kind === 'switch' || gesture.kind === 'continuous') io.stdout.write(`${' '.repeat(8)}→ ${several ? `${input}: ` : ''}${describeGesture(gesture)}\n`);
      }
    };
    let listening;
    try {
      listening = listenToInputs(
        cli.in ?? [],
        (input, time, message) => {
          const text = describeMessage(message);
          if (watching && text) io.stdout.write(`${((time - started) / 1000).toFixed(2).padStart(7)} ${several ? `${input}: ` : ''}${text}\n`);
          heard(input, trackerOf(input).hear(time, message));
        },
        (time) => {
          for (const [input, tracker] of trackers) heard(input, tracker.tick(time));
        },
      );
    } catch (error) {
      reject(error);
      return;
    }
    const opened = listening;
    cleanups.push(() => opened.stop());
    several = opened.names.length > 1;
    const names = opened.names.map((n) => `"${n}"`).join(', ');
    const quit = process.stdin.isTTY ? 'q or Ctrl-C' : 'Ctrl-C';
    io.stdout.write(watching ? `listening to ${names}: press pedals, keys and buttons to see what they send; ${quit} ends\n` : `listening to ${names}: press the pedal (and let it go), the key switch or the button for ${cli.action ?? 'the control'}; ${quit} gives up\n`);
    for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) {
      const handler = (): void => end({ kind: 'stopped', why: signal === 'SIGINT' ? 'stopped by Ctrl-C' : `stopped by ${signal}`, code: EXIT_CODES[signal] });
      process.once(signal, handler);
      cleanups.push(() => process.removeListener(signal, handler));
    }
    if (cli.stopAfter !== undefined) {
      const timer = setTimeout(() => end({ kind: 'stopped', why: `nothing was heard in ${cli.stopAfter} s`, code: EXIT_CODES.quit }), cli.stopAfter * 1000);
      cleanups.push(() => clearTimeout(timer));
    }
    const stdin = process.stdin;
    if (stdin.isTTY) {
      stdin.setRawMode(true);
      stdin.resume();
      const key = (data: Buffer): void => {
        const text = data.toString();
        if (text === 'q') end({ kind: 'stopped', why: 'the player stopped', code: EXIT_CODES.quit });
        else if (text === '\u0003') end({ kind: 'stopped', why: 'stopped by Ctrl-C', code: EXIT_CODES.SIGINT }); // Ctrl-C while the terminal is raw
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

/** Watches until the player or the time stops it (listening never ends on a gesture here). */
async function watch(cli: ListenCli, io: CommandIo): Promise<number> {
  const ending = await listen(cli, io, true);
  return ending.kind === 'stopped' ? ending.code : EXIT_CODES.quit;
}

/** The action asked for, checked before anything is heard (a mistake costs no pedal presses). */
function actionFrom(name: string, cli: ListenCli): LearnedAction {
  if (!(ACTION_NAMES as readonly string[]).includes(name)) throw new UserError(`--action ${name}: not an action; give one of ${ACTION_NAMES.join(', ')}`, 2);
  const action = name as ActionName;
  const entry = ACTIONS[action];
  if ('needsKey' in entry && entry.needsKey && cli.key === undefined) throw new UserError(`--action ${action} needs --key, as in --key "D minor"`, 2);
  if (!('needsKey' in entry) && cli.key !== undefined) throw new UserError(`--key: only set-key takes a key, not ${action}`, 2);
  if (cli.key !== undefined) parseKey(cli.key, '--key');
  if (cli.latch && !latchApplies(action)) throw new UserError(`--latch: ${action} fires once on each press; only flip, force-sharps, force-flats and freeze latch`, 2);
  return { name: action, key: cli.key, latch: cli.latch };
}

/** Where the setup goes, and whether the player has already agreed to it being changed. */
interface Target {
  readonly file: string;
  /** The text the new control is added to (the --into setup), or undefined for a new setup. */
  readonly base: string | undefined;
  readonly replace: boolean;
  readonly agreed: boolean;
}

function targetOf(cli: ListenCli, ask: Asker | undefined): Target | undefined {
  if (cli.saveAs !== undefined && cli.into === undefined) throw new UserError('--save-as goes with --into SETUP (the setup to copy)', 2);
  if (cli.into === undefined) {
    if (cli.force) throw new UserError('--force goes with --into SETUP', 2);
    return undefined;
  }
  const file = cli.saveAs ?? cli.into;
  const ext = extname(file).toLowerCase();
  const other = ext === '.json' ? undefined : kindOfName(file);
  if (other) {
    const option = cli.saveAs !== undefined ? '--save-as' : '--into';
    throw new UserError(`${option} ${file}: a "${ext}" name is for ${other}, but ${option} writes a setup (.json); give a name ending in .json`, 2);
  }
  const exists = existsSync(cli.into);
  if (cli.saveAs !== undefined && !exists) throw new UserError(`--into ${cli.into}: no such file to copy (without --save-as, --into makes it)`);
  const base = exists ? readTextFile(cli.into) : undefined;
  if (base !== undefined) {
    const before = checkSetup(base, cli.into);
    const errors = before.problems.filter((p) => !p.warning);
    if (errors.length > 0) {
      throw new UserError(`${cli.into}: has ${errors.length} problem${errors.length === 1 ? '' : 's'} already (${formatProblem(cli.into, errors[0]!, before.source)}); fix ${errors.length === 1 ? 'it' : 'them'} first ("diesis check ${cli.into}")`);
    }
  }
  const replace = existsSync(file);
  if (replace && !cli.force && !ask) {
    throw new UserError(`${file}: exists, and it is your setup: diesis changes it only when you say so: add --force (your comments and layout stay), or --save-as NEW.json to write a copy with the new control`, 2);
  }
  return { file, base, replace, agreed: !replace || cli.force === true };
}

async function learn(cli: ListenCli, io: CommandIo, ask: Asker | undefined): Promise<void> {
  if (!cli.learn) throw new UserError(`ports: ${flagOf(Object.keys(cli)[0] ?? 'in')} goes with --watch or --learn`, 2);
  if (cli.action === undefined && !ask) throw new UserError('ports --learn: give --action (one of ' + ACTION_NAMES.join(', ') + '); on a terminal diesis asks', 2);
  let action = cli.action === undefined ? undefined : actionFrom(cli.action, cli);
  const target = targetOf(cli, ask);
  const ending = await listen(cli, io, false);
  if (ending.kind === 'stopped') throw new UserError(`ports --learn: ${ending.why}; nothing was learned`);
  const { gesture } = ending;
  io.stdout.write(`heard: ${describeGesture(gesture)}\n`);
  for (let tries = 1; !action; tries++) {
    const answer = await ask!(`what should it do? (${ACTION_NAMES.join(', ')}) `);
    const key = answer === 'set-key' ? await ask!('which key? (as in D minor) ') : undefined;
    try {
      action = actionFrom(answer, { ...cli, key });
    } catch (error) {
      if (!(error instanceof UserError) || tries === 3) throw error;
      io.stdout.write(`${error.message}\n`); // a slip at the terminal: ask again
    }
  }
  const control = controlOf(gesture, action);
  io.stdout.write(`control: ${compactJson(control)}\n`);
  if (!target) {
    io.stdout.write('add it to "controls" in your setup, or give --into SETUP to have diesis write it\n');
    return;
  }
  const text = target.base !== undefined ? addControlText(target.base, control) : newSetupText(control, basename(target.file, extname(target.file)));
  const check = checkSetup(text, target.file);
  const index = target.base === undefined ? 0 : (checkSetup(target.base, target.file).setup?.json.controls?.length ?? 0);
  // Every error, and the warnings about the new control (the setup's own were the player's before).
  const shown = check.problems.filter((p) => !p.warning || p.path.startsWith(`$.controls[${index}]`));
  for (const p of shown) io.stderr.write(`${formatProblem(target.file, p, check.source)}\n`);
  if (!check.setup) throw new UserError(`${target.file}: not written: the new control does not fit (above)`);
  if (!target.agreed) {
    const answer = await ask!(`add it to ${target.file}? your comments and layout stay (y/N) `);
    if (!/^y(es)?$/iu.test(answer)) {
      io.stdout.write(`${target.file}: left as it was\n`);
      return;
    }
  }
  writeAgreedText(target.file, text, target.replace ? 'replace' : 'create');
  io.stdout.write(`${target.file}: ${target.replace ? 'control added' : 'written'} as controls[${index}]; "diesis check ${target.file}" says ok\n`);
}
