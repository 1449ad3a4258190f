import { parsePitchClass, parseWindow, type KeyboardWindow } from '../pitch/index.js';
import { actionEntry, type Action, type ActionName, type Binding, type Trigger } from '../spelling/control-map.js';
import type { SplitKey } from '../spelling/controlled.js';
import { parseKey, type DeclaredKey } from '../spelling/keys.js';
import { readTextFile } from '../util/files.js';
import { collecting, parseJsonText, throwProblems, zodProblems, type Problem } from './problems.js';
import { setupSchema, type ControlJson, type SetupJson } from './setup-schema.js';

/** A validated setup file: its JSON, with keys, windows, controls and split keys parsed. */
export interface SetupFile {
  readonly file: string;
  readonly json: SetupJson;
  readonly window: KeyboardWindow | undefined;
  readonly key: DeclaredKey | undefined;
  readonly bindings: readonly Binding[];
  readonly splits: readonly SplitKey[];
}

function actionOf(name: ActionName, keyText: string | undefined, path: string, problems: Problem[]): Action | undefined {
  if (!actionEntry(name).needsKey) return { name };
  if (keyText === undefined) {
    problems.push({ path, message: `"${name}" needs a "key", such as "D minor"` });
    return undefined;
  }
  const key = collecting(problems, `${path}.key`, () => parseKey(keyText));
  return key && { name, key };
}

function bindingsOf(controls: readonly ControlJson[], problems: Problem[]): Binding[] {
  const bindings: Binding[] = [];
  controls.forEach((c, i) => {
    const path = `$.controls[${i}]`;
    const channel = c.channel === undefined ? undefined : c.channel - 1;
    const latch = c.latch ?? false;
    if (c.zones && c.cc !== undefined) {
      c.zones.forEach((z, j) => {
        const action = actionOf(z.action, z.key, `${path}.zones[${j}]`, problems);
        if (action) bindings.push({ trigger: { kind: 'zone', controller: c.cc!, channel, from: z.from, to: z.to }, action, latch: z.latch ?? false });
      });
      return;
    }
    if (!c.action) return;
    const action = actionOf(c.action, c.key, path, problems);
    let trigger: Trigger | undefined;
    if (c.cc !== undefined) trigger = { kind: 'cc', controller: c.cc, channel, threshold: c.threshold ?? 64 };
    else if (c.note !== undefined) trigger = { kind: 'note', key: c.note, channel, source: c.source };
    else if (c.program !== undefined) trigger = { kind: 'program', program: c.program, channel };
    if (action && trigger) bindings.push({ trigger, action, latch });
  });
  return bindings;
}

function splitsOf(json: SetupJson, problems: Problem[]): SplitKey[] {
  const splits: SplitKey[] = [];
  (json.splitKeys ?? []).forEach((s, i) => {
    const path = `$.splitKeys[${i}]`;
    const spelling = s.window !== undefined ? collecting(problems, `${path}.window`, () => parseWindow(s.window!, 'window')) : collecting(problems, `${path}.spelling`, () => parsePitchClass(s.spelling!, 'spelling'));
    if (spelling) splits.push({ channel: s.channel === undefined ? undefined : s.channel - 1, source: s.source, key: s.key, spelling });
  });
  return splits;
}

/** Validates a setup's text, collecting every problem. */
export function checkSetup(text: string, file: string): { setup: SetupFile | undefined; problems: readonly Problem[] } {
  const parsed = setupSchema.safeParse(parseJsonText(text, file));
  if (!parsed.success) return { setup: undefined, problems: zodProblems(parsed.error) };
  const json = parsed.data;
  const problems: Problem[] = [];
  const window = json.spelling?.window === undefined ? undefined : collecting(problems, '$.spelling.window', () => parseWindow(json.spelling!.window!, 'window'));
  const key = json.spelling?.key === undefined ? undefined : collecting(problems, '$.spelling.key', () => parseKey(json.spelling!.key!));
  const bindings = bindingsOf(json.controls ?? [], problems);
  const splits = splitsOf(json, problems);
  if (problems.length > 0) return { setup: undefined, problems };
  return { setup: { file, json, window, key, bindings, splits }, problems };
}

export function loadSetupFile(file: string): SetupFile {
  const { setup, problems } = checkSetup(readTextFile(file), file);
  if (!setup) throwProblems(file, problems, `run "diesis check ${file}" to see them all`);
  return setup;
}
