import { CC } from '../midi/bytes.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';

/** What a parameter message from the keyboard does. */
export type ParameterEffect = 'consumed' | 'forward' | 'wheel-range';

type Selection = 'none' | 'rpn' | 'nrpn';

interface ParameterMachine {
  selection: Selection;
  msb: number;
  lsb: number;
}

/**
 * The keyboard's own controller state: the registered/non-registered parameter machine of each
 * input channel (MIDI 1.0: CC 101/100 select an RPN, CC 99/98 an NRPN, CC 6/38/96/97 carry data),
 * and the pitch wheel: its range (RPN 0) and its value.
 */
export class KeyboardState {
  wheelRange: number;
  wheelValue = BEND_CENTRE;
  private readonly machines = new Map<number, ParameterMachine>();

  constructor(initialWheelRange: number) {
    this.wheelRange = initialWheelRange;
  }

  /**
   * Takes one parameter controller. Registered parameters are consumed (they would change the
   * synth's bend ranges); RPN 0 sets the wheel range. Non-registered ones are forwarded.
   */
  parameter(source: number, channel: number, controller: number, value: number): ParameterEffect {
    const id = source * 16 + channel;
    let state = this.machines.get(id);
    if (!state) {
      state = { selection: 'none', msb: 127, lsb: 127 };
      this.machines.set(id, state);
    }
    if (controller === CC.rpnMsb || controller === CC.rpnLsb) {
      if (controller === CC.rpnMsb) state.msb = value;
      else state.lsb = value;
      state.selection = state.msb === 127 && state.lsb === 127 ? 'none' : 'rpn';
      return 'consumed';
    }
    if (controller === CC.nrpnMsb || controller === CC.nrpnLsb) {
      state.selection = 'nrpn';
      return 'forward';
    }
    if (state.selection === 'nrpn') return 'forward';
    if (state.selection === 'rpn' && state.msb === 0 && state.lsb === 0) {
      const cents = Math.round((this.wheelRange % 1) * 100);
      if (controller === CC.dataEntry) this.wheelRange = value + cents / 100;
      else if (controller === CC.dataEntryLsb) this.wheelRange = Math.floor(this.wheelRange) + Math.min(value, 99) / 100;
      else return 'consumed';
      if (this.wheelRange <= 0) this.wheelRange = 0.01;
      return 'wheel-range';
    }
    return 'consumed';
  }

  /** Forgets one source's parameter selections (a device went away mid-message). */
  forgetSource(source: number): void {
    for (let channel = 0; channel < 16; channel++) this.machines.delete(source * 16 + channel);
  }
}

/** Controllers that belong to the parameter machine. */
export function isParameterController(controller: number): boolean {
  switch (controller) {
    case CC.rpnMsb:
    case CC.rpnLsb:
    case CC.nrpnMsb:
    case CC.nrpnLsb:
    case CC.dataEntry:
    case CC.dataEntryLsb:
    case CC.dataIncrement:
    case CC.dataDecrement:
      return true;
    default:
      return false;
  }
}
