import type { Command } from 'commander';
import { readFileSync, renameSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { renderEvents, type RenderSummary } from '../render/render-midi.js';
import { readMidiFile, writeMidiFile } from '../render/smf.js';
import { createRouter, formatChannels, resolveEngineOptions } from '../router/setup.js';
import { formatReference, type Reference } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import type { CommandIo } from './io.js';

export function readInputFile(file: string): Uint8Array {
  try {
    return readFileSync(file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new UserError(code === 'ENOENT' ? `${file}: no such file` : `${file}: cannot be read (${code ?? String(error)})`);
  }
}

/** Writes through a temporary file and a rename, so a failed write never leaves half a file. */
export function writeOutputFile(file: string, bytes: Uint8Array): void {
  const temporary = `${file}.${process.pid}.tmp`;
  try {
    writeFileSync(temporary, bytes);
    renameSync(temporary, file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new UserError(`${file}: cannot be written (${code ?? String(error)})`);
  }
}

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
  const where = mode === 'bend' ? `${layout} on channels ${formatChannels(channels)}` : `on channel ${(channels[0] ?? 0) + 1}`;
  return `${tuningName} at ${formatReference(reference)} Hz, ${mode} ${where}`;
}

interface RenderOptions extends EngineCliOptions {
  output?: string;
}

export function registerRender(program: Command, io: CommandIo): void {
  const command = program
    .command('render')
    .description('run a Standard MIDI File through the engine and write one that any synth or DAW plays in tune')
    .argument('<in.mid>', 'the performance to render')
    .option('-o, --output <out.mid>', 'the Standard MIDI File to write');
  addEngineOptions(command).action((input: string, cli: RenderOptions) => {
    if (!cli.output) throw new UserError('render needs -o OUT.mid, the file to write', 2);
    if (resolve(cli.output) === resolve(input)) throw new UserError(`-o ${cli.output}: refusing to overwrite the input file`, 2);
    const { preset, options } = resolveEngineCli(cli);
    const content = readMidiFile(readInputFile(input), input);
    const engine = resolveEngineOptions({ ...options, gather: 'same-time' }); // in a file, equal onsets are a chord
    const { messages, summary } = renderEvents(content, createRouter(engine), engine.releaseGuardMs);
    writeOutputFile(cli.output, writeMidiFile(content.division, content.meta, [messages]));
    const setup = describeSetup(preset.name, engine.reference, engine.mode, engine.layout, engine.channels);
    io.stdout.write(summaryText(summary, `${input} → ${cli.output}: ${setup}`));
  });
}
