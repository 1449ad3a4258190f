import type { DeclaredKey } from './keys.js';
import type { ControlledSpeller } from './controlled.js';

/** What a control can do. */
export type Action =
  | { readonly kind: 'flip' }
  | { readonly kind: 'shift'; readonly steps: 1 | -1 }
  | { readonly kind: 'force'; readonly to: 'sharps' | 'flats' }
  | { readonly kind: 'freeze' }
  | { readonly kind: 'set-key'; readonly key: DeclaredKey }
  | { readonly kind: 'respell' }
  | { readonly kind: 'pass' }
  | { readonly kind: 'panic' };

/** What fires a control: a switch pedal, a zone of an expression pedal, a key switch, a program change. */
export type Trigger =
  | { readonly kind: 'cc'; readonly controller: number; readonly channel: number | undefined; readonly threshold: number }
  | { readonly kind: 'zone'; readonly controller: number; readonly channel: number | undefined; readonly from: number; readonly to: number }
  | { readonly kind: 'note'; readonly key: number; readonly channel: number | undefined; readonly source: number | undefined }
  | { readonly kind: 'program'; readonly program: number; readonly channel: number | undefined };

export interface Binding {
  readonly trigger: Trigger;
  readonly action: Action;
  /** Flip, force and freeze hold while pressed, or with `latch` toggle on each press. */
  readonly latch: boolean;
}

/** Actions the router itself carries out. */
export type RouterAction = 'respell' | 'pass' | 'panic';

export interface ControlOutcome {
  readonly routerActions: readonly RouterAction[];
}

/** The effect a control's press or release has: the speller's state, or router actions. */
function apply(binding: Binding, pressed: boolean, on: boolean, speller: ControlledSpeller, actions: RouterAction[]): void {
  const { action } = binding;
  switch (action.kind) {
    case 'flip':
      speller.flip = on;
      return;
    case 'force':
      speller.force = on ? action.to : speller.force === action.to ? undefined : speller.force;
      return;
    case 'freeze':
      speller.setFrozen(on);
      return;
    case 'shift':
      if (pressed) speller.shift += action.steps;
      return;
    case 'set-key':
      if (pressed) speller.setKey(action.key);
      return;
    case 'respell':
    case 'pass':
    case 'panic':
      if (pressed) actions.push(action.kind);
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

  /** Offers a message to the controls; undefined when no binding uses it. */
  intercept(message: readonly number[], source: number): ControlOutcome | undefined {
    const status = message[0] ?? 0;
    if (status >= 0xf0) return undefined;
    const kind = status & 0xf0;
    const channel = status & 0x0f;
    const a = message[1] ?? 0;
    const b = message[2] ?? 0;
    const routerActions: RouterAction[] = [];
    let used = false;
    this.bindings.forEach((binding, i) => {
      const t = binding.trigger;
      if (t.channel !== undefined && t.channel !== channel) return;
      let pressed: boolean | undefined;
      if (t.kind === 'cc' && kind === 0xb0 && a === t.controller) pressed = b >= t.threshold;
      else if (t.kind === 'zone' && kind === 0xb0 && a === t.controller) pressed = b >= t.from && b <= t.to;
      else if (t.kind === 'note' && (kind === 0x90 || kind === 0x80) && a === t.key && (t.source === undefined || t.source === source)) pressed = kind === 0x90 && b > 0;
      else if (t.kind === 'program' && kind === 0xc0 && a === t.program) {
        used = true;
        this.latched[i] = !this.latched[i]; // a program change has no release: it always toggles
        apply(binding, true, this.latched[i]!, this.speller, routerActions);
        return;
      } else return;
      used = true;
      if (pressed === this.pressed[i]) return;
      this.pressed[i] = pressed;
      if (binding.latch && pressed) this.latched[i] = !this.latched[i];
      const on = binding.latch ? this.latched[i]! : pressed;
      if (binding.latch && !pressed) return; // a latched control changes only on presses
      apply(binding, pressed, on, this.speller, routerActions);
    });
    return used ? { routerActions } : undefined;
  }
}
