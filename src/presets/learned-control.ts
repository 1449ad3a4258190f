import { applyEdits, findNodeAtLocation, modify, parseTree } from 'jsonc-parser';
import { switchIsInverted, type Gesture } from '../midi/gesture.js';
import { actionEntry, type ActionName } from '../spelling/control-map.js';
import type { ControlJson } from './setup-schema.js';

// A gesture heard by `diesis ports --learn` made into a setup control, and the setup's text with
// that control added (the player's comments, order and layout kept). Pure: the shell reads and
// writes the file.

export interface LearnedAction {
  readonly name: ActionName;
  /** For `set-key`: the key as the player wrote it ("D minor"). */
  readonly key?: string | undefined;
  /** A hold action toggles on each press instead of following the pedal. */
  readonly latch?: boolean | undefined;
}

/**
 * The control that fires `action` from what was heard. A switch pedal that sends more when pressed
 * is a `cc` with the threshold half-way between its two values (64, the default, is left out); one
 * that sends less when pressed is a zone of the lower values, so pressing it is what fires; a
 * continuous pedal fires past the middle of the range it swept; a key is a key switch and a program
 * change a program control, each on the channel it came on.
 */
export function controlOf(g: Gesture, action: LearnedAction): ControlJson {
  const channel = g.channel + 1;
  const what = { action: action.name, ...(action.key !== undefined ? { key: action.key } : {}), ...(action.latch ? { latch: true } : {}) };
  switch (g.kind) {
    case 'key':
      return { note: g.key, channel, ...what };
    case 'program':
      return { program: g.program, channel, ...what };
    case 'switch': {
      const released = g.released ?? (switchIsInverted(g) ? 127 : 0);
      const middle = Math.floor((g.pressed + released) / 2);
      if (switchIsInverted(g)) return { cc: g.controller, channel, zones: [{ from: 0, to: middle, ...what }] };
      return withThreshold({ cc: g.controller, channel }, middle + 1, what);
    }
    case 'continuous':
      return withThreshold({ cc: g.controller, channel }, Math.floor((g.low + g.high) / 2) + 1, what);
  }
}

function withThreshold(trigger: { cc: number; channel: number }, threshold: number, what: Omit<ControlJson, 'cc' | 'channel'>): ControlJson {
  return { ...trigger, ...(threshold === 64 ? {} : { threshold: Math.min(127, Math.max(1, threshold)) }), ...what };
}

/** Whether `latch` means anything for this action (only hold actions latch). */
export function latchApplies(name: ActionName): boolean {
  return actionEntry(name).kind === 'hold';
}

/** A value as one line of JSON with a space inside braces, as the README writes controls: `{ "cc": 66, "action": "flip" }`. */
export function compactJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(compactJson).join(', ')}]`;
  if (typeof value === 'object' && value !== null) {
    const entries = Object.entries(value).filter(([, v]) => v !== undefined);
    return entries.length === 0 ? '{}' : `{ ${entries.map(([k, v]) => `${JSON.stringify(k)}: ${compactJson(v)}`).join(', ')} }`;
  }
  return JSON.stringify(value);
}

/** A new setup holding just this control. */
export function newSetupText(control: ControlJson, name: string): string {
  return `{\n  "name": ${JSON.stringify(name)},\n  "controls": [\n    ${compactJson(control)}\n  ]\n}\n`;
}

/** What may follow a control on its line: an optional comma, then an optional comment. */
const REST_OF_LINE = /^[ \t]*(,)?[ \t]*(?:\/\/[^\n]*|\/\*[^\n]*?\*\/[ \t]*)?\r?$/u;

/**
 * The setup's text with `control` appended to its `controls`. A new control goes on its own line
 * after the last one, indented like it, and a comment at the end of that line stays with the
 * control it was written beside; a trailing comma is kept as the player's style. Without
 * `controls` (or with an empty list) the list is made by jsonc-parser's `modify`.
 */
export function addControlText(text: string, control: ControlJson): string {
  const root = parseTree(text, [], { allowTrailingComma: true, disallowComments: false });
  const list = root && findNodeAtLocation(root, ['controls']);
  const last = list?.type === 'array' ? list.children?.at(-1) : undefined;
  if (!last) {
    const edits = modify(text, ['controls'], [control], { formattingOptions: { insertSpaces: true, tabSize: 2, eol: '\n' } });
    return applyEdits(text, edits);
  }
  const end = last.offset + last.length;
  const lineEnd = text.indexOf('\n', end);
  const rest = REST_OF_LINE.exec(text.slice(end, lineEnd === -1 ? text.length : lineEnd));
  const lineStart = text.lastIndexOf('\n', last.offset) + 1;
  const indent = /^[ \t]*/u.exec(text.slice(lineStart))?.[0] ?? '';
  const json = compactJson(control);
  if (!rest || lineEnd === -1 || text.slice(lineStart, last.offset).trim() !== '') {
    return `${text.slice(0, end)}, ${json}${text.slice(end)}`; // the list is written on one line: keep it so
  }
  if (rest[1]) return `${text.slice(0, lineEnd)}\n${indent}${json},${text.slice(lineEnd)}`;
  return `${text.slice(0, end)},${text.slice(end, lineEnd)}\n${indent}${json}${text.slice(lineEnd)}`;
}
