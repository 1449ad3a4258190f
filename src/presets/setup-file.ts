import { dirname, isAbsolute, resolve } from 'node:path';
import { chromaOf, DEFAULT_WINDOW, formatPitchClass, parsePitchClass, parseWindow, spellChroma, type KeyboardWindow } from '../pitch/index.js';
import { OUTPUT_MODES, type OutputMode } from '../router/output-modes.js';
import type { ModeSetting } from '../router/output.js';
import { actionEntry, type Action, type ActionName, type Binding, type Trigger } from '../spelling/control-map.js';
import type { SplitKey } from '../spelling/controlled.js';
import { parseKey, type DeclaredKey } from '../spelling/keys.js';
import { STRATEGY_ENTRIES, type Strategy } from '../spelling/strategy.js';
import { parseChannels } from '../text/channels.js';
import { isAdaptive, parseReference, type Reference } from '../tuning/index.js';
import { readTextFile } from '../util/files.js';
import { parseJsonSource, type JsonSource } from './json-source.js';
import { collecting, throwProblems, zodProblems, type Problem } from './problems.js';
import { controlSchema, setupSchema, splitKeySchema, type ControlJson, type SetupJson, type SplitKeyJson } from './setup-schema.js';
import { loadTuningPreset, type TuningPreset } from './tuning-presets.js';
import type { TuningChange } from '../router/tuning-in-force.js';
import { readScoreFile } from './score-file.js';
import type { Score } from '../score/score.js';

/** A validated setup file: its JSON, with everything in it parsed and loaded as `play` uses it. */
export interface SetupFile {
  readonly file: string;
  readonly json: SetupJson;
  readonly tuning: TuningPreset | undefined;
  readonly reference: Reference | undefined;
  /** Output channels 0…15, when the setup gives them. */
  readonly channels: readonly number[] | undefined;
  readonly window: KeyboardWindow | undefined;
  readonly key: DeclaredKey | undefined;
  readonly bindings: readonly Binding[];
  readonly splits: readonly SplitKey[];
  /** The score to follow, read from the setup's folder. */
  readonly score: Score | undefined;
}

export interface SetupCheck {
  readonly setup: SetupFile | undefined;
  /** Every problem found, warnings included (a setup with only warnings loads). */
  readonly problems: readonly Problem[];
  readonly source: JsonSource;
}

/** Keys a full-size keyboard plays (A0…C8): a key switch there would never sound (common practice, no source). */
export const PLAYING_RANGE = { lowest: 21, highest: 108 } as const;

/** A path written in a setup, read from the setup's own folder. */
export function setupPath(setupFile: string, path: string): string {
  return isAbsolute(path) ? path : resolve(dirname(setupFile), path);
}

/** Whether an output mode can give every note its own pitch (adaptive tunings need it). */
export function adaptiveFits(mode: OutputMode): boolean {
  return mode !== 'mts-octave' && mode !== 'samples';
}

export function adaptiveRefusal(id: string, mode: OutputMode): string {
  return `${id} gives every note its own pitch: output mode "${mode}" tunes key classes or fixed samples, so held notes would move (use bend or mts-note)`;
}

/** A tuning named in a setup: a built-in id, or a file beside the setup. */
function setupTuning(setupFile: string, idOrPath: string): TuningPreset {
  const looksLikePath = idOrPath.includes('/') || idOrPath.includes('\\') || idOrPath.endsWith('.json');
  return loadTuningPreset(looksLikePath ? setupPath(setupFile, idOrPath) : idOrPath);
}

/** What a control names beside its action. */
interface ActionWords {
  readonly key?: string | undefined;
  readonly tuning?: string | undefined;
  readonly reference?: string | undefined;
  readonly bar?: string | number | undefined;
}

/** A set-tuning control's tuning: loaded and checked now, so the pedal cannot fail on stage. */
export function tuningChangeOf(setupFile: string, tuningText: string, referenceText: string | undefined, path: string, problems: Problem[]): TuningChange | undefined {
  const preset = collecting(problems, `${path}.tuning`, () => setupTuning(setupFile, tuningText));
  const reference = referenceText === undefined ? undefined : collecting(problems, `${path}.reference`, () => parseReference(referenceText, 'reference'));
  return preset && { id: preset.id, name: preset.name, tuning: preset.tuning, reference: reference ?? preset.reference };
}

