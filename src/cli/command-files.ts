import { UserError } from '../util/errors.js';
import { checkOutputPath } from '../util/files.js';
import { resolve } from 'node:path';
import type { ResolvedEngine } from './engine-options.js';

/** The files an engine command reads besides its own input: the tuning, the setup, the sample set. None may be an output. */
export function engineInputFiles(resolved: Pick<ResolvedEngine, 'preset' | 'setup' | 'sampleSet'>): string[] {
  return [resolved.preset.file, resolved.setup?.file, resolved.sampleSet?.dir].filter((f): f is string => f !== undefined);
}

/** Checks the live session's outputs before it starts: `--log` (appended) and `--record` (written at the end). */
export function checkSessionOutputs(log: string | undefined, record: string | undefined, inputs: readonly string[]): void {
  if (log !== undefined) checkOutputPath('--log', log, 'log', inputs);
  if (record !== undefined) checkOutputPath('--record', record, 'midi', inputs);
  if (log !== undefined && record !== undefined && resolve(log) === resolve(record)) throw new UserError(`--log and --record both name ${log}; give each its own file`, 2);
}
