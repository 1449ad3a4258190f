import type { MidiMessage } from '../midi/message.js';
import type { TuningChange } from '../router/tuning-in-force.js';
import type { ControlledSpeller } from './controlled.js';
import type { DeclaredKey } from './keys.js';

/** What the engine itself carries out for a control (the router implements these). */
export interface EngineActions {
  /** Respells what sounds now with the context as it is. */
  respell(): void;
  /** New notes in 12-ET at the reference, or back. */
  togglePass(): void;
  panic(): void;
  /** New notes in another tuning (and reference); notes sounding finish in theirs. */
  setTuning(change: TuningChange): void;
  /** The next (1) or previous (−1) piece of a concert programme; nothing without one or at its ends. */
  stepPiece(step: 1 | -1): void;
}

/** What an action acts on. */
export interface ActionTarget {
  readonly speller: ControlledSpeller;
  readonly engine: EngineActions;
}

/** One control action, declared once: the setup schema, `check`, the docs and the engine read it. */
export interface ActionEntry {
  readonly summary: string;
  /** `hold`: follows the pedal (or a latch toggles it); `press`: fires once on each press. */
  readonly kind: 'hold' | 'press';
  /** Needs a key (`set-key`). */
  readonly needsKey?: boolean;
  /** Needs a bar of the score (`score-bar`). */
  readonly needsBar?: boolean;
  /** Needs a tuning (`set-tuning`). */
  readonly needsTuning?: boolean;
  /** `on`: for a hold action whether it is on now; a press action runs only on presses. */
  run(target: ActionTarget, on: boolean, action: Action): void;
}

/**
 * Every control action. A new action is one entry here (and, if it acts on something new, a
 * method on the speller or on `EngineActions`).
 */
export const ACTIONS = {
  flip: { summary: 'black keys take their other spelling while held', kind: 'hold', run: (t, on) => t.speller.setFlip(on) },
  'shift-sharp': { summary: 'move the spelling window one step sharpward', kind: 'press', run: (t) => t.speller.shiftBy(1) },
  'shift-flat': { summary: 'move the spelling window one step flatward', kind: 'press', run: (t) => t.speller.shiftBy(-1) },
  'force-sharps': { summary: 'every black key a sharp while held', kind: 'hold', run: (t, on) => forceTo(t.speller, 'sharps', on) },
  'force-flats': { summary: 'every black key a flat while held', kind: 'hold', run: (t, on) => forceTo(t.speller, 'flats', on) },
  freeze: { summary: 'hold the spelling context still while held', kind: 'hold', run: (t, on) => t.speller.setFrozen(on) },
  'set-key': { summary: 'jump to a declared key', kind: 'press', needsKey: true, run: (t, _on, a) => a.key && t.speller.setKey(a.key) },
  'score-restart': { summary: 'the score follower starts again from the first bar', kind: 'press', run: (t) => t.speller.restartScore() },
  'score-bar': { summary: 'tell the score follower which bar the player is in', kind: 'press', needsBar: true, run: (t, _on, a) => a.bar !== undefined && t.speller.goToBar(a.bar) },
  'set-tuning': { summary: 'new notes take another tuning (and reference); notes sounding finish in theirs', kind: 'press', needsTuning: true, run: (t, _on, a) => a.tuning && t.engine.setTuning(a.tuning) },
  'next-piece': { summary: "the concert programme's next piece", kind: 'press', run: (t) => t.engine.stepPiece(1) },
  'previous-piece': { summary: "the concert programme's previous piece", kind: 'press', run: (t) => t.engine.stepPiece(-1) },
  respell: { summary: 'respell the notes sounding now', kind: 'press', run: (t) => t.engine.respell() },
  pass: { summary: "toggle the synth's own 12-ET for comparison", kind: 'press', run: (t) => t.engine.togglePass() },
  panic: { summary: 'all notes off, pedals up, bends centred', kind: 'press', run: (t) => t.engine.panic() },
} as const satisfies Record<string, ActionEntry>;

export type ActionName = keyof typeof ACTIONS;
export const ACTION_NAMES = Object.keys(ACTIONS) as [ActionName, ...ActionName[]];

export function actionEntry(name: ActionName): ActionEntry {
  return ACTIONS[name];
}