function actionOf(name: ActionName, words: ActionWords, path: string, problems: Problem[], file: string): Action | undefined {
  const entry = actionEntry(name);
  for (const field of ['key', 'tuning', 'reference', 'bar'] as const) {
    const wanted = field === 'key' ? entry.needsKey : field === 'bar' ? entry.needsBar : entry.needsTuning;
    if (words[field] !== undefined && !wanted) problems.push({ path: `${path}.${field}`, warning: true, message: `has no effect with "${name}"` });
  }
  if (entry.needsBar) {
    if (words.bar === undefined) {
      problems.push({ path, message: `"${name}" needs the "bar" it goes to, such as 12` });
      return undefined;
    }
    return { name, bar: String(words.bar) };
  }
  if (entry.needsTuning) {
    if (words.tuning === undefined) {
      problems.push({ path, message: `"${name}" needs a "tuning", such as "pythagorean"` });
      return undefined;
    }
    const tuning = tuningChangeOf(file, words.tuning, words.reference, path, problems);
    return tuning && { name, tuning };
  }
  if (!entry.needsKey) return { name };
  const keyText = words.key;
  if (keyText === undefined) {
    problems.push({ path, message: `"${name}" needs a "key", such as "D minor"` });
    return undefined;
  }
  const key = collecting(problems, `${path}.key`, () => parseKey(keyText));
  return key && { name, key };
}

interface PlacedBinding {
  readonly binding: Binding;
  readonly path: string;
}

function bindingsOf(controls: readonly ControlJson[], problems: Problem[], at: (i: number) => string, file: string): PlacedBinding[] {
  const bindings: PlacedBinding[] = [];
  controls.forEach((c: ControlJson | undefined, i) => {
    if (!c) return; // invalid on its own: the schema's problem already says so
    const path = at(i);
    const channel = c.channel === undefined ? undefined : c.channel - 1;
    const latch = c.latch ?? false;
    if (c.zones && c.cc !== undefined) {
      c.zones.forEach((z, j) => {
        const action = actionOf(z.action, z, `${path}.zones[${j}]`, problems, file);
        if (action) bindings.push({ binding: { trigger: { kind: 'zone', controller: c.cc!, channel, from: z.from, to: z.to }, action, latch: z.latch ?? false }, path: `${path}.zones[${j}]` });
      });
      return;
    }
    if (!c.action) return;
    const action = actionOf(c.action, c, path, problems, file);
    let trigger: Trigger | undefined;
    if (c.cc !== undefined) trigger = { kind: 'cc', controller: c.cc, channel, threshold: c.threshold ?? 64 };
    else if (c.note !== undefined) trigger = { kind: 'note', key: c.note, channel, source: c.source };
    else if (c.program !== undefined) trigger = { kind: 'program', program: c.program, channel };
    if (action && trigger) bindings.push({ binding: { trigger, action, latch }, path });
  });
  return bindings;
}

const sameOrAny = (a: number | undefined, b: number | undefined): boolean => a === undefined || b === undefined || a === b;

/** Whether one message could fire both triggers. */
function overlaps(a: Trigger, b: Trigger): boolean {
  if (!sameOrAny(a.channel, b.channel)) return false;
  const controller = (t: Trigger): number | undefined => (t.kind === 'cc' || t.kind === 'zone' ? t.controller : undefined);
  if (controller(a) !== undefined && controller(a) === controller(b)) {
    const range = (t: Trigger): [number, number] => (t.kind === 'zone' ? [t.from, t.to] : [0, 127]);
    const [a0, a1] = range(a);
    const [b0, b1] = range(b);
    return a0 <= b1 && b0 <= a1;
  }
  if (a.kind === 'note' && b.kind === 'note') return a.key === b.key && sameOrAny(a.source, b.source);
  if (a.kind === 'program' && b.kind === 'program') return a.program === b.program;
  return false;
}

function describeTrigger(t: Trigger): string {
  const on = t.channel === undefined ? '' : ` on channel ${t.channel + 1}`;
  switch (t.kind) {
    case 'cc':
      return `controller ${t.controller}${on}`;
    case 'zone':
      return `controller ${t.controller} ${t.from}–${t.to}${on}`;
    case 'note':
      return `key ${t.key}${on}`;
    case 'program':
      return `program ${t.program}${on}`;
  }
}

/** The same trigger bound twice; a key switch on a key the player plays. */
function bindingConflicts(bindings: readonly PlacedBinding[], problems: Problem[]): void {
  bindings.forEach((b, j) => {
    const earlier = bindings.slice(0, j).find((a) => overlaps(a.binding.trigger, b.binding.trigger));
    if (earlier) {
      problems.push({ path: b.path, message: `${describeTrigger(b.binding.trigger)} is already bound at ${earlier.path.replace(/^\$\./u, '')} (one pedal or key, two actions)` });
    }
    const t = b.binding.trigger;
    // With a channel of its own (a second keyboard, a pedal board) a key switch is no player's key.
    if (t.kind === 'note' && t.channel === undefined && t.key >= PLAYING_RANGE.lowest && t.key <= PLAYING_RANGE.highest) {
      problems.push({ path: b.path, warning: true, message: `key ${t.key} is inside the keyboard's playing range (${PLAYING_RANGE.lowest}–${PLAYING_RANGE.highest}): played there, it will never sound` });
    }
  });
}

