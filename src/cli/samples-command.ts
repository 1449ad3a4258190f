import type { Command } from 'commander';
import { buildSampleSet, readSourceFolder } from '../audio/sample-set.js';
import { parseFifthsRange } from '../pitch/index.js';
import { loadTuningPreset } from '../presets/tuning-presets.js';
import { A440, formatReference, parseReference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import type { CommandIo } from '../util/io.js';
import { integerOption, numberOption } from './options.js';
import { progressBar } from './progress.js';

interface SamplesOptions {
  from: string;
  to: string;
  tuning: string;
  ref?: string;
  range: string;
  compass: string;
  maxShift: number;
}

export function registerSamples(program: Command, io: CommandIo): void {
  program
    .command('samples')
    .description('build a retuned sample set: every spelling at its exact frequency, an SFZ map and a manifest')
    .requiredOption('--from <dir>', 'your samples: WAV files named after their note (C4.wav, 060.wav) or listed in map.json')
    .requiredOption('--to <dir>', 'the folder to write (replaced only once the whole set is made)')
    .option('-t, --tuning <id|file>', 'tuning preset id or .json file', 'meantone-1-4')
    .option('--ref <note=hz>', 'reference pitch (default: the preset’s, else A4=440)')
    .option('--range <from..to>', 'the spellings to build, at most 16 (each gets a channel)', 'Eb..G#')
    .option('--compass <low-high>', 'the instrument’s keys, as MIDI numbers', '36-96')
    .option('--max-shift <semitones>', 'refuse to shift a sample further than this', numberOption('--max-shift', 0, 24), 4)
    .action((cli: SamplesOptions) => {
      const preset = loadTuningPreset(cli.tuning);
      const reference = cli.ref !== undefined ? parseReference(cli.ref, '--ref') : (preset.reference ?? A440);
      const compass = /^(\d+)-(\d+)$/u.exec(cli.compass);
      const low = integerOption('--compass', 0, 127)(compass?.[1] ?? 'x');
      const high = integerOption('--compass', 0, 127)(compass?.[2] ?? 'x');
      if (!compass || high < low) throw new UserError(`--compass "${cli.compass}" must be two keys, low-high, as 36-96`, 2);
      const sources = readSourceFolder(cli.from);
      const bar = progressBar(io.stderr, 'resampling');
      const manifest = buildSampleSet(
        { sources, tuning: preset.tuning, tuningName: preset.name, reference, range: parseFifthsRange(cli.range, '--range'), compass: { low, high }, maxShift: cli.maxShift },
        cli.to,
        bar.update,
      );
      bar.done();
      const worst = Math.max(...manifest.files.map((f) => Math.abs(f.shiftCents)));
      io.stdout.write(
        `${cli.to}: ${manifest.files.length} samples from ${sources.length} sources, ${preset.name} at ${formatReference(reference)} Hz\n` +
          `  channels: ${manifest.layout.map((l) => `${l.channel} ${l.spelling}`).join(', ')}\n` +
          `  largest shift ${(worst / 100).toFixed(2)} semitones; mapping diesis.sfz, manifest manifest.json\n` +
          `  play it: diesis play --in KEYBOARD --out SAMPLER --sample-set ${cli.to} -t ${preset.id} --ref ${formatReference(reference)}\n`,
      );
    });
}
