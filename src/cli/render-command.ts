import { Option, type Command } from 'commander';
import { renderPreview, type VoiceKind } from '../audio/preview.js';
import { playSampleSet } from '../audio/sample-set.js';
import { writeWav } from '../audio/wav.js';
import { progressBar } from './progress.js';
import { renderEvents, type RenderSummary } from '../render/render-midi.js';
import { readMidiFile, writeMidiFile } from '../render/smf.js';
import { fileGather } from '../router/chord-gatherer.js';
import { createEngine, OUTPUT_MODES, type EngineOptions } from '../router/setup.js';
import { formatChannels } from '../text/channels.js';
import { formatReference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import { readInputFile, refuseFolderInput, runWithOutputs } from '../util/files.js';
import { engineInputFiles } from './command-files.js';
import type { CommandIo } from '../util/io.js';
import { matchSummary, mismatchWarning, scoreSpellerOf } from '../score/score-status.js';

export function summaryText(summary: RenderSummary, header: string): string {
  const rows: Array<[string, string]> = [
    ['notes', `${summary.notesIn} in, ${summary.notesOut} out${summary.notesDropped ? `, ${summary.notesDropped} dropped (${summary.dropped})` : ''}`],
    ['channels used', formatChannels(summary.channelsUsed) || 'none'],
    [OUTPUT_MODES[summary.mode].retuneLabel, String(summary.retunes)],
    ['steals', String(summary.steals)],
    ['out of range', summary.outOfRange ? `${summary.outOfRange} notes needed more than the output can tune` : '0'],
    ['bytes out/in', summary.bytesPerInputByte.toFixed(3)],
  ];
  if (summary.compromises) rows.push(['compromises', `${summary.compromises} notes could not make every interval pure`]);
  if (summary.substitutions) rows.push(['substituted', `${summary.substitutions} notes played as the nearest spelling the sample set has`]);
  if (summary.malformedBytes) rows.push(['malformed bytes', `${summary.malformedBytes} ignored`]);
  return [header, ...rows.map(([k, v]) => `  ${k.padEnd(16)}${v}`)].join('\n') + '\n';
}

/** One line: tuning, reference, mode and where it sends. */
export function describeSetup(tuningName: string, engine: Pick<EngineOptions, 'reference' | 'mode' | 'layout' | 'channels' | 'sampleLayout'>): string {
  const kind = OUTPUT_MODES[engine.mode].channels;
  const channels = kind === 'set' && engine.sampleLayout ? [...new Set(engine.sampleLayout.values())] : engine.channels;
  const where = engine.mode === 'bend' ? `${engine.layout} on channels ${formatChannels(channels)}` : kind === 'set' ? `on channels ${formatChannels(channels)}` : `on channel ${(channels[0] ?? 0) + 1}`;
  return `${tuningName} at ${formatReference(engine.reference)} Hz, ${engine.mode} ${where}`;
}

interface RenderOptions extends EngineCliOptions {
  output?: string;
  wav?: string;
  rate: string;
  bits: string;
  voice: VoiceKind;
}

export function registerRender(program: Command, io: CommandIo): void {
  const command = program
    .command('render')
    .description('run a Standard MIDI File through the engine and write one that any synth or DAW plays in tune')
    .argument('<in.mid>', 'the performance to render')
    .option('-o, --output <out.mid>', 'the Standard MIDI File to write')
    .option('--wav <out.wav>', 'also (or instead) write an audio preview at the tuned frequencies')
    .addOption(new Option('--rate <hz>', 'audio sample rate').choices(['44100', '48000']).default('44100'))
    .addOption(new Option('--bits <n>', 'audio bit depth').choices(['16', '24']).default('16'))
    .addOption(new Option('--voice <voice>', 'the built-in voice of the preview (with --sample-set the preview plays the set)').choices(['pluck', 'organ']).default('pluck'));
  addEngineOptions(command).action((input: string, cli: RenderOptions) => {
    if (!cli.output && !cli.wav) throw new UserError('render needs -o OUT.mid or --wav OUT.wav, the file to write', 2);
    refuseFolderInput(input, 'a Standard MIDI File: give the piece to render, as piece.mid');
    for (const name of ['rate', 'bits', 'voice'] as const) {
      if (!cli.wav && command.getOptionValueSource(name) === 'cli') throw new UserError(`--${name} is for the audio preview: give --wav OUT.wav too`, 2);
    }
    const resolved = resolveEngineCli(cli);
    const { preset, options, sampleSet, spellingLabel, speller } = resolved;
    const engine = createEngine({ ...options, gather: fileGather(options.gather) });
    // Every output is checked before the work and written only when all of it has succeeded.
    const summary = runWithOutputs([input, ...engineInputFiles(resolved)], (outputs) => {
      if (cli.output) outputs.claim('-o', cli.output, 'midi');
      if (cli.wav) outputs.claim('--wav', cli.wav, 'wav');
      const content = readMidiFile(readInputFile(input), input);
      let times: number[] = [];
      const rendered = renderEvents(content, engine, undefined, (ms) => (times = ms));
      const { messages } = rendered;
      if (cli.output) outputs.stage(cli.output, writeMidiFile(content.division, content.meta, [messages]));
      if (cli.wav) {
        const bar = progressBar(io.stderr, 'rendering audio');
        const timed = messages.map((m, i) => ({ time: times[i] ?? 0, data: m.data }));
        const rate = Number(cli.rate);
        try {
          const audio = sampleSet ? playSampleSet(timed, sampleSet, rate, bar.update) : renderPreview(timed, { sampleRate: rate, voice: cli.voice, synthA4: engine.options.synthA4, progress: bar.update });
          outputs.stage(cli.wav, writeWav(audio, cli.bits === '24' ? 24 : 16));
        } finally {
          bar.done();
        }
      }
      return rendered.summary;
    });
    const setup = describeSetup(preset.name, engine.options);
    const written = [cli.output, cli.wav].filter(Boolean).join(' and ');
    io.stdout.write(summaryText(summary, `${input} → ${written}: ${setup}, spelling ${spellingLabel}`));
    const score = scoreSpellerOf(speller);
    if (score) io.stdout.write(`  ${'score'.padEnd(16)}${matchSummary(score.counts)}\n`);
    const mismatch = score && mismatchWarning(score.counts);
    if (mismatch) io.stderr.write(`diesis: ${mismatch}\n`);
  });
}
