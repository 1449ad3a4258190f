import type { Command } from 'commander';
import { buildChart, chartJson } from '../chart/chart.js';
import { chartCsv, chartText } from '../chart/chart-text.js';
import { parseFifthsRange } from '../pitch/index.js';
import { loadTuningPreset, type TuningPreset } from '../presets/tuning-presets.js';
import { A440, DEFAULT_WOLF_LIMITS, frequency, isAdaptive, parseReference } from '../tuning/index.js';
import { describeAdaptive } from '../tuning/adaptive/describe.js';
import { dyadStartTimes, renderDyads } from '../audio/preview.js';
import { chartSvg } from '../chart/chart-svg.js';
import { formatSpelledPitch } from '../pitch/index.js';
import { writeWav } from '../audio/wav.js';
import { runWithOutputs } from '../util/files.js';
import { UserError } from '../util/errors.js';
import type { CommandIo } from '../util/io.js';
import { integerOption, numberOption, optionValue } from './options.js';
import { makeStyle, wantsColour } from '../text/style.js';

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
  svg?: string;
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
    .option('--listen <file.wav>', 'also write the chart’s fifths and thirds as sustained dyads, to hear the beats and the wolves (prints a cue list)')
    .option('--svg <file.svg>', 'also draw the chart as a picture: the line of fifths, cents from 12-ET, fifths and thirds from pure, gaps and wolves')
    .action((tuningArg: string, options: ChartOptions) => {
      if (options.json && options.csv !== undefined) throw new UserError('--json and --csv each print the whole chart: give one of them', 2);
      const preset = loadTuningPreset(tuningArg);
      let cues = '';
      const text = runWithOutputs([preset.file], (outputs) => {
        if (options.listen) outputs.claim('--listen', options.listen, 'wav');
        if (options.svg) outputs.claim('--svg', options.svg, 'svg');
        const reference = options.ref !== undefined ? optionValue(() => parseReference(options.ref!, '--ref')) : (preset.reference ?? A440);
        const range = optionValue(() => parseFifthsRange(`${options.from}..${options.to}`, '--from/--to'));
        const chart = buildChart({
          tuning: preset.tuning,
          reference,
          range,
          octave: options.octave,
          wolfLimits: { fifth: options.wolfFifth, third: options.wolfThird },
        });
        const printed = chartOutput(chart, preset, options, io);
        if (options.listen) {
          const pairs = chart.intervals.map((i) => [frequency(preset.tuning, reference, i.lower), frequency(preset.tuning, reference, i.upper)] as const);
          outputs.stage(options.listen, writeWav(renderDyads(pairs, 44_100), 16));
          cues = `\n${options.listen}: ${chart.intervals.length} dyads\n${cueList(chart.intervals, options.ascii === true)}`;
        }
        if (options.svg) outputs.stage(options.svg, new TextEncoder().encode(chartSvg(chart, { title: `${preset.name} (${preset.kind})`, subtitle: preset.source })));
        return printed;
      });
      io.stdout.write(text);
      // The cue list goes with the chart on stdout, or to stderr when stdout carries JSON or CSV.
      if (cues) (options.json || options.csv !== undefined ? io.stderr : io.stdout).write(cues);
    });
}

/** Where each dyad of `--listen` starts (m:ss.s) and what it is, so a wolf can be found without counting. */
export function cueList(intervals: ReturnType<typeof buildChart>['intervals'], ascii: boolean): string {
  const style = { accidentals: ascii ? 'ascii' : 'unicode' } as const;
  const starts = dyadStartTimes(intervals.length, 44_100);
  return intervals
    .map((i, k) => {
      const t = starts[k] ?? 0;
      const time = `${Math.floor(t / 60)}:${(t % 60).toFixed(1).padStart(4, '0')}`;
      const name = `${formatSpelledPitch(i.lower, style)}${ascii ? '-' : '–'}${formatSpelledPitch(i.upper, style)}`;
      return `${time}  ${name.padEnd(9)} ${i.quality}${i.wolf ? '  wolf' : ''}\n`;
    })
    .join('');
}

/** The chart as the options ask: JSON, CSV or tables. */
function chartOutput(chart: ReturnType<typeof buildChart>, preset: TuningPreset, options: ChartOptions, io: CommandIo): string {
  if (options.json) {
    const meta = { id: preset.id, name: preset.name, kind: preset.kind, source: preset.source };
    const json = chartJson(chart, meta) as Record<string, unknown>;
    const adaptive = isAdaptive(preset.tuning) ? { adaptive: { explanation: describeAdaptive(preset.tuning.settings).join(' '), settings: preset.tuning.settings } } : {};
    return JSON.stringify({ ...json, ...adaptive }, null, 2) + '\n';
  }
  if (options.csv !== undefined) {
    const table = options.csv === true ? 'notes' : options.csv;
    if (table !== 'notes' && table !== 'intervals') throw new UserError(`--csv "${table}" must be "notes" or "intervals"`, 2);
    return chartCsv(chart, table);
  }
  return chartText(chart, {
    ascii: options.ascii === true,
    style: makeStyle(wantsColour(io.stdout)),
    title: `${preset.name} (${preset.kind})`,
    subtitle: isAdaptive(preset.tuning) ? [preset.source, '', ...describeAdaptive(preset.tuning.settings)].join('\n') : preset.source,
  });
}
