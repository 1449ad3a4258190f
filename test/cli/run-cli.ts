import { main } from '../../src/cli/main.js';

export interface CliResult {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs the CLI in-process with captured output (not a terminal, so no colour). */
export async function runCli(...args: string[]): Promise<CliResult> {
  let stdout = '';
  let stderr = '';
  const code = await main(['node', 'diesis', ...args], {
    stdout: { write: (s) => void (stdout += s) },
    stderr: { write: (s) => void (stderr += s) },
  });
  return { code, stdout, stderr };
}
