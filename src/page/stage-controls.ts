import type { TimedMessage } from '../midi/bytes.js';
import type { Router } from '../router/router.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import { parseKey } from '../spelling/keys.js';
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
  const { speller, router } = targets;
  switch (control.kind) {
    case 'panic':
      targets.send(router.panic(targets.clock(), 'panic on the stage page'));
      return OK;
    case 'flip':
      speller.flip = control.on;
      return OK;
    case 'freeze':
      speller.setFrozen(control.on);
      return OK;
    case 'set-key':
      try {
        speller.setKey(parseKey(control.key));
      } catch (error) {
        if (error instanceof UserError) return { ok: false, reason: error.message };
        throw error;
      }
      return OK;
    case 'compare-12et':
      if (router.passing !== control.on) targets.send(router.act(targets.clock(), 'pass'));
      return OK;
    case 'piece':
      return targets.piece?.(control.step) ?? { ok: false, reason: 'no concert programme: there is only this piece' };
  }
}
