import { existsSync, readdirSync } from 'node:fs';
import { basename, join, resolve, sep } from 'node:path';
import { packageRoot } from '../util/package-root.js';
import { chromaOf, formatPitchClass, parsePitchClass, pitchClass, type PitchClass } from '../pitch/index.js';
import {
  chainToChromaSizes,
  cents,
  circulatingTuning,
  intervalFromSpec,
  justTuning,
  nearCents,
  parseReference,
  regularTuning,
  type PitchRatio,
  type Reference,
  type Tuning,
  type TuningKind,
} from '../tuning/index.js';
import { UserError } from '../util/errors.js';
import { readTextFile } from '../util/files.js';
import { collecting, parseJsonText, throwProblems, zodProblems, type Problem } from './problems.js';
import { tuningPresetSchema, type TuningPresetJson } from './tuning-schema.js';

/** A tuning preset, validated and built. */
export interface TuningPreset {
  /** File name without `.json` (`meantone-1-4`), or the path the user gave. */
  readonly id: string;
  readonly file: string;
  readonly name: string;
  readonly kind: TuningKind;
  readonly description: string;
  readonly source: string;
  readonly reference: Reference | undefined;
  readonly tuning: Tuning;
}

/** The folder of built-in presets. */
export const PRESETS_DIR = join(packageRoot(), 'presets') + sep;

/** A fifth the engine can place on the keyboard: between 600 and 800 cents (12-ET's is 700). */
const FIFTH_CENTS = { low: 600, high: 800 } as const;

function fifthFromSpec(spec: Parameters<typeof intervalFromSpec>[0], path: string): PitchRatio {
  const size = intervalFromSpec(spec, path);
  const c = cents(size);
  if (c <= FIFTH_CENTS.low || c >= FIFTH_CENTS.high) {
    throw new UserError(`${path}: a fifth of ${c.toFixed(1)} cents cannot be played on a keyboard; a fifth must lie between ${FIFTH_CENTS.low} and ${FIFTH_CENTS.high} cents`);
  }
  return size;
}

const pc = (problems: Problem[], path: string, text: string | undefined, fallback: PitchClass): PitchClass =>
  text === undefined ? fallback : (collecting(problems, path, () => parsePitchClass(text, 'pitch class')) ?? fallback);

function buildTuning(json: TuningPresetJson, problems: Problem[]): Tuning | undefined {
  const c = pitchClass(0);
  switch (json.kind) {
    case 'regular': {
      const fifth = collecting(problems, '$.fifth', () => fifthFromSpec(json.fifth, '$.fifth'));
      const origin = pc(problems, '$.origin', json.origin, c);
      return fifth && regularTuning(fifth, origin);
    }
    case 'just': {
      const tonic = pc(problems, '$.tonic', json.tonic, c);
      const degrees = new Map<number, PitchRatio>();
      for (const [name, ratioText] of Object.entries(json.degrees)) {
        const path = `$.degrees.${name}`;
        const degree = collecting(problems, path, () => parsePitchClass(name, 'pitch class'));
        const size = collecting(problems, path, () => intervalFromSpec({ ratio: ratioText }, path));
        if (!degree || !size) continue;
        if (degrees.has(degree.fifths)) problems.push({ path, message: `${name} is listed twice` });
        degrees.set(degree.fifths, size);
      }
      if (!degrees.has(0)) {
        problems.push({ path: '$.degrees', message: 'must list the tonic, written C (degrees are spelled as intervals above C)' });
        return undefined;
      }
      return justTuning(degrees, tonic);
    }
    case 'circulating': {
      const origin = pc(problems, '$.origin', json.origin, c);
      const sizes = json.chain ? chainSizes(json.chain, origin, problems) : centsSizes(json.cents ?? {}, origin, problems);
      return sizes && circulatingTuning(sizes, origin);
    }
  }
}

