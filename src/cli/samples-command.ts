import { Option, type Command } from 'commander';
import { buildSampleSet, readSourceFolder, setTarget } from '../audio/sample-set.js';
import { defaultSetRange, reachWarning, spellingReach } from '../audio/set-range.js';
import { formatRange, parseFifthsRange, parseWindow } from '../pitch/index.js';
import { loadTuningPreset, PRESETS_DIR } from '../presets/tuning-presets.js';
import { parseKey } from '../spelling/keys.js';
import { STRATEGIES, type Strategy } from '../spelling/strategy.js';
import { A440, formatReference, parseReference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import type { CommandIo } from '../util/io.js';
import { integerOption, numberOption, optionValue } from './options.js';
import { progressBar } from './progress.js';

interface SamplesOptions {
  from: string;
  to: string;
  tuning: string;
  ref?: string;
  range?: string;
  spelling: Strategy;
  key?: string;
  window?: string;
  compass: string;
  maxShift: number;
}

export function registerSamples(program: Command, io: CommandIo): void {
  program
    .command('samples')
    .description('build a retuned sample set: every spelling at its exact frequency, an SFZ map and a manifest')
    .requiredOption('--from <dir>', 'your samples: WAV files named after their note or key (C4.wav, Bb3 soft.wav, 060.wav, key60.wav) or listed in map.json')
    .requiredOption('--to <dir>', 'the folder to write (replaced only once the whole set is made)')
    .option('-t, --tuning <id|file>', 'tuning preset id or .json file', 'meantone-1-4')
    .option('--ref <note=hz>', 'reference pitch (default: the preset’s, else A4=440)')
    .option('--range <from..to>', 'the spellings to build, at most 16 (each gets a channel) (default: Db..A#, or Eb..G# when the tuning gives G# and Ab one pitch)')
    .addOption(new Option('--spelling <strategy>', 'the spelling strategy the set will be played with: a warning says when the range misses what it can give').choices([...STRATEGIES]).default('follow'))
    .option('--key <key>', 'with --spelling key: the key, as "D minor"')
    .option('--window <from..to>', 'with --spelling fixed: the 12 spellings (default: Eb..G#)')
    .option('--compass <low-high>', 'the instrument’s keys, as MIDI numbers', '36-96')
    .option('--max-shift <semitones>', 'refuse to shift a sample further than this', numberOption('--max-shift', 0, 24), 4)
    .action((cli: SamplesOptions, command: Command) => {
      const preset = loadTuningPreset(cli.tuning);
      const reference = cli.ref !== undefined ? optionValue(() => parseReference(cli.ref!, '--ref')) : (preset.reference ?? A440);
      const compass = /^(\d+)-(\d+)$/u.exec(cli.compass);
      const twoKeys = (): UserError => new UserError(`--compass "${cli.compass}" must be two keys, low-high, as 36-96`, 2);
      if (!compass) throw twoKeys();
      const low = integerOption('--compass', 0, 127)(compass[1]!);
      const high = integerOption('--compass', 0, 127)(compass[2]!);
      if (high < low) throw twoKeys();
      setTarget(cli.to, [cli.from]); // refuse a target that would touch the player's files before any work
      const range = cli.range !== undefined ? optionValue(() => parseFifthsRange(cli.range!, '--range')) : defaultSetRange(preset.tuning);
      const key = cli.key === undefined ? undefined : optionValue(() => parseKey(cli.key!, '--key'));
      if (cli.spelling === 'key' && !key) throw new UserError('--spelling key needs --key, as in --key "D minor"', 2);
      const window = cli.window === undefined ? undefined : optionValue(() => parseWindow(cli.window!, '--window'));
      const sources = readSourceFolder(cli.from);
      // A strategy the player chose gets a warning; the default's reach (follow can spell far out) only a note.
      const warning = reachWarning(range, spellingReach(cli.spelling, key, window), cli.spelling, preset.tuning);
      const chosen = command.getOptionValueSource('spelling') === 'cli';
      if (warning) io.stderr.write(`diesis: ${chosen ? 'warning' : 'note'}: ${warning}\n`);
      const bar = progressBar(io.stderr, 'resampling');
      const manifest = buildSampleSet(
        { sources, tuning: preset.tuning, tuningName: preset.name, tuningId: preset.file.startsWith(PRESETS_DIR) ? preset.id : preset.file, reference, range, compass: { low, high }, maxShift: cli.maxShift },
        cli.to,
        bar.update,
      );
      bar.done();
      const worst = Math.max(...manifest.files.map((f) => Math.abs(f.shiftCents)));
      io.stdout.write(
        `${cli.to}: ${manifest.files.length} samples from ${sources.length} sources, ${preset.name} at ${formatReference(reference)} Hz\n` +
          `  range ${formatRange(range)}; channels: ${manifest.layout.map((l) => `${l.channel} ${l.spelling}`).join(', ')}\n` +
          `  largest shift ${(worst / 100).toFixed(2)} semitones; mapping diesis.sfz, manifest manifest.json\n` +
          `  play it: diesis play --in KEYBOARD --out SAMPLER --sample-set ${cli.to} -t ${preset.id} --ref ${formatReference(reference)}\n`,
      );
    });
}
