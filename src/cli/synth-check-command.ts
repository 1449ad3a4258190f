import { Option, type Command } from 'commander';
import { describePorts, enableMidi, findOutput } from '../io/midi-system.js';
import { EXIT_CODES } from '../live/run.js';
import { loadTuningPreset } from '../presets/tuning-presets.js';
import { OUTPUT_MODE_IDS } from '../router/setup.js';
import { synthCheckPlan, type CheckSettings, type SynthCheckPlan } from '../router/synth-check.js';
import { UserError } from '../util/errors.js';
import type { CommandEnd, CommandIo } from '../util/io.js';
import { resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import { integerOption, numberOption } from './options.js';

interface SynthCheckCli extends Pick<EngineCliOptions, 'setup' | 'ref' | 'mode' | 'layout' | 'channels' | 'bendRange' | 'bendRangeMessages' | 'synthA4' | 'mtsDevice' | 'mtsProgram' | 'octaveForm'> {
  out?: string;
  noteSeconds: number;
}

export function registerSynthCheck(program: Command, io: CommandIo, end: CommandEnd): void {
  program
    .command('synth-check')
    .description('play a short known sequence so you can hear that the synth takes the bend range or MTS as diesis sends them')
    .requiredOption('--out <port>', 'the synth: output port name (case-insensitive substring) or index')
    .option('--setup <file>', 'take the output settings (and reference) from a performance setup')
    .option('--ref <note=hz>', 'reference pitch, as A4=415 (default: A4=440)')
    .addOption(new Option('--mode <mode>', 'how the synth is retuned: bend, mts-note or mts-octave (default: bend)').choices(OUTPUT_MODE_IDS.filter((m) => m !== 'pass' && m !== 'samples')))
    .addOption(new Option('--layout <layout>', 'bend mode: an MPE zone, or independent multitimbral channels (default: mpe)').choices(['mpe', 'multi']))
    .option('--channels <list>', 'output channels 1–16 (default: 2-16 for bend, 1 otherwise)')
    .option('--bend-range <semitones>', 'the pitch-bend range diesis will assume (default: 48 for MPE, 2 for multi)', numberOption('--bend-range', 1, 96))
    .option('--no-bend-range-messages', 'do not send RPN 0: check a range set by hand on the synth')
    .option('--synth-a4 <hz>', 'the synth’s own tuning of A4 (default: 440)', numberOption('--synth-a4', 300, 600))
    .option('--mts-device <id>', 'MTS device ID, 127 = all (default: 127)', integerOption('--mts-device', 0, 127))
    .option('--mts-program <n>', 'MTS tuning program addressed (default: 0)', integerOption('--mts-program', 0, 127))
    .addOption(new Option('--octave-form <bytes>', 'mts-octave: 1-byte or 2-byte messages (default: 2)').choices(['1', '2']))
    .option('--note-seconds <s>', 'how long each note sounds', numberOption('--note-seconds', 0.02, 10), 1.5)
    .action(async (cli: SynthCheckCli) => {
      const resolved = resolveEngineCli(cli);
      const o = resolved.options;
      if (o.mode === 'pass' || o.mode === 'samples') throw new UserError(`synth-check: the setup's mode "${o.mode}" sends no retuning to check; give --mode bend, mts-note or mts-octave`, 2);
      const settings: CheckSettings = {
        reference: o.reference,
        mode: o.mode,
        layout: o.layout,
        channels: o.channels,
        bendRange: o.bendRange,
        sendBendRange: o.sendBendRange,
        synthA4: o.synthA4,
        mtsDevice: o.mtsDevice,
        mtsProgram: o.mtsProgram,
        octaveForm: o.octaveForm,
        releaseGuardMs: o.releaseGuardMs,
      };
      const plan = synthCheckPlan(settings, loadTuningPreset('pythagorean').tuning, cli.noteSeconds * 1000);
      const range = plan.options.bendRange;
      if (o.mode === 'bend' && range < 1) throw new UserError(`synth-check: a bend range of ±${range} cannot reach the next key; the check needs ±1 semitone or more`, 2);
      await enableMidi();
      const output = findOutput(cli.out!);
      if (!output) throw new UserError(`no MIDI output matches "${cli.out}" (${describePorts('output')})`);
      end.code = await runSynthCheck(plan, (bytes) => output.send([...bytes]), io);
    });
}

/**
 * Sends the check on a clock, printing each cue as its step is sent, until it ends, a signal
 * arrives, the player presses q (on a terminal), an error escapes or `stop` fires; every way out
 * sends the plan's closing messages (note-offs, tuning put back, the panic). Resolves to the exit
 * code (as for `play`).
 */
export function runSynthCheck(plan: SynthCheckPlan, send: (bytes: readonly number[]) => void, io: CommandIo, stop?: AbortSignal): Promise<number> {
  return new Promise<number>((resolve) => {
    const cleanups: Array<() => void> = [];
    let over = false;
    const finish = (code: number, why?: string): void => {
      if (over) return;
      over = true;
      for (const c of cleanups.splice(0)) c();
      for (const m of plan.closing) trySend(m);
      if (why) io.stdout.write(`stopped (${why}): every note off, pedals up, bends centred\n`);
      else io.stdout.write('done: every note off, pedals up, bends centred\n');
      resolve(code);
    };
    const trySend = (m: readonly number[]): void => {
      try {
        send(m);
      } catch (error) {
        io.stderr.write(`diesis: the synth port failed: ${error instanceof Error ? error.message : String(error)}\n`);
      }
    };
    const start = performance.now();
    let next = 0;
    let timer: NodeJS.Timeout | undefined;
    const run = (): void => {
      if (over) return;
      const now = performance.now() - start;
      while (next < plan.steps.length && plan.steps[next]!.at <= now) {
        const step = plan.steps[next++]!;
        for (const m of step.messages) trySend(m);
        if (step.cue) io.stdout.write(`${step.cue}\n`);
      }
      if (next >= plan.steps.length) {
        timer = setTimeout(() => finish(EXIT_CODES.quit), 200);
        return;
      }
      timer = setTimeout(run, Math.max(0, plan.steps[next]!.at - (performance.now() - start)));
    };
    cleanups.push(() => clearTimeout(timer));
    for (const [signal, code] of [['SIGINT', EXIT_CODES.SIGINT], ['SIGTERM', EXIT_CODES.SIGTERM], ['SIGHUP', EXIT_CODES.SIGHUP]] as const) {
      const handler = (): void => finish(code, signal);
      process.once(signal, handler);
      cleanups.push(() => process.removeListener(signal, handler));
    }
    const crash = (error: unknown): void => {
      io.stderr.write(`diesis: internal error: ${error instanceof Error ? error.message : String(error)}\n`);
      finish(EXIT_CODES.error, 'internal error');
    };
    process.once('uncaughtException', crash);
    cleanups.push(() => process.removeListener('uncaughtException', crash));
    if (stop) {
      const aborted = (): void => finish(EXIT_CODES.quit, 'asked to stop');
      if (stop.aborted) queueMicrotask(aborted);
      else stop.addEventListener('abort', aborted, { once: true });
      cleanups.push(() => stop.removeEventListener('abort', aborted));
    }
    const stdin = process.stdin;
    if (stdin.isTTY && io.stdout.isTTY) {
      io.stdout.write('q or Ctrl-C stops (with a panic)\n');
      stdin.setRawMode(true);
      stdin.resume();
      const key = (data: Buffer): void => {
        const text = data.toString();
        if (text === '\u0003') finish(EXIT_CODES.SIGINT, 'Ctrl-C');
        else if (text === 'q' || text === 'p' || text === ' ') finish(EXIT_CODES.quit, 'by the player');
      };
      stdin.on('data', key);
      cleanups.push(() => {
        stdin.removeListener('data', key);
        stdin.setRawMode(false);
        stdin.pause();
      });
    }
    run();
  });
}
