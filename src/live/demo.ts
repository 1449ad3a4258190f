import { parseSpelledPitch, keyOf } from '../pitch/index.js';
import { loadTuningPreset } from '../presets/tuning-presets.js';
import type { RouterEvent } from '../router/router.js';
import { ControlMap } from '../spelling/control-map.js';
import { ControlledSpeller } from '../spelling/controlled.js';
import { parseKey } from '../spelling/keys.js';
import { createStrategy } from '../spelling/strategy.js';
import { SynthModel } from '../synth/reference-synth.js';
import { parseReference } from '../tuning/index.js';
import type { CommandIo } from '../util/io.js';
import { virtualInput, virtualOutput } from '../io/virtual-ports.js';
import { runUntilStopped } from './run.js';
import { join } from 'node:path';
import { loadProgrammeFile } from '../presets/programme-file.js';
import { packageRoot } from '../util/package-root.js';
import { Concert } from './concert.js';
import { stagePageRequest, type StagePageCli } from '../page/stage-cli.js';

/** One step of the demo: at `beat`, the keyboard plays `chord` (held `hold` beats), or the pedal moves. */
type Step = { beat: number; chord: string[]; hold?: number } | { beat: number; pedal: 'flip' | 'sustain'; down: boolean };

/**
 * The demo piece, written for diesis: D minor with its leading tones (C♯, and G♯ in the chord of
 * E), then a turn to F minor and D♭ major under the flip pedal (A♭ and D♭ on the keys D minor
 * spells G♯ and C♯), and a closing D major chord held by the sustain pedal.
 */
export const DEMO_PIECE: readonly Step[] = [
  { beat: 0, chord: ['D3', 'F4', 'A4'] },
  { beat: 1, chord: ['A2', 'G4', 'C#5', 'E5'] },
  { beat: 2, chord: ['D3', 'F4', 'A4'] },
  { beat: 3, chord: ['E3', 'G#4', 'B4'] },
  { beat: 4, chord: ['A2', 'C#4', 'E4'] },
  { beat: 4.9, pedal: 'flip', down: true },
  { beat: 5, chord: ['F3', 'G#4', 'C5'] },
  { beat: 6, chord: ['C#3', 'F4', 'G#4'] },
  { beat: 6.9, pedal: 'flip', down: false },
  { beat: 7, pedal: 'sustain', down: true },
  { beat: 7, chord: ['D3', 'F#4', 'A4', 'D5'], hold: 0.5 },
  { beat: 9, pedal: 'sustain', down: false },
];

const BEAT_MS = 500;
/** The piece from its first beat to the end of its last chord's ring. */
const PIECE_MS = (Math.max(...DEMO_PIECE.map((s) => s.beat)) + 1.5) * BEAT_MS;
const FLIP_CC = 80;

/**
 * `diesis demo`: the live path with no hardware. Virtual keyboard, pedal and synth ports are
 * registered in-process; the piece is played into the keyboard port; `play`'s own session
 * carries it to a virtual synth that sounds it as a real one would (the reference synth). It
 * prints each note's spelling, cents, frequency and channel, checks what the synth sounded, and
 * ends by itself.
 */
export interface DemoOptions {
  /** Play the piece again and again until stopped. */
  readonly loop?: boolean | undefined;
  /** The stage page (served unless `--no-page`). */
  readonly page?: StagePageCli | undefined;
}

export async function runDemo(io: CommandIo, demo: DemoOptions = {}): Promise<number> {
  const keyboard = virtualInput('diesis demo keyboard');
  const pedals = virtualInput('diesis demo pedals');
  const synth = new SynthModel(440, 400);
  const heard: number[] = [];
  virtualOutput('diesis demo synth', (bytes) => {
    const voice = synth.receive(performance.now(), bytes);
    if (voice) heard.push(synth.frequency(voice));
  });
  const tuning = loadTuningPreset('meantone-1-4');
  const reference = parseReference('A4=415');
  const speller = new ControlledSpeller(createStrategy({ strategy: 'key', key: parseKey('D minor') }));
  const controls = new ControlMap([{ trigger: { kind: 'cc', controller: FLIP_CC, channel: undefined, threshold: 64 }, action: { name: 'flip' }, latch: false }], speller);
  const decided: number[] = [];
  io.stdout.write('diesis demo: quarter-comma meantone at A4 = 415 Hz, spelled in D minor, into an MPE synth (virtual ports, no hardware).\n');
  io.stdout.write('The pedal (CC 80) flips black keys for the F minor and D♭ major bars; the last chord is held by the sustain pedal.\n');
  const page = stagePageRequest(demo.page ?? {}, { pieceTitle: 'diesis demo', tuningId: tuning.id, tuningName: tuning.name }, true);
  // With the page, the example programme's pieces (the first is this one): its ◀ ▶ change the tuning as the piece plays.
  const programme = page ? loadProgrammeFile(join(packageRoot(), 'presets/programmes/evening.json')) : undefined;
  if (programme) io.stdout.write(`The stage page's ◀ ▶ step through the example programme presets/programmes/evening.json (${programme.pieces.length} pieces, each in its own tuning).\n`);
  io.stdout.write(demo.loop ? 'The piece plays again and again: q or Ctrl-C stops it.\n\n' : '\n');
  const done = runUntilStopped(
    {
      inputs: [keyboard.name, pedals.name],
      output: 'diesis demo synth',
      engine: { tuning: tuning.tuning, reference, controls, pieces: programme && new Concert(programme) },
      startPiece: programme ? 0 : undefined,
      onEvent: (e: RouterEvent) => e.type === 'note' && decided.push(e.hz),
      speller,
      strategy: 'key',
      title: 'diesis demo',
      lines: true,
      virtualOnly: true,
      page,
    },
    io,
    demo.loop ? undefined : PIECE_MS / 1000,
  );
  // Play the piece into the virtual keyboard and pedals (again and again with --loop, until stopped).
  let over = false;
  const timers: NodeJS.Timeout[] = [];
  const playFrom = (start: number): void => {
    if (over) return;
    for (const step of DEMO_PIECE) {
      timers.push(
        setTimeout(() => {
          if (over) return;
          if ('chord' in step) {
            const keys = step.chord.map((n) => keyOf(parseSpelledPitch(n)));
            for (const k of keys) keyboard.send([0x90, k, 80]);
            timers.push(setTimeout(() => keys.forEach((k) => keyboard.send([0x80, k, 0])), (step.hold ?? 0.9) * BEAT_MS));
          } else if (step.pedal === 'flip') pedals.send([0xb0, FLIP_CC, step.down ? 127 : 0]);
          else keyboard.send([0xb0, 64, step.down ? 127 : 0]);
        }, start - performance.now() + step.beat * BEAT_MS),
      );
    }
    if (demo.loop) timers.push(setTimeout(() => playFrom(start + PIECE_MS), start + PIECE_MS - performance.now() - 50));
  };
  playFrom(performance.now() + 100);
  const code = await done;
  over = true;
  for (const t of timers) clearTimeout(t);
  // Each note the synth started, against the frequency the engine decided for it (in order).
  const worst = heard.reduce((w, hz, i) => Math.max(w, Math.abs(1200 * Math.log2(hz / (decided[i] ?? NaN)))), 0);
  const left = synth.active().length;
  const ok = left === 0 && heard.length === decided.length && worst < 0.3;
  io.stdout.write(
    `\nthe synth sounded ${heard.length} notes, each within ${worst.toFixed(3)} cent of its spelling's frequency; ${left === 0 ? 'nothing is left sounding' : `${left} still sounding`}.\n`,
  );
  return ok ? code : 1;
}
