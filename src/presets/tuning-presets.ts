import { existsSync, readdirSync } from 'node:fs';
import { basename, join, resolve, sep } from 'node:path';
import { packageRoot } from '../util/package-root.js';
import { chromaOf, formatPitchClass, parsePitchClass, pitchClass, type PitchClass } from '../pitch/index.js';
import { DEFAULT_ADAPTIVE } from '../tuning/adaptive/settings.js';
import {
  adaptiveJustTuning,
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
import { parseJsonSource, type JsonSource } from './json-source.js';
import { collecting, throwProblems, zodProblems, type Problem } from './problems.js';
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
    case 'just-adaptive': {
      const table = buildTuning({ ...json, kind: 'just' }, problems);
      return table && adaptiveJustTuning(table, { ...DEFAULT_ADAPTIVE, ...json.adaptive });
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
  /** The parsed file, to put line numbers on problems. */
  readonly source: JsonSource;
}

/** Validates a preset's text, collecting every problem instead of stopping at the first. */
export function checkTuningPreset(text: string, file: string, id = basename(file).replace(/\.json$/u, '')): PresetCheck {
  const source = parseJsonSource(text, file);
  return { ...checkTuningJson(source.value, id, file), source };
}

function checkTuningJson(value: unknown, id: string, file: string): Omit<PresetCheck, 'source'> {
  if (typeof value === 'object' && value !== null && !('kind' in value)) {
    const setupLike = ['output', 'spelling', 'controls', 'keyboard', 'splitKeys', 'tuning'].some((k) => k in value);
    const message = setupLike
      ? 'this is a setup, not a tuning (a tuning has a "kind"): give it with --setup'
      : 'is missing: a tuning file says its "kind" ("regular", "just", "circulating" or "just-adaptive")';
    return { preset: undefined, problems: [{ path: '$.kind', message }] };
  }
  const parsed = tuningPresetSchema.safeParse(value, { reportInput: true });
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
  if (!check.preset) throwProblems(file, check.problems, `run "diesis check ${file}" to see them all`, check.source);
  return check.preset;
}

/** Names players use for built-in tunings (common practice, no source). */
export const TUNING_ALIASES: Readonly<Record<string, string>> = {
  'quarter-comma': 'meantone-1-4',
  'quarter-comma-meantone': 'meantone-1-4',
  'third-comma': 'meantone-1-3',
  'fifth-comma': 'meantone-1-5',
  'sixth-comma': 'meantone-1-6',
  'two-sevenths-comma': 'meantone-2-7',
  werckmeister: 'werckmeister-3',
  kirnberger: 'kirnberger-3',
  young: 'young-2',
  'equal': 'edo-12',
  '12-et': 'edo-12',
  '12-tet': 'edo-12',
  '12-edo': 'edo-12',
  '19-et': 'edo-19',
  '31-et': 'edo-31',
  '53-et': 'edo-53',
  just: 'just-major',
};

/** Edit distance, for suggestions. */
function distance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diagonal = row[0]!;
    row[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const above = row[j]!;
      row[j] = Math.min(above + 1, row[j - 1]! + 1, diagonal + (a[i - 1] === b[j - 1] ? 0 : 1));
      diagonal = above;
    }
  }
  return row[b.length]!;
}

/** The built-in ids nearest to what was typed: those that contain it, else the closest spellings. */
export function suggestTunings(text: string): string[] {
  const wanted = text.toLowerCase();
  const ids = builtInTuningIds();
  const containing = ids.filter((id) => id.includes(wanted) || wanted.includes(id));
  if (containing.length > 0) return containing;
  return ids
    .map((id) => ({ id, d: distance(wanted, id) }))
    .filter((x) => x.d <= Math.max(2, Math.floor(wanted.length / 3)))
    .sort((x, y) => x.d - y.d)
    .map((x) => x.id)
    .slice(0, 4);
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
  const id = TUNING_ALIASES[idOrPath.toLowerCase()] ?? idOrPath;
  const file = join(PRESETS_DIR, `${id}.json`);
  if (!/^[a-z0-9-]+$/u.test(id) || !existsSync(file)) {
    const near = suggestTunings(idOrPath);
    const hint = near.length > 0 ? `did you mean ${near.join(', ')}?` : 'run "diesis presets" to list the built-in ones, or give a path to a .json file';
    throw new UserError(`unknown tuning "${idOrPath}": ${hint}`);
  }
  return loadTuningPresetFile(file, id);
}

export function loadBuiltInTuningPresets(): TuningPreset[] {
  return builtInTuningIds().map((id) => loadTuningPreset(id));
}
