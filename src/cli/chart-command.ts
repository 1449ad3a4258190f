import type { Command } from 'commander';
import { buildChart, chartJson } from '../chart/chart.js';
import { chartCsv, chartText } from '../chart/chart-text.js';
import { parseFifthsRange } from '../pitch/index.js';
import { loadTuningPreset } from '../presets/tuning-presets.js';
import { A440, DEFAULT_WOLF_LIMITS, frequency, parseReference } from '../tuning/index.js';
import { renderDyads } from '../audio/preview.js';
import { writeWav } from '../audio/wav.js';
import { checkOutputPath, writeOutputFile } from '../util/files.js';
import { UserError } from '../util/errors.js';
import type { CommandIo } from './io.js';
import { integerOption, numberOption } from './options.js';
import { makeStyle, wantsColour } from './style.js';

interface ChartOptions {
  ref?: string;
  from: string;
  to: string;
  octave: number;
  json?: boolean;
  csv?: string | boolean;
  ascii?: boolean;
  wolfFifth: number;
  wolfThird: number;
  listen?: string;
}

export function registerChart(program: Command, io: CommandIo): void {
  program
    .command('chart')
    .description('chart a tuning: every spelling’s cents and Hz, enharmonic pairs, fifths and thirds with beats and wolves')
    .argument('<tuning>', 'a preset id (see "diesis presets") or a path to a tuning .json file')
    .option('--ref <note=hz>', 'reference pitch, as A4=415 or C4=256 (default: the preset’s, else A4=440)')
    .option('--from <pc>', 'flat end of the line of fifths shown', 'Gb')
    .option('--to <pc>', 'sharp end of the line of fifths shown', 'A#')
    .option('--octave <n>', 'octave of the notes and of the lower note of each interval', integerOption('--octave', -1, 9), 4)
    .option('--json', 'print the chart as JSON (fields documented in the README)')
    .option('--csv [table]', 'print "notes" (default) or "intervals" as CSV')
    .option('--ascii', 'write # and b instead of ♯ and ♭')
    .option('--wolf-fifth <cents>', 'a fifth further than this from 3/2 is a wolf', numberOption('--wolf-fifth', 0, 1200), DEFAULT_WOLF_LIMITS.fifth)
    .option('--wolf-third <cents>', 'a third further than this from 5/4 is a wolf', numberOption('--wolf-third', 0, 1200), DEFAULT_WOLF_LIMITS.third)
    .option('--listen <file.wav>', 'also write the chart’s fifths and thirds as sustained dyads, to hear the beats and the wolves')
    .action((tuningArg: string, options: ChartOptions) => {
      const preset = loadTuningPreset(tuningArg);
      if (options.listen) checkOutputPath('--listen', options.listen, 'wav', [preset.file]);
      const reference = options.ref !== undefined ? parseReference(options.ref, '--ref') : (preset.reference ?? A440);
      const range = parseFifthsRange(`${options.from}..${options.to}`, '--from/--to');
      const chart = buildChart({
        tuning: preset.tuning,
        reference,
        range,
        octave: options.octave,
        wolfLimits: { fifth: options.wolfFifth, third: options.wolfThird },
      });
      if (options.listen) {
        const pairs = chart.intervals.map((i) => [frequency(preset.tuning, reference, i.lower), frequency(preset.tuning, reference, i.upper)] as const);
        writeOutputFile('--listen', options.listen, 'wav', writeWav(renderDyads(pairs, 44_100), 16), [preset.file]);
      }
      if (options.json) {
        const meta = { id: preset.id, name: preset.name, kind: preset.kind, source: preset.source };
        io.stdout.write(JSON.stringify(chartJson(chart, meta), null, 2) + '\n');
      } else if (options.csv !== undefined) {
        const table = options.csv === true ? 'notes' : options.csv;
        if (table !== 'notes' && table !== 'intervals') throw new UserError(`--csv "${table}" must be "notes" or "intervals"`, 2);
        io.stdout.write(chartCsv(chart, table));
      } else {
        const ascii = options.ascii === true;
        io.stdout.write(
          chartText(chart, {
            ascii,
            style: makeStyle(wantsColour(io.stdout)),
            title: `${preset.name} (${preset.kind})`,
            subtitle: preset.source,
          }),
        );
      }
    });
}
