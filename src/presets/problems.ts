import type { z } from 'zod';
import { UserError } from '../util/errors.js';
import { parseJsonSource, type JsonSource } from './json-source.js';

/** One thing wrong with a file, located by a JSON path (`$.fifth`, `$.degrees.Db`). */
export interface Problem {
  readonly path: string;
  readonly message: string;
  /** A warning: the file works, but probably not as meant. */
  readonly warning?: boolean;
}

export function jsonPath(path: ReadonlyArray<PropertyKey>): string {
  return path.reduce<string>((text, key) => (typeof key === 'number' ? `${text}[${key}]` : `${text}.${String(key)}`), '$');
}

/** Zod's findings in a player's words. */
export function zodProblems(error: z.ZodError): Problem[] {
  return error.issues.map((issue) => ({ path: jsonPath(issue.path), message: musicianMessage(issue) }));
}

function musicianMessage(issue: z.core.$ZodIssue): string {
  if (!/^(Too small|Too big|Invalid|Unrecognized)/u.test(issue.message)) return issue.message; // the schema's own words
  switch (issue.code) {
    case 'unrecognized_keys':
      return `unknown setting${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `"${k}"`).join(', ')} (check its spelling against the README's example)`;
    case 'invalid_value':
      return `must be one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')}`;
    case 'invalid_type':
      return issue.input === undefined ? 'is missing' : `must be ${issue.expected === 'string' ? 'text' : issue.expected === 'object' ? 'an object ({ … })' : `a ${issue.expected}`}`;
    case 'too_small':
      if (issue.origin === 'array') return `needs at least ${String(issue.minimum)} entr${issue.minimum === 1 ? 'y' : 'ies'}`;
      return issue.input === undefined ? `must be at least ${String(issue.minimum)}` : `${String(issue.input)} is below ${String(issue.minimum)}, the least allowed`;
    case 'too_big':
      if (issue.origin === 'array') return `takes at most ${String(issue.maximum)} entries`;
      return issue.input === undefined ? `must be at most ${String(issue.maximum)}` : `${String(issue.input)} is above ${String(issue.maximum)}, the most allowed`;
    default:
      return issue.message;
  }
}

/** `$.output.channels` → `output.channels` (the file's own words). */
export function where(path: string): string {
  return path.replace(/^\$\.?/u, '') || '(the whole file)';
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

/** `FILE:LINE: where: what is wrong` (the line when the file's text is known). */
export function formatProblem(file: string, problem: Problem, source?: JsonSource): string {
  const line = source?.lineOf(problem.path);
  return `${file}${line === undefined ? '' : `:${line}`}: ${problem.warning ? 'warning: ' : ''}${where(problem.path)}: ${problem.message}`;
}

/** The problems in the order their lines come in the file (those with no line last), otherwise as found. */
export function inFileOrder(problems: readonly Problem[], source?: JsonSource): Problem[] {
  const line = (p: Problem): number => source?.lineOf(p.path) ?? Infinity;
  return [...problems].sort((a, b) => line(a) - line(b));
}

/** Throws the first problem that is not a warning as a one-line UserError, saying how many more there are. */
export function throwProblems(file: string, problems: readonly Problem[], hint: string, source?: JsonSource): never {
  const errors = problems.filter((p) => !p.warning);
  const [first] = errors;
  const more = errors.length > 1 ? ` (and ${errors.length - 1} more problem${errors.length > 2 ? 's' : ''}; ${hint})` : '';
  throw new UserError(first ? formatProblem(file, first, source) + more : `${file}: invalid`);
}

/** Parses JSON text (comments and trailing commas allowed), a syntax error one line with the line and column. */
export function parseJsonText(text: string, file: string): unknown {
  return parseJsonSource(text, file).value;
}