function forceTo(speller: ControlledSpeller, to: 'sharps' | 'flats', on: boolean): void {
  const now = speller.overrides.force;
  speller.setForce(on ? to : now === to ? undefined : now);
}

/** An action as bound: its name and, for `set-key`, the key; for `score-bar`, the bar; for `set-tuning`, the tuning. */
export interface Action {
  readonly name: ActionName;
  readonly key?: DeclaredKey | undefined;
  readonly bar?: string | undefined;
  readonly tuning?: TuningChange | undefined;
}

/** What fires a control: a switch pedal, a zone of an expression pedal, a key switch, a program change. */
export type Trigger =
  | { readonly kind: 'cc'; readonly controller: number; readonly channel: number | undefined; readonly threshold: number }
  | { readonly kind: 'zone'; readonly controller: number; readonly channel: number | undefined; readonly from: number; readonly to: number }
  | { readonly kind: 'note'; readonly key: number; readonly channel: number | undefined; readonly source: number | undefined }
  | { readonly kind: 'program'; readonly program: number; readonly channel: number | undefined };

export interface Binding {
  readonly trigger: Trigger;
  readonly action: Action;
  /** Hold actions follow the pedal, or with `latch` toggle on each press. */
  readonly latch: boolean;
}

/** One binding's change: run its action; `on` says whether a hold action is on now (a press action fires with true). */
export interface Firing {
  readonly action: Action;
  readonly on: boolean;
}

/** Whether a message presses (true) or releases (false) a trigger; undefined when it is not the trigger's. */
function pressOf(t: Trigger, m: MidiMessage, source: number): boolean | undefined {
  if (m.kind === 'system' || m.kind === 'active-sensing') return undefined;
  if (t.channel !== undefined && t.channel !== m.channel) return undefined;
  switch (t.kind) {
    case 'cc':
      return m.kind === 'control' && m.controller === t.controller ? m.value >= t.threshold : undefined;
    case 'zone':
      return m.kind === 'control' && m.controller === t.controller ? m.value >= t.from && m.value <= t.to : undefined;
    case 'note':
      if ((m.kind !== 'note-on' && m.kind !== 'note-off') || m.key !== t.key) return undefined;
      if (t.source !== undefined && t.source !== source) return undefined;
      return m.kind === 'note-on';
    case 'program':
      return m.kind === 'program' && m.program === t.program ? true : undefined;
  }
}

/**
 * The control map: bindings from pedals, key switches and program changes to actions. A message
 * a binding uses is consumed (never forwarded to the synth); an unbound message is left alone,
 * so sustain, sostenuto and soft keep their meaning unless bound.
 */
export class ControlMap {
  private readonly pressed: boolean[];
  private readonly latched: boolean[];

  constructor(
    readonly bindings: readonly Binding[],
    private readonly speller: ControlledSpeller,
  ) {
    this.pressed = bindings.map(() => false);
    this.latched = bindings.map(() => false);
  }

  /** Offers a message to the controls: undefined when no binding uses it, else what it fires (maybe nothing). */
  intercept(message: MidiMessage, source: number): Firing[] | undefined {
    let firings: Firing[] | undefined;
    for (let i = 0; i < this.bindings.length; i++) {
      const binding = this.bindings[i]!;
      const pressed = pressOf(binding.trigger, message, source);
      if (pressed === undefined) continue;
      firings ??= [];
      const hold = actionEntry(binding.action.name).kind === 'hold';
      if (binding.trigger.kind === 'program') {
        this.latched[i] = !this.latched[i]; // a program change has no release: it always toggles
        firings.push({ action: binding.action, on: hold ? this.latched[i]! : true });
        continue;
      }
      if (pressed === this.pressed[i]) continue;
      this.pressed[i] = pressed;
      if (!pressed && (binding.latch || !hold)) continue; // latches and press actions change only on presses
      if (binding.latch) this.latched[i] = !this.latched[i];
      firings.push({ action: binding.action, on: hold && binding.latch ? this.latched[i]! : pressed });
    }
    return firings;
  }

  /** Carries out what `intercept` returned. */
  run(firings: readonly Firing[], engine: EngineActions): void {
    for (const f of firings) fire(f, { speller: this.speller, engine });
  }
}

/** Runs one firing (a page button or a programme step fires the same way). */
export function fire(firing: Firing, target: ActionTarget): void {
  actionEntry(firing.action.name).run(target, firing.on, firing.action);
}
