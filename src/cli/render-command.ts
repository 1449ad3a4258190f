import { Option, type Command } from 'commander';
import { renderPreview, type VoiceKind } from '../audio/preview.js';
import { playSampleSet } from '../audio/sample-set.js';
import { writeWav } from '../audio/wav.js';
import { progressBar } from './progress.js';
import { resolve } from 'node:path';
import { renderEvents, type RenderSummary } from '../render/render-midi.js';
import { readMidiFile, writeMidiFile } from '../render/smf.js';
import { createRouter, formatChannels, resolveEngineOptions } from '../router/setup.js';
import { formatReference, type Reference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import { readInputFile, writeOutputFile } from '../util/files.js';
import type { CommandIo } from './io.js';
import { matchSummary, scoreSpellerOf } from '../score/with-score.js';

export function summaryText(summary: RenderSummary, header: string): string {
  const rows: Array<[string, string]> = [
    ['notes', `${summary.notesIn} in, ${summary.notesOut} out${summary.notesDropped ? `, ${summary.notesDropped} dropped (outside the synth's keys)` : ''}`],
    ['channels used', formatChannels(summary.channelsUsed) || 'none'],
    [summary.mode === 'bend' ? 'bend messages' : summary.mode === 'pass' ? 'tuning messages' : 'MTS messages', String(summary.retunes)],
    ['steals', String(summary.steals)],
    ['out of range', summary.outOfRange ? `${summary.outOfRange} notes needed more bend than the range allows` : '0'],
    ['bytes out/in', summary.bytesPerInputByte.toFixed(3)],
  ];
  if (summary.malformedBytes) rows.push(['malformed bytes', `${summary.malformedBytes} ignored`]);
  return [header, ...rows.map(([k, v]) => `  ${k.padEnd(16)}${v}`)].join('\n') + '\n';
}

export function describeSetup(tuningName: string, reference: Reference, mode: string, layout: string | undefined, channels: readonly number[]): string {
  const where = mode === 'bend' ? `${layout} on channels ${formatChannels(channels)}` : mode === 'samples' ? `on channels ${formatChannels(channels)}` : `on channel ${(channels[0] ?? 0) + 1}`;
  return `${tuningName} at ${formatReference(reference)} Hz, ${mode} ${where}`;
}

/** The channels an engine sends on, for the summary line. */
export function channelsOf(engine: { mode: string; channels: readonly number[]; sampleLayout?: ReadonlyMap<number, number> | undefined }): readonly number[] {
  return engine.mode === 'samples' && engine.sampleLayout ? [...new Set(engine.sampleLayout.values())] : engine.channels;
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
    for (const out of [cli.output, cli.wav]) if (out && resolve(out) === resolve(input)) throw new UserError(`${out}: refusing to overwrite the input file`, 2);
    const { preset, options, sampleSet, speller } = resolveEngineCli(cli);
    const content = readMidiFile(readInputFile(input), input);
    const engine = resolveEngineOptions({ ...options, gather: 'same-time' }); // in a file, equal onsets are a chord
    let times: number[] = [];
    const { messages, summary } = renderEvents(content, createRouter(engine), engine.releaseGuardMs, undefined, (ms) => (times = ms));
    if (cli.output) writeOutputFile(cli.output, writeMidiFile(content.division, content.meta, [messages]));
    if (cli.wav) {
      const bar = progressBar(io.stderr, 'rendering audio');
      const timed = messages.map((m, i) => ({ time: times[i] ?? 0, data: m.data }));
      const rate = Number(cli.rate);
      const audio = sampleSet ? playSampleSet(timed, sampleSet, rate, bar.update) : renderPreview(timed, { sampleRate: rate, voice: cli.voice, synthA4: engine.synthA4, progress: bar.update });
      bar.done();
      writeOutputFile(cli.wav, writeWav(audio, cli.bits === '24' ? 24 : 16));
    }
    const setup = describeSetup(preset.name, engine.reference, engine.mode, engine.layout, channelsOf(engine));
    const written = [cli.output, cli.wav].filter(Boolean).join(' and ');
    io.stdout.write(summaryText(summary, `${input} → ${written}: ${setup}`));
    const score = scoreSpellerOf(speller);
    if (score) io.stdout.write(`  ${'score'.padEnd(16)}${matchSummary(score.counts)}\n`);
  });
}
