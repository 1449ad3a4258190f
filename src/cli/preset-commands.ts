import type { Command } from 'commander';
import { relative } from 'node:path';
import { formatProblem, inFileOrder, parseJsonText } from '../presets/problems.js';
import { checkSetup } from '../presets/setup-file.js';
import { isProgrammeValue } from '../presets/programme-file.js';
import { reportProgrammeCheck } from './programme-command.js';
import { checkTuningPreset, loadBuiltInTuningPresets, PRESETS_DIR } from '../presets/tuning-presets.js';
import { UserError } from '../util/errors.js';
import { readTextFile } from '../util/files.js';
import type { CommandIo } from '../util/io.js';
import { makeStyle, wantsColour } from '../text/style.js';
import { renderTable } from '../text/table.js';

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
    .description('validate a tuning, setup or concert programme exactly as play, render and spell load it, and print every problem in it')
    .argument('<file>', 'a tuning, setup or programme .json file (a tuning has a "kind", a programme "pieces")')
    .action((file: string) => {
      const text = readTextFile(file);
      const value = parseJsonText(text, file);
      if (isProgrammeValue(value)) {
        reportProgrammeCheck(file, io);
        return;
      }
      const isTuning = typeof value === 'object' && value !== null && 'kind' in value;
      const check = isTuning ? checkTuningPreset(text, file) : checkSetup(text, file);
      for (const problem of inFileOrder(check.problems, check.source)) io.stderr.write(formatProblem(file, problem, check.source) + '\n');
      const ok = 'preset' in check ? check.preset && `${check.preset.name} (${check.preset.kind})` : check.setup && `setup${check.setup.json.name ? ` "${check.setup.json.name}"` : ''}`;
      if (ok) {
        const score = 'setup' in check ? check.setup?.score : undefined;
        const scoreText = score && 'setup' in check ? `, score ${check.setup?.json.score} (${score.measures.length} measures, ${score.groups.reduce((n, g) => n + g.notes.length, 0)} notes)` : '';
        io.stdout.write(`${file}: ok: ${ok}${scoreText}\n`);
        return;
      }
      const count = check.problems.filter((p) => !p.warning).length;
      throw new UserError(`${file}: ${count} problem${count === 1 ? '' : 's'}`);
    });
}
