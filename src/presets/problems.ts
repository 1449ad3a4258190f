import type { z } from 'zod';
import { UserError } from '../util/errors.js';

/** One thing wrong with a file, located by a JSON path (`$.fifth`, `$.degrees.Db`). */
export interface Problem {
  readonly path: string;
  readonly message: string;
}

export function jsonPath(path: ReadonlyArray<PropertyKey>): string {
  return path.reduce<string>((text, key) => (typeof key === 'number' ? `${text}[${key}]` : `${text}.${String(key)}`), '$');
}

export function zodProblems(error: z.ZodError): Problem[] {
  return error.issues.map((issue) => ({ path: jsonPath(issue.path), message: issue.message }));
}

/** Runs `fn`; a UserError it throws becomes a problem at `path` instead of escaping. */
export function collecting<T>(problems: Problem[], path: string, fn: () => T): T | undefined {
  try {
    return fn();
  } catch (error) {
    if (error instanceof UserError) {
      const message = error.message.startsWith(`${path}: `) ? error.message.slice(path.length + 2) : error.message;
      problems.push({ path, message });
      return undefined;
    }
    throw error;
  }
}

export function formatProblem(file: string, problem: Problem): string {
  return `${file}: ${problem.path}: ${problem.message}`;
}

/** Throws the first problem as a one-line UserError, saying how many more there are. */
export function throwProblems(file: string, problems: readonly Problem[], hint: string): never {
  const [first] = problems;
  const more = problems.length > 1 ? ` (and ${problems.length - 1} more problem${problems.length > 2 ? 's' : ''}; ${hint})` : '';
  throw new UserError(first ? formatProblem(file, first) + more : `${file}: invalid`);
}

/** Parses JSON text, turning a syntax error into a problem that names the file. */
export function parseJsonText(text: string, file: string): unknown {
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    const detail = error instanceof Error ? error.message : String(error);
    throw new UserError(`${file}: not valid JSON: ${detail}`);
  }
}