function chainSizes(chain: NonNullable<Extract<TuningPresetJson, { kind: 'circulating' }>['chain']>, origin: PitchClass, problems: Problem[]): PitchRatio[] | undefined {
  const start = pc(problems, '$.chain.start', chain.start, origin);
  const fifths = chain.fifths.map((spec, i) => collecting(problems, `$.chain.fifths[${i}]`, () => fifthFromSpec(spec, `$.chain.fifths[${i}]`)));
  if (origin.fifths < start.fifths || origin.fifths > start.fifths + 11) {
    problems.push({ path: '$.chain.start', message: `the chain from ${formatPitchClass(start)} does not reach the origin ${formatPitchClass(origin)}` });
    return undefined;
  }
  return fifths.every((f) => f !== undefined) ? chainToChromaSizes(start, fifths as PitchRatio[], origin) : undefined;
}

function centsSizes(table: Readonly<Record<string, number | string>>, origin: PitchClass, problems: Problem[]): PitchRatio[] | undefined {
  const byStep: (PitchRatio | undefined)[] = new Array<PitchRatio | undefined>(12).fill(undefined);
  for (const [name, centsValue] of Object.entries(table)) {
    const path = `$.cents.${name}`;
    const note = collecting(problems, path, () => parsePitchClass(name, 'pitch class'));
    const size = collecting(problems, path, () => intervalFromSpec({ cents: centsValue }, path));
    if (!note || !size) continue;
    const step = (chromaOf(note) - chromaOf(origin) + 12) % 12;
    if (byStep[step]) problems.push({ path, message: `${name} shares its key with another entry` });
    byStep[step] = nearCents(size, 100 * step);
  }
  const missing = byStep.flatMap((s, step) => (s ? [] : [step]));
  if (missing.length > 0) {
    problems.push({ path: '$.cents', message: `must give all 12 keys; missing ${missing.length} (semitone steps ${missing.join(', ')} above the origin)` });
    return undefined;
  }
  if (!byStep[0] || cents(byStep[0]) !== 0) problems.push({ path: '$.cents', message: 'the origin must be at 0 cents' });
  return byStep as PitchRatio[];
}

export interface PresetCheck {
  readonly preset: TuningPreset | undefined;
  readonly problems: readonly Problem[];
}

/** Validates a preset's text, collecting every problem instead of stopping at the first. */
export function checkTuningPreset(text: string, file: string, id = basename(file).replace(/\.json$/u, '')): PresetCheck {
  const parsed = tuningPresetSchema.safeParse(parseJsonText(text, file));
  if (!parsed.success) return { preset: undefined, problems: zodProblems(parsed.error) };
  const json = parsed.data;
  const problems: Problem[] = [];
  const tuning = buildTuning(json, problems);
  const ref = json.reference === undefined ? undefined : collecting(problems, '$.reference', () => parseReference(json.reference ?? ''));
  if (!tuning || problems.length > 0) return { preset: undefined, problems };
  const preset: TuningPreset = {
    id,
    file,
    name: json.name,
    kind: json.kind,
    description: json.description,
    source: json.source,
    reference: ref,
    tuning,
  };
  return { preset, problems };
}

/** Reads and validates a preset file; the first problem becomes a one-line error. */
export function loadTuningPresetFile(file: string, id?: string): TuningPreset {
  const check = checkTuningPreset(readTextFile(file), file, id);
  if (!check.preset) throwProblems(file, check.problems, `run "diesis check ${file}" to see them all`);
  return check.preset;
}

export function builtInTuningIds(): string[] {
  return readdirSync(PRESETS_DIR)
    .filter((f) => f.endsWith('.json'))
    .map((f) => f.slice(0, -'.json'.length))
    .sort();
}

/** A built-in id (`meantone-1-4`) or a path to the user's own JSON file. */
export function loadTuningPreset(idOrPath: string): TuningPreset {
  const looksLikePath = idOrPath.includes('/') || idOrPath.includes('\\') || idOrPath.endsWith('.json');
  if (looksLikePath) return loadTuningPresetFile(resolve(idOrPath), idOrPath);
  const file = join(PRESETS_DIR, `${idOrPath}.json`);
  if (!/^[a-z0-9-]+$/u.test(idOrPath) || !existsSync(file)) {
    throw new UserError(`unknown tuning "${idOrPath}": run "diesis presets" to list the built-in ones, or give a path to a .json file`);
  }
  return loadTuningPresetFile(file, idOrPath);
}

export function loadBuiltInTuningPresets(): TuningPreset[] {
  return builtInTuningIds().map((id) => loadTuningPreset(id));
}
