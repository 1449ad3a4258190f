import type { Command } from 'commander';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, relative, resolve } from 'node:path';
import { formatProblem, parseJsonText } from '../presets/problems.js';
import { checkSetup } from '../presets/setup-file.js';
import { readScoreFile } from '../score/read-score.js';
import { checkTuningPreset, loadBuiltInTuningPresets, PRESETS_DIR } from '../presets/tuning-presets.js';
import { UserError } from '../util/errors.js';
import type { CommandIo } from './io.js';
import { makeStyle, wantsColour } from './style.js';
import { renderTable } from './table.js';

export function registerPresetCommands(program: Command, io: CommandIo): void {
  program
    .command('presets')
    .description('list the built-in tunings')
    .option('--json', 'print them as JSON')
    .action((options: { json?: boolean }) => {
      const presets = loadBuiltInTuningPresets();
      if (options.json) {
        const list = presets.map(({ id, name, kind, description, source }) => ({ id, name, kind, description, source }));
        io.stdout.write(JSON.stringify(list, null, 2) + '\n');
        return;
      }
      const style = makeStyle(wantsColour(io.stdout));
      io.stdout.write(
        renderTable(
          [
            { header: 'id', align: 'left' },
            { header: 'kind', align: 'left' },
            { header: 'name', align: 'left' },
          ],
          presets.map((p) => [style.cyan(p.id), p.kind, p.name]),
          style.bold,
        ) + '\n\n',
      );
      for (const p of presets) io.stdout.write(`${style.cyan(p.id)}: ${p.description}\n  ${style.dim(`source: ${p.source}`)}\n`);
      const example = relative(process.cwd(), `${PRESETS_DIR}examples/custom-tuning.json`);
      io.stdout.write(`\nWrite your own: copy ${example}, edit it, run "diesis check" on it, and give its path wherever a tuning id goes.\n`);
    });

  program
    .command('check')
    .description('validate a tuning or setup file and print every problem in it')
    .argument('<file>', 'a tuning or setup .json file (a tuning has a "kind")')
    .action((file: string) => {
      if (!existsSync(file)) throw new UserError(`${file}: no such file`);
      const text = readFileSync(file, 'utf8');
      const isTuning = (() => {
        const json = parseJsonText(text, file);
        return typeof json === 'object' && json !== null && 'kind' in json;
      })();
      const check = isTuning ? checkTuningPreset(text, file) : checkSetup(text, file);
      const ok = 'preset' in check ? check.preset && `${check.preset.name} (${check.preset.kind})` : check.setup && `setup${check.setup.json.name ? ` "${check.setup.json.name}"` : ''}`;
      if (ok) {
        const scoreFile = 'setup' in check ? check.setup?.json.score : undefined;
        const score = scoreFile === undefined ? undefined : readScoreFile(resolve(dirname(file), scoreFile)); // a bad score is one line naming it
        io.stdout.write(`${file}: ok: ${ok}${score ? `, score ${scoreFile} (${score.measures.length} measures, ${score.groups.reduce((n, g) => n + g.notes.length, 0)} notes)` : ''}\n`);
        return;
      }
      for (const problem of check.problems) io.stderr.write(formatProblem(file, problem) + '\n');
      throw new UserError(`${file}: ${check.problems.length} problem${check.problems.length === 1 ? '' : 's'}`);
    });
}
