import type { TimedMessage } from '../midi/bytes.js';
import type { Router } from '../router/router.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import type { ActionName } from '../spelling/control-map.js';
import { parseKey, type DeclaredKey } from '../spelling/keys.js';
import { UserError } from '../util/errors.js';
import type { StageControl, StageControlResult } from './stage-state.js';

/** What the page's requests act on: the same speller and engine the pedals act on. */
export interface ControlTargets {
  readonly speller: ControlledSpeller;
  readonly router: Router;
  /** Sends the engine's messages on to the synth (the bridge's `send`). */
  readonly send: (messages: readonly TimedMessage[]) => void;
  readonly clock: () => number;
  /** Moves through a concert programme; without one the page is told there is nowhere to go. */
  readonly piece?: ((step: 1 | -1) => StageControlResult) | undefined;
}

const OK: StageControlResult = { ok: true };

/**
 * The one place a page request becomes an engine action: each does what the matching pedal
 * action does (flip and freeze set the speller's latches, set-key sets the key, 12-ET comparison
 * and panic go through the router), so the page and the pedals never disagree.
 */
export function applyStageControl(control: StageControl, targets: ControlTargets): StageControlResult {
  const { router } = targets;
  const act = (name: ActionName, on: boolean, key?: DeclaredKey): StageControlResult => {
    targets.send(router.act(targets.clock(), { action: { name, key }, on }));
    return OK;
  };
  switch (control.kind) {
    case 'panic':
      targets.send(router.panic(targets.clock(), 'panic on the stage page'));
      return OK;
    case 'flip':
      return act('flip', control.on);
    case 'freeze':
      return act('freeze', control.on);
    case 'set-key':
      try {
        return act('set-key', true, parseKey(control.key));
      } catch (error) {
        if (error instanceof UserError) return { ok: false, reason: error.message };
        throw error;
      }
    case 'compare-12et':
      return router.passing === control.on ? OK : act('pass', true); // the pass action toggles
    case 'piece':
      return targets.piece?.(control.step) ?? { ok: false, reason: 'no concert programme: there is only this piece' };
  }
}
