import { describe, expect, it } from 'vitest';
import { runCli } from './run-cli.js';

// The project's rule for errors (DEVELOPERS.md, "Adding a command"): one line saying what is wrong
// and where, exit code 2 for a mistake in the command line itself.
describe('a mistake in the command line is one line that names what was given', () => {
  it.each([
    ['samples: a --compass that is not two keys', ['samples', '--from', 'in', '--to', 'out', '--compass', 'abc'], 'diesis: --compass "abc" must be two keys, low-high, as 36-96\n'],
    ['samples: a --compass of one key', ['samples', '--from', 'in', '--to', 'out', '--compass', '60'], 'diesis: --compass "60" must be two keys, low-high, as 36-96\n'],
    ['samples: a --compass key beyond MIDI’s 0–127', ['samples', '--from', 'in', '--to', 'out', '--compass', '1-200'], 'diesis: --compass "200" must be a whole number from 0 to 127\n'],
    ['ports: --stop-after without --watch or --learn', ['ports', '--stop-after', '1'], 'diesis: ports: --stop-after goes with --watch or --learn\n'],
    ['ports: --in without --watch or --learn', ['ports', '--in', 'x'], 'diesis: ports: --in goes with --watch or --learn\n'],
    ['a misspelt command, with the near one', ['chrat'], "diesis: unknown command 'chrat': did you mean chart?\n"],
    ['a misspelt option, with the near one', ['chart', 'meantone-1-4', '--jsn'], "diesis: unknown option '--jsn': did you mean --json?\n"],
    ['help for a command that does not exist', ['help', 'chrat'], "diesis: unknown command 'chrat': did you mean chart?\n"],
    ['help for a command that does not exist, nor anything near it', ['help', 'wolves'], "diesis: unknown command 'wolves'\n"],
  ] as const)('%s', async (_name, args, line) => {
    const result = await runCli(...args);
    expect(result.stderr).toBe(line);
    expect(result.code).toBe(2);
    expect(result.stdout).toBe('');
  });

  it('help for a command that exists still prints its help', async () => {
    const result = await runCli('help', 'chart');
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/^Usage: diesis chart \[options\] <tuning>/u);
  });
});
