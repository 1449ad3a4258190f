import { Option, type Command } from 'commander';
import { dirname, resolve } from 'node:path';
import { withScore } from '../score/with-score.js';
import { loadSampleSet, type LoadedSampleSet } from '../audio/sample-set.js';
import { parseWindow } from '../pitch/index.js';
import { loadSetupFile, type SetupFile } from '../presets/setup-file.js';
import { loadTuningPreset, type TuningPreset } from '../presets/tuning-presets.js';
import { OUTPUT_MODES, parseChannels, type EngineOptionsInput, type OutputMode } from '../router/setup.js';
import { ControlMap } from '../spelling/control-map.js';
import { ControlledSpeller } from '../spelling/controlled.js';
import { parseKey } from '../spelling/keys.js';
import { createStrategy, STRATEGIES, type Strategy } from '../spelling/strategy.js';
import { A440, parseReference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { integerOption, numberOption } from './options.js';

/**
 * The options every command that runs the engine shares (render, spell, play). None has a
 * commander default: a value given on the command line wins over the setup file, which wins
 * over the built-in default.
 */
export interface EngineCliOptions {
  setup?: string;
  tuning?: string;
  ref?: string;
  spelling?: Strategy;
  key?: string;
  window?: string;
  gather?: number;
  mode?: OutputMode;
  layout?: 'mpe' | 'multi';
  channels?: string;
  bendRange?: number;
  bendRangeMessages?: boolean;
  wheelRange?: number;
  releaseGuard?: number;
  synthA4?: number;
  mtsDevice?: number;
  mtsProgram?: number;
  octaveForm?: string;
  sampleSet?: string;
  score?: string;
}

export function addEngineOptions(command: Command): Command {
  return command
    .option('--setup <file>', 'a performance setup (JSON); options given here override it')
    .option('-t, --tuning <id|file>', 'tuning preset id or .json file (default: meantone-1-4)')
    .option('--ref <note=hz>', 'reference pitch, as A4=415 (default: the preset’s, else A4=440)')
    .addOption(new Option('--spelling <strategy>', 'how keys are spelled (default: follow)').choices([...STRATEGIES]))
    .option('--key <key>', 'the key for --spelling key, or where follow starts, as "D minor"')
    .option('--window <from..to>', 'the 12 spellings for --spelling fixed (default: Eb..G#)')
    .option('--gather <ms>', 'live: wait this long for the rest of a chord (default: 0)', numberOption('--gather', 0, 100))
    .addOption(new Option('--mode <mode>', 'how the synth is retuned (default: bend)').choices([...OUTPUT_MODES]))
    .addOption(new Option('--layout <layout>', 'bend mode: an MPE zone, or independent multitimbral channels (default: mpe)').choices(['mpe', 'multi']))
    .option('--channels <list>', 'output channels 1–16; bend: the member channels, other modes: the first (default: 2-16)')
    .option('--bend-range <semitones>', 'the synth’s pitch-bend range on the output channels (default: 48 for MPE, 2 for multi)', numberOption('--bend-range', 0.01, 96))
    .option('--no-bend-range-messages', 'do not send RPN 0 bend ranges (the synth is set by hand)')
    .option('--wheel-range <semitones>', 'the keyboard’s pitch-wheel range (default: 2)', numberOption('--wheel-range', 0.01, 96))
    .option('--release-guard <ms>', 'time after a note ends before its channel or slot may be retuned (default: 400)', integerOption('--release-guard', 0, 60_000))
    .option('--synth-a4 <hz>', 'the synth’s own tuning of A4 (default: 440)', numberOption('--synth-a4', 300, 600))
    .option('--mts-device <id>', 'MTS device ID, 127 = all (default: 127)', integerOption('--mts-device', 0, 127))
    .option('--mts-program <n>', 'MTS tuning program addressed (default: 0)', integerOption('--mts-program', 0, 127))
    .addOption(new Option('--octave-form <bytes>', 'mts-octave: 1-byte (cents) or 2-byte (fine) messages (default: 2)').choices(['1', '2']))
    .option('--score <file>', 'follow the piece in its MusicXML score (.musicxml, .xml, .mxl) and spell each note as written')
    .option('--sample-set <dir>', 'play a retuned sample set made by "diesis samples": --mode samples, its channel layout, no bends');
}

export interface ResolvedEngine {
  readonly preset: TuningPreset;
  readonly setup: SetupFile | undefined;
  readonly strategy: Strategy;
  readonly speller: ControlledSpeller;
  readonly options: EngineOptionsInput;
  readonly sampleSet: LoadedSampleSet | undefined;
}

/** Turns the command line (over a setup file) into engine options; every bad value is one clear line. */
export function resolveEngineCli(cli: EngineCliOptions): ResolvedEngine {
  const setup = cli.setup === undefined ? undefined : loadSetupFile(cli.setup);
  const json = setup?.json;
  const sampleSet = cli.sampleSet === undefined ? undefined : loadSampleSet(cli.sampleSet);
  const preset = loadTuningPreset(cli.tuning ?? json?.tuning ?? 'meantone-1-4');
  const refText = cli.ref ?? json?.reference;
  const mode = sampleSet ? 'samples' : (cli.mode ?? json?.output?.mode ?? 'bend');
  const channelText = cli.channels ?? json?.output?.channels ?? '2-16';
  const channels = parseChannels(channelText);
  if (mode !== 'bend' && channels.length > 1 && channelText !== '2-16') {
    throw new UserError(`--channels "${channelText}": --mode ${mode} sends on one channel; give just one`, 2);
  }
  const strategy = cli.spelling ?? json?.spelling?.strategy ?? 'follow';
  const key = cli.key !== undefined ? parseKey(cli.key, '--key') : setup?.key;
  if (strategy === 'key' && key === undefined) throw new UserError('--spelling key needs --key, as in --key "D minor"', 2);
  const window = cli.window !== undefined ? parseWindow(cli.window, '--window') : setup?.window;
  const scoreFile = cli.score ?? (setup && json?.score !== undefined ? resolve(dirname(setup.file), json.score) : undefined);
  const base = createStrategy({ strategy, window, key, follow: json?.spelling?.follow });
  const speller = new ControlledSpeller(scoreFile === undefined ? base : withScore(base, scoreFile), setup?.splits ?? []);
  const octaveForm = cli.octaveForm ?? (json?.output?.octaveForm === undefined ? undefined : String(json.output.octaveForm));
  const options: EngineOptionsInput = {
    tuning: preset.tuning,
    reference: refText !== undefined ? parseReference(refText, cli.ref !== undefined ? '--ref' : `${setup?.file}: reference`) : (preset.reference ?? A440),
    mode,
    layout: cli.layout ?? json?.output?.layout,
    channels: mode === 'bend' ? channels : [channels[0] ?? 0],
    bendRange: cli.bendRange ?? json?.output?.bendRange,
    sendBendRange: cli.bendRangeMessages === false ? false : json?.output?.sendBendRange,
    wheelRange: cli.wheelRange ?? json?.keyboard?.wheelRange,
    releaseGuardMs: cli.releaseGuard ?? json?.output?.releaseGuardMs,
    synthA4: cli.synthA4 ?? json?.output?.synthA4,
    mtsDevice: cli.mtsDevice ?? json?.output?.mtsDevice,
    mtsProgram: cli.mtsProgram ?? json?.output?.mtsProgram,
    octaveForm: octaveForm === undefined ? undefined : octaveForm === '1' ? 1 : 2,
    speller,
    sampleLayout: sampleSet?.layout,
    controls: setup && setup.bindings.length > 0 ? new ControlMap(setup.bindings, speller) : undefined,
    gather: cli.gather ?? json?.spelling?.gatherMs,
  };
  return { preset, setup, strategy, speller, options, sampleSet };
}