function splitsOf(json: SetupJson, problems: Problem[]): SplitKey[] {
  const splits: SplitKey[] = [];
  const seen = new Map<string, number>();
  (json.splitKeys ?? []).forEach((s: SplitKeyJson | undefined, i) => {
    if (!s) return;
    const path = `$.splitKeys[${i}]`;
    const spelling = s.window !== undefined ? collecting(problems, `${path}.window`, () => parseWindow(s.window!, 'window')) : collecting(problems, `${path}.spelling`, () => parsePitchClass(s.spelling!, 'spelling'));
    if (spelling && !('kind' in spelling) && s.key !== undefined && chromaOf(spelling) !== s.key % 12) {
      problems.push({ path: `${path}.spelling`, message: `${s.spelling} is not a spelling of key ${s.key}, which is ${formatPitchClass(spellChroma(DEFAULT_WINDOW, s.key % 12))} or another name for it` });
    }
    const id = `${s.channel ?? '*'} ${s.source ?? '*'} ${s.key ?? '*'}`;
    const first = seen.get(id);
    if (first !== undefined) problems.push({ path, message: `the same ${s.key === undefined ? 'channel' : `key ${s.key}`} as splitKeys[${first}]: two rules for one key` });
    else seen.set(id, i);
    if (spelling) splits.push({ channel: s.channel === undefined ? undefined : s.channel - 1, source: s.source, key: s.key, spelling });
  });
  return splits;
}

/** The settings of the output block that only some modes use. */
const OUTPUT_SETTINGS: ReadonlyArray<readonly [keyof NonNullable<SetupJson['output']>, ModeSetting]> = [
  ['layout', 'layout'],
  ['bendRange', 'bendRange'],
  ['octaveForm', 'octaveForm'],
  ['mtsDevice', 'mtsDevice'],
  ['mtsProgram', 'mtsProgram'],
];

/** What the output block says, checked against its mode as `play` would. */
function outputProblems(json: SetupJson, problems: Problem[]): number[] | undefined {
  const output = json.output ?? {};
  const mode: OutputMode = output.mode ?? 'bend';
  const entry = OUTPUT_MODES[mode];
  for (const [field, setting] of OUTPUT_SETTINGS) {
    // A warning: a setup may keep another mode's settings for when the player switches to it.
    if (output[field] !== undefined && !(entry.settings as readonly ModeSetting[]).includes(setting)) problems.push({ path: `$.output.${field}`, warning: true, message: `does not apply to mode "${mode}" (ignored)` });
  }
  if (output.channels === undefined) return undefined;
  const channels = collecting(problems, '$.output.channels', () => parseChannels(output.channels!, ''));
  if (channels && entry.channels === 'one' && channels.length > 1) problems.push({ path: '$.output.channels', message: `mode "${mode}" sends on one channel; give just one` });
  if (channels && entry.channels === 'set') problems.push({ path: '$.output.channels', message: `mode "${mode}" uses the sample set's own channels` });
  return channels;
}

function spellingProblems(json: SetupJson, problems: Problem[]): { window: KeyboardWindow | undefined; key: DeclaredKey | undefined } {
  const spelling = json.spelling ?? {};
  const strategy: Strategy = spelling.strategy ?? (spelling.window !== undefined ? 'fixed' : 'follow');
  const entry = STRATEGY_ENTRIES[strategy];
  const window = spelling.window === undefined ? undefined : collecting(problems, '$.spelling.window', () => parseWindow(spelling.window!, 'window'));
  const key = spelling.key === undefined ? undefined : collecting(problems, '$.spelling.key', () => parseKey(spelling.key!));
  if (spelling.window !== undefined && !entry.usesWindow) problems.push({ path: '$.spelling.window', message: `has no effect with strategy "${strategy}" (it sets the spellings of "fixed")` });
  if (spelling.key !== undefined && !entry.usesKey) problems.push({ path: '$.spelling.key', message: `has no effect with strategy "${strategy}"` });
  if (spelling.follow !== undefined && strategy !== 'follow') problems.push({ path: '$.spelling.follow', message: `has no effect with strategy "${strategy}" (it steers "follow")` });
  if (strategy === 'key' && spelling.key === undefined) problems.push({ path: '$.spelling', message: 'strategy "key" needs a "key", such as "D minor"' });
  return { window, key };
}

/**
 * Validates a setup exactly as `play`, `render` and `spell` load it, collecting every problem in
 * one pass: the schema, then each value (tuning, reference, channels against the mode, keys,
 * windows, controls, split keys) and the conflicts between them.
 */
