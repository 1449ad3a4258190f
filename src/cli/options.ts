import { UserError } from '../util/errors.js';

/** Commander argument parsers that fail with one clear line naming the option. */
export function integerOption(name: string, min: number, max: number) {
  return (text: string): number => {
    const n = Number(text);
    if (!/^-?\d+$/u.test(text.trim()) || n < min || n > max) throw new UserError(`${name} "${text}" must be a whole number from ${min} to ${max}`, 2);
    return n;
  };
}

export function numberOption(name: string, min: number, max: number) {
  return (text: string): number => {
    const n = Number(text);
    if (text.trim() === '' || !Number.isFinite(n) || n < min || n > max) throw new UserError(`${name} "${text}" must be a number from ${min} to ${max}`, 2);
    return n;
  };
}

/**
 * Reads a value given on the command line (`--ref`, `--key`, `--window`, a range): one that cannot
 * be read is a mistake in the command line itself, exit code 2, as for every other option.
 */
export function optionValue<T>(read: () => T): T {
  try {
    return read();
  } catch (error) {
    if (error instanceof UserError && error.exitCode !== 2) throw new UserError(error.message, 2);
    throw error;
  }
}
