import { Option, type Command } from 'commander';
import { KEY_NAMES, type KeyNames } from '../spelling/key-names.js';
import { readScoreFile } from '../presets/score-file.js';
import { ScoreSpeller } from '../score/score-speller.js';
import { checkSetPlays, loadSampleSet, type LoadedSampleSet } from '../audio/sample-set.js';
import { formatRange, parseWindow } from '../pitch/index.js';
import { loadSetupFile, type SetupFile } from '../presets/setup-file.js';
import { loadTuningPreset, type TuningPreset } from '../presets/tuning-presets.js';
import { OUTPUT_MODE_IDS, OUTPUT_MODES, type EngineOptionsInput, type OutputMode } from '../router/setup.js';
import type { ModeSetting } from '../router/output.js';
import { parseChannels } from '../text/channels.js';
import { ControlMap } from '../spelling/control-map.js';
import { ControlledSpeller } from '../spelling/controlled.js';
import { formatKey, parseKey } from '../spelling/keys.js';
import type { FollowParameters } from '../spelling/follow.js';
import { createStrategy, STRATEGIES, STRATEGY_ENTRIES, type Strategy } from '../spelling/strategy.js';
import { A440, isAdaptive, parseReference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { integerOption, numberOption, optionValue } from './options.js';

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
  keyNames?: KeyNames;
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
    .addOption(new Option('--key-names <names>', 'follow: how keys of five to seven accidentals are named, baroque (C# major, D# minor) or later (Db major, Eb minor) (default: baroque)').choices(Object.keys(KEY_NAMES)))
    .option('--window <from..to>', 'the 12 spellings for --spelling fixed (default: Eb..G#)')
    .option('--gather <ms>', 'live: wait this long for the rest of a chord (default: 0)', numberOption('--gather', 0, 100))
    .addOption(new Option('--mode <mode>', 'how the synth is retuned (default: bend)').choices([...OUTPUT_MODE_IDS]))
    .addOption(new Option('--layout <layout>', 'bend mode: an MPE zone, or independent multitimbral channels (default: mpe)').choices(['mpe', 'multi']))
    .option('--channels <list>', 'output channels 1–16: bend takes a list (default: 2-16), one-channel modes one channel (default: 1)')
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
  /** The spelling in force, in words: `follow, starting in D minor`, `follow, no key given, later key names`, `fixed in E♭..G♯`, `the key of D minor`. */
  readonly spellingLabel: string;
  readonly preset: TuningPreset;
  readonly setup: SetupFile | undefined;
  readonly strategy: Strategy;
  readonly speller: ControlledSpeller;
  readonly options: EngineOptionsInput;
  readonly sampleSet: LoadedSampleSet | undefined;
}

/** The command-line name of each mode-specific setting, for refusals. */
const SETTING_FLAGS: Readonly<Record<ModeSetting, string>> = {
  layout: '--layout',
  bendRange: '--bend-range',
  octaveForm: '--octave-form',
  mtsDevice: '--mts-device',
  mtsProgram: '--mts-program',
  sampleSet: '--sample-set',
};

/** Refuses a mode-specific option given for a mode it does not apply to (one line, with the modes it belongs to). */
function refuseForeignSettings(mode: OutputMode, given: Readonly<Record<ModeSetting, unknown>>): void {
  const applies = OUTPUT_MODES[mode].settings as readonly ModeSetting[];
  for (const setting of Object.keys(SETTING_FLAGS) as ModeSetting[]) {
    if (given[setting] === undefined || applies.includes(setting)) continue;
    const owners = OUTPUT_MODE_IDS.filter((m) => (OUTPUT_MODES[m].settings as readonly ModeSetting[]).includes(setting));
    throw new UserError(`${SETTING_FLAGS[setting]} applies to --mode ${owners.join(' or ')}, not to --mode ${mode}`, 2);
  }
}

