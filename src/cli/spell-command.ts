import type { Command } from 'commander';
import { formatSpelledPitch } from '../pitch/index.js';
import { renderEvents } from '../render/render-midi.js';
import { readMidiFile } from '../render/smf.js';
import { SpellReport } from '../render/spell-report.js';
import { createRouter, resolveEngineOptions } from '../router/setup.js';
import { DEFAULT_WOLF_LIMITS } from '../tuning/index.js';
import { addEngineOptions, resolveEngineCli, type EngineCliOptions } from './engine-options.js';
import type { CommandIo } from './io.js';
import { readInputFile } from '../util/files.js';
import { matchOf, matchSummary, scoreSpellerOf } from '../score/with-score.js';
import { describeSetup } from './render-command.js';
import { makeStyle, wantsColour } from './style.js';
import { renderTable, signed } from './table.js';

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
    const { preset, options, strategy, speller } = resolveEngineCli(cli);
    const score = scoreSpellerOf(speller);
    const content = readMidiFile(readInputFile(input), input);
    let tick = 0;
    const engine = resolveEngineOptions({ ...options, gather: 'same-time' });
    const report = new SpellReport(DEFAULT_WOLF_LIMITS);
    const router = createRouter({
      ...engine,
      observer: (e) => {
        if (e.type === 'note') {
          const m = matchOf(speller, e.source, e.inChannel, e.inKey);
          report.note(e, tick, m && { bar: m.bar, match: m.match });
        } else if (e.type === 'key-up') report.noteOff(e.source, e.inChannel, e.inKey);
      },
    });
    renderEvents(content, router, engine.releaseGuardMs, (t) => (tick = t));
    if (cli.json) {
      io.stdout.write(report.jsonLines());
      return;
    }
    const names = { accidentals: cli.ascii ? ('ascii' as const) : ('unicode' as const) };
    const style = makeStyle(wantsColour(io.stdout));
    io.stdout.write(style.bold(`${input}: ${describeSetup(preset.name, engine.reference, engine.mode, engine.layout, engine.channels)}, spelling ${score ? `from the score, else ${strategy}` : strategy}`) + '\n');
    io.stdout.write(
      renderTable(
        [
          { header: 'time', align: 'right' },
          { header: 'tick', align: 'right' },
          { header: 'key', align: 'right' },
          { header: 'ch', align: 'right' },
          { header: 'spelling', align: 'left' },
          { header: 'Hz', align: 'right' },
          { header: 'cents', align: 'right' },
          ...(score ? [{ header: 'bar', align: 'right' as const }, { header: 'match', align: 'left' as const }] : []),
        ],
        report.rows.map((r) => [
          r.time.toFixed(3),
          String(r.tick),
          String(r.key),
          String(r.channel),
          formatSpelledPitch(r.pitch, names),
          r.hz.toFixed(3),
          signed(r.cents, 2, cli.ascii),
          ...(score ? [r.score?.bar ?? '-', r.score?.match ?? ''] : []),
        ]),
        style.bold,
      ) + '\n\n',
    );
    io.stdout.write(`${report.rows.length} notes${score ? `: ${matchSummary(score.counts)}` : ''}\n` + report.summaryText(names));
  });
}