export function checkSetup(text: string, file: string): SetupCheck {
  const source = parseJsonSource(text, file);
  const problems: Problem[] = [];
  if (typeof source.value === 'object' && source.value !== null && 'kind' in source.value) {
    problems.push({ path: '$.kind', message: 'this is a tuning file, not a setup: give it with --tuning, or name it as "tuning" in a setup' });
    return { setup: undefined, problems, source };
  }
  const parsed = setupSchema.safeParse(source.value, { reportInput: true });
  if (!parsed.success) {
    problems.push(...zodProblems(parsed.error));
    // Check what can be checked of the rest, so every problem shows in one pass.
    const salvaged = salvage(source.value);
    if (salvaged) semanticChecks(salvaged, file, problems);
    return { setup: undefined, problems, source };
  }
  const json = parsed.data;
  const values = semanticChecks(json, file, problems);
  if (problems.some((p) => !p.warning)) return { setup: undefined, problems, source };
  return { setup: { file, json, ...values }, problems, source };
}

/** Checks and loads every value of a (schema-valid) setup, paths as in a setup file; `file` is where relative paths start. */
export function semanticChecks(json: SetupJson, file: string, problems: Problem[]): Omit<SetupFile, 'file' | 'json'> {
  const tuning = json.tuning === undefined ? undefined : collecting(problems, '$.tuning', () => setupTuning(file, json.tuning!));
  const reference = json.reference === undefined ? undefined : collecting(problems, '$.reference', () => parseReference(json.reference!, 'reference'));
  const channels = outputProblems(json, problems);
  const { window, key } = spellingProblems(json, problems);
  const placed = bindingsOf(json.controls ?? [], problems, (i) => `$.controls[${i}]`, file);
  bindingConflicts(placed, problems);
  const mode: OutputMode = json.output?.mode ?? 'bend';
  for (const { binding, path } of placed) {
    const change = binding.action.tuning;
    if (change && isAdaptive(change.tuning) && !adaptiveFits(mode)) problems.push({ path: `${path}.tuning`, message: adaptiveRefusal(change.id, mode) });
  }
  const splits = splitsOf(json, problems);
  const score = json.score === undefined ? undefined : collecting(problems, '$.score', () => readScoreFile(setupPath(file, json.score!)));
  for (const { binding, path } of placed) {
    const { name, bar } = binding.action;
    if (!name.startsWith('score-')) continue;
    if (json.score === undefined) problems.push({ path, warning: true, message: `"${name}" acts on a score, and this setup names none (one given with --score will do)` });
    else if (score && bar !== undefined && !score.measures.some((m) => m.number === bar)) {
      problems.push({ path: `${path}.bar`, message: `the score has no bar ${bar} (its bars run ${score.measures[0]?.number ?? '?'}…${score.measures[score.measures.length - 1]?.number ?? '?'})` });
    }
  }
  return { tuning, reference, channels, window, key, bindings: placed.map((p) => p.binding), splits, score };
}

/** The parts of an invalid setup that are valid on their own (each block, each control), to check them too. */
function salvage(value: unknown): SetupJson | undefined {
  if (typeof value !== 'object' || value === null) return undefined;
  const raw = value as Record<string, unknown>;
  const part = <T>(schema: { safeParse(v: unknown): { success: boolean; data?: T } }, v: unknown): T | undefined => {
    const r = schema.safeParse(v);
    return r.success ? r.data : undefined;
  };
  const shape = setupSchema.shape;
  /** A block whose every field is kept if it is valid on its own. */
  const fields = <T>(block: { unwrap(): { shape: Record<string, { safeParse(v: unknown): { success: boolean; data?: unknown } }> } }, v: unknown): T | undefined => {
    if (typeof v !== 'object' || v === null) return undefined;
    const inner = block.unwrap().shape;
    const kept: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) {
      const field = inner[k];
      const r = field?.safeParse(x);
      if (r?.success) kept[k] = r.data;
    }
    return kept as T;
  };
  return {
    tuning: part(shape.tuning, raw.tuning),
    reference: part(shape.reference, raw.reference),
    score: part(shape.score, raw.score),
    output: part(shape.output, raw.output) ?? fields(shape.output, raw.output),
    spelling: part(shape.spelling, raw.spelling) ?? fields(shape.spelling, raw.spelling),
    // Invalid entries stay as holes, so the valid ones keep their index (and their line).
    controls: Array.isArray(raw.controls) ? (raw.controls.map((c) => part(controlSchema, c)) as ControlJson[]) : undefined,
    splitKeys: Array.isArray(raw.splitKeys) ? (raw.splitKeys.map((s) => part(splitKeySchema, s)) as SplitKeyJson[]) : undefined,
  };
}

export function loadSetupFile(file: string): SetupFile {
  const { setup, problems, source } = checkSetup(readTextFile(file), file);
  if (!setup) throwProblems(file, problems, `run "diesis check ${file}" to see them all`, source);
  return setup;
}
