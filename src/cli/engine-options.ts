import { Option, type Command } from 'commander';
import { DEFAULT_WINDOW, formatRange, parseWindow } from '../pitch/index.js';
import { loadTuningPreset, type TuningPreset } from '../presets/tuning-presets.js';
import { DEFAULT_RELEASE_GUARD_MS, OUTPUT_MODES, parseChannels, type EngineOptionsInput, type OutputMode } from '../router/setup.js';
import { A440, parseReference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { integerOption, numberOption } from './options.js';

/** The options every command that runs the engine shares (render, spell, play). */
export interface EngineCliOptions {
  tuning: string;
  ref?: string;
  window: string;
  mode: OutputMode;
  layout: 'mpe' | 'multi';
  channels: string;
  bendRange?: number;
  bendRangeMessages: boolean;
  wheelRange: number;
  releaseGuard: number;
  synthA4: number;
  mtsDevice: number;
  mtsProgram: number;
  octaveForm: string;
}

export function addEngineOptions(command: Command): Command {
  return command
    .option('-t, --tuning <id|file>', 'tuning preset id or .json file', 'meantone-1-4')
    .option('--ref <note=hz>', 'reference pitch, as A4=415 (default: the preset’s, else A4=440)')
    .option('--window <from..to>', 'the 12 spellings keys take, as a stretch of the line of fifths', formatRange(DEFAULT_WINDOW))
    .addOption(new Option('--mode <mode>', 'how the synth is retuned').choices([...OUTPUT_MODES]).default('bend'))
    .addOption(new Option('--layout <layout>', 'bend mode: an MPE zone, or independent multitimbral channels').choices(['mpe', 'multi']).default('mpe'))
    .option('--channels <list>', 'output channels 1–16 (bend: the member channels; other modes: the first)', '2-16')
    .option('--bend-range <semitones>', 'the synth’s pitch-bend range on the output channels (default: 48 for MPE, 2 for multi)', numberOption('--bend-range', 0.01, 96))
    .option('--no-bend-range-messages', 'do not send RPN 0 bend ranges (the synth is set by hand)')
    .option('--wheel-range <semitones>', 'the keyboard’s pitch-wheel range', numberOption('--wheel-range', 0.01, 96), 2)
    .option('--release-guard <ms>', 'time after a note ends before its channel or slot may be retuned', integerOption('--release-guard', 0, 60_000), DEFAULT_RELEASE_GUARD_MS)
    .option('--synth-a4 <hz>', 'the synth’s own tuning of A4', numberOption('--synth-a4', 300, 600), 440)
    .option('--mts-device <id>', 'MTS device ID (127 = all)', integerOption('--mts-device', 0, 127), 127)
    .option('--mts-program <n>', 'MTS tuning program addressed', integerOption('--mts-program', 0, 127), 0)
    .addOption(new Option('--octave-form <bytes>', 'mts-octave: 1-byte (cents) or 2-byte (fine) scale/octave messages').choices(['1', '2']).default('2'));
}

export interface ResolvedEngine {
  readonly preset: TuningPreset;
  readonly options: EngineOptionsInput;
}

/** Turns parsed command-line options into engine options; every bad value is one clear line. */
export function resolveEngineCli(cli: EngineCliOptions): ResolvedEngine {
  const preset = loadTuningPreset(cli.tuning);
  const channels = parseChannels(cli.channels);
  if (cli.mode !== 'bend' && channels.length > 1 && cli.channels !== '2-16') {
    throw new UserError(`--channels "${cli.channels}": --mode ${cli.mode} sends on one channel; give just one`, 2);
  }
  const options: EngineOptionsInput = {
    tuning: preset.tuning,
    reference: cli.ref !== undefined ? parseReference(cli.ref, '--ref') : (preset.reference ?? A440),
    window: parseWindow(cli.window, '--window'),
    mode: cli.mode,
    layout: cli.layout,
    channels: cli.mode === 'bend' ? channels : [channels[0] ?? 0],
    bendRange: cli.bendRange,
    sendBendRange: cli.bendRangeMessages,
    wheelRange: cli.wheelRange,
    releaseGuardMs: cli.releaseGuard,
    synthA4: cli.synthA4,
    mtsDevice: cli.mtsDevice,
    mtsProgram: cli.mtsProgram,
    octaveForm: cli.octaveForm === '1' ? 1 : 2,
  };
  return { preset, options };
}