/** Turns the command line (over a setup file) into engine options; every bad value is one clear line. */
export function resolveEngineCli(cli: EngineCliOptions): ResolvedEngine {
  const setup = cli.setup === undefined ? undefined : loadSetupFile(cli.setup);
  const json = setup?.json;
  const sampleSet = cli.sampleSet === undefined ? undefined : loadSampleSet(cli.sampleSet);
  // A sample set plays in its own tuning and reference unless told otherwise (and then refuses a mismatch).
  const preset = cli.tuning !== undefined ? loadTuningPreset(cli.tuning) : (setup?.tuning ?? loadTuningPreset(sampleSet?.manifest.tuningId ?? 'meantone-1-4'));
  const mode: OutputMode = sampleSet ? 'samples' : (cli.mode ?? json?.output?.mode ?? 'bend');
  refuseForeignSettings(mode, {
    layout: cli.layout,
    bendRange: cli.bendRange,
    octaveForm: cli.octaveForm,
    mtsDevice: cli.mtsDevice,
    mtsProgram: cli.mtsProgram,
    sampleSet: cli.sampleSet,
  });
  const entry = OUTPUT_MODES[mode];
  const channels = cli.channels !== undefined ? parseChannels(cli.channels) : setup?.channels;
  if (channels && entry.channels === 'one' && channels.length > 1) {
    throw new UserError(`--channels "${cli.channels ?? json?.output?.channels}": --mode ${mode} sends on one channel; give just one`, 2);
  }
  if (channels && entry.channels === 'set') throw new UserError(`--channels: --mode ${mode} uses the sample set's own channels`, 2);
  const windowGiven = cli.window !== undefined;
  const strategy: Strategy = cli.spelling ?? (windowGiven ? 'fixed' : (json?.spelling?.strategy ?? 'follow'));
  const strategyEntry = STRATEGY_ENTRIES[strategy];
  if (cli.key !== undefined && !strategyEntry.usesKey) throw new UserError(`--key has no effect with --spelling ${strategy}; use --spelling key or follow, or --window for fixed spellings`, 2);
  if (cli.keyNames !== undefined && strategy !== 'follow') throw new UserError(`--key-names has no effect with --spelling ${strategy}; it names the keys follow finds`, 2);
  if (windowGiven && !strategyEntry.usesWindow) throw new UserError(`--window has no effect with --spelling ${strategy}; it sets the spellings of --spelling fixed`, 2);
  const key = cli.key !== undefined ? optionValue(() => parseKey(cli.key!, '--key')) : setup?.key;
  if (strategy === 'key' && key === undefined) throw new UserError('--spelling key needs --key, as in --key "D minor"', 2);
  const window = cli.window !== undefined ? optionValue(() => parseWindow(cli.window!, '--window')) : setup?.window;
  // A score given here is read now; a setup's was read (from the setup's folder) when it was checked.
  const score = cli.score !== undefined ? readScoreFile(cli.score) : setup?.score;
  const follow: Partial<FollowParameters> | undefined = cli.keyNames === undefined ? json?.spelling?.follow : { ...json?.spelling?.follow, namingCentre: KEY_NAMES[cli.keyNames] };
  const base = createStrategy({ strategy, window, key, follow });
  const speller = new ControlledSpeller(score === undefined ? base : new ScoreSpeller(score, base), setup?.splits ?? [], key);
  if (isAdaptive(preset.tuning) && (mode === 'mts-octave' || mode === 'samples')) {
    throw new UserError(`${preset.id} gives every note its own pitch: use --mode bend or mts-note (--mode ${mode} tunes key classes or fixed samples, so held notes would move)`, 2);
  }
  const octaveForm = cli.octaveForm ?? (json?.output?.octaveForm === undefined ? undefined : String(json.output.octaveForm));
  const options: EngineOptionsInput = {
    tuning: preset.tuning,
    reference:
      cli.ref !== undefined
        ? optionValue(() => parseReference(cli.ref!, '--ref'))
        : (setup?.reference ?? (sampleSet?.manifest.reference === undefined ? undefined : parseReference(sampleSet.manifest.reference, `${cli.sampleSet}: reference`)) ?? preset.reference ?? A440),
    mode,
    layout: cli.layout ?? json?.output?.layout,
    channels,
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
    sampleKeys: sampleSet && new Set(sampleSet.manifest.files.map((f) => (f.channel - 1) * 128 + f.key)),
    controls: new ControlMap(setup?.bindings ?? [], speller),
    gather: cli.gather ?? json?.spelling?.gatherMs,
    tuningAbout: { id: preset.id, name: preset.name },
  };
  if (sampleSet) checkSetPlays(sampleSet, { tuning: preset.tuning, tuningName: preset.name, reference: options.reference, mode: cli.mode ?? json?.output?.mode });
  const spellingLabel =
    strategy === 'fixed'
      ? `fixed in ${formatRange(speller.currentWindow())}`
      : strategy === 'key'
        ? `the key of ${formatKey(key!)}`
        : `${strategy}, ${key ? `starting in ${formatKey(key)}` : 'no key given'}${follow?.namingCentre === KEY_NAMES.later ? ', later key names' : ''}`;
  return { spellingLabel, preset, setup, strategy, speller, options, sampleSet };
}
