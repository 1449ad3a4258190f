import type { Command } from 'commander';
import { formatSpelledPitch } from '../pitch/index.js';
import { renderEvents } from '../render/render-midi.js';
import { readMidiFile } from '../render/smf.js';
import { SpellReport } from '../render/spell-report.js';
import { fileGather } from '../router/chord-gatherer.js';
import { createEngine } from '../router/setup.js';
import { channelOf, keyOfNote, sourceOf } from '../midi/note-id.js';
import { DEFAULT_WOLF_LIMITS } from '../tuning/index.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import type { CommandIo } from '../util/io.js';
import { readInputFile, refuseFolderInput } from '../util/files.js';
import { matchOf, matchSummary, mismatchWarning, scoreSpellerOf } from '../score/score-status.js';
import { describeSetup } from './render-command.js';
import { makeStyle, wantsColour } from '../text/style.js';
import { renderTable, signed } from '../text/table.js';

interface SpellOptions extends EngineCliOptions {
  json?: boolean;
  ascii?: boolean;
}

export function registerSpell(program: Command, io: CommandIo): void {
  const command = program
    .command('spell')
    .description('preview how a Standard MIDI File will be spelled and tuned: every note-on, then a summary')
    .argument('<file.mid>', 'the piece to preview')
    .option('--json', 'JSON Lines, one object per note-on in file order (fields in the README)')
    .option('--ascii', 'write # and b instead of ♯ and ♭');
  addEngineOptions(command).action((input: string, cli: SpellOptions) => {
    refuseFolderInput(input, 'a Standard MIDI File: give the piece to spell, as piece.mid');
    const { preset, options, spellingLabel, speller, strategy } = resolveEngineCli(cli);
    const score = scoreSpellerOf(speller);
    const content = readMidiFile(readInputFile(input), input);
    let tick = 0;
    const report = new SpellReport(DEFAULT_WOLF_LIMITS);
    const engine = createEngine({
      ...options,
      gather: fileGather(options.gather),
      observer: (e) => {
        if (e.type === 'note') {
          const m = matchOf(speller, sourceOf(e.id), channelOf(e.id), keyOfNote(e.id));
          report.note(e, tick, m && { bar: m.bar, match: m.match });
          const key = strategy === 'follow' ? speller.currentKey() : undefined;
          if (key) report.countKey(key);
        } else if (e.type === 'key-up') report.noteOff(e.id);
      },
    });
    renderEvents(content, engine, (t) => (tick = t));
    if (cli.json) {
      io.stdout.write(report.jsonLines());
      return;
    }
    const names = { accidentals: cli.ascii ? ('ascii' as const) : ('unicode' as const) };
    const style = makeStyle(wantsColour(io.stdout));
    io.stdout.write(style.bold(`${input}: ${describeSetup(preset.name, engine.options)}, spelling ${score ? `from the score, else ${spellingLabel}` : spellingLabel}`) + '\n');
    const adaptive = report.rows.some((r) => r.fromTable !== undefined);
    const columns = [
      { header: 'time', align: 'right' as const },
      { header: 'tick', align: 'right' as const },
      { header: 'key', align: 'right' as const },
      { header: 'ch', align: 'right' as const },
      { header: 'spelling', align: 'left' as const },
      { header: 'Hz', align: 'right' as const },
      { header: 'cents', align: 'right' as const },
      ...(adaptive ? [{ header: 'from table', align: 'right' as const }] : []),
      ...(score ? [{ header: 'bar', align: 'right' as const }, { header: 'match', align: 'left' as const }] : []),
    ];
    const rows = report.rows.map((r) => [
      r.time.toFixed(3),
      String(r.tick),
      String(r.key),
      String(r.channel),
      formatSpelledPitch(r.pitch, names),
      r.hz.toFixed(3),
      signed(r.cents, 2, cli.ascii),
      ...(adaptive ? [signed(r.fromTable ?? 0, 2, cli.ascii)] : []),
      ...(score ? [r.score?.bar ?? '-', r.score?.match ?? ''] : []),
    ]);
    io.stdout.write(renderTable(columns, rows, style.bold) + '\n\n');
    const { tally } = engine;
    const extra = [
      tally.notesDropped ? `${tally.notesDropped} dropped (${tally.dropSummary()})` : '',
      tally.substitutions ? `${tally.substitutions} played as the nearest spelling the sample set has` : '',
      tally.outOfRange ? `${tally.outOfRange} beyond what the output can tune` : '',
      tally.compromises ? `${tally.compromises} placed at a compromise pitch` : '',
    ].filter(Boolean);
    const matched = score ? `: ${matchSummary(score.counts)}` : '';
    const mismatch = score && mismatchWarning(score.counts);
    if (mismatch) io.stderr.write(`diesis: ${mismatch}\n`);
    io.stdout.write(`${report.rows.length} notes${matched}${extra.length ? `; ${extra.join('; ')}` : ''}\n` + report.summaryText(names));
  });
}
