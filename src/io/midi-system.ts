import { accessSync, constants } from 'node:fs';
import JZZ from 'jzz';
import { WebMidi, type Input, type Output } from 'webmidi';
import { UserError } from '../util/errors.js';

/** A MIDI port as the shell lists it. */
export interface PortInfo {
  readonly index: number;
  readonly name: string;
  readonly manufacturer: string;
  readonly state: string;
}

export interface MidiSystemOptions {
  /** Only in-process virtual ports (demo and tests): no hardware engine is loaded. */
  readonly virtualOnly?: boolean;
}

/** Where Linux's MIDI system (the ALSA sequencer) is opened. */
export const ALSA_SEQUENCER = '/dev/snd/seq';

/**
 * Why the computer's MIDI system cannot be opened, in a player's words, or undefined when it can
 * (or when this is not Linux: elsewhere the system is always there). Asked before jzz loads its
 * native engine, which otherwise prints the ALSA library's own messages straight to stderr.
 */
export function midiSystemProblem(platform: string = process.platform, sequencer: string = ALSA_SEQUENCER): string | undefined {
  if (platform !== 'linux') return undefined;
  try {
    accessSync(sequencer, constants.R_OK | constants.W_OK);
    return undefined;
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === 'EACCES' || code === 'EPERM' ? `${sequencer} may not be opened by this user: add it to the "audio" group` : `no ALSA sequencer at ${sequencer}`;
    return `the MIDI system is not available here (${why}): only virtual ports`;
  }
}

let enabled = false;
let unavailable: string | undefined;

/** Why there are no hardware ports, when the MIDI system could not be opened (after `enableMidi`). */
export function midiSystemNote(): string | undefined {
  return unavailable;
}

/** Starts MIDI through webmidi (which uses jzz in Node); system exclusive is allowed, for MTS. */
export async function enableMidi(options: MidiSystemOptions = {}): Promise<void> {
  if (enabled) return;
  unavailable = options.virtualOnly ? undefined : midiSystemProblem();
  if (options.virtualOnly || unavailable) JZZ({ engine: 'none' });
  try {
    await WebMidi.enable({ sysex: true });
  } catch (error) {
    throw new UserError(`MIDI could not be started (${error instanceof Error ? error.message : String(error)})`);
  }
  enabled = true;
}

export async function disableMidi(): Promise<void> {
  if (!enabled) return;
  enabled = false;
  await WebMidi.disable();
}

const info = (port: Input | Output, index: number): PortInfo => ({ index, name: port.name, manufacturer: port.manufacturer || '', state: port.state });

export function listPorts(): { inputs: PortInfo[]; outputs: PortInfo[] } {
  return { inputs: WebMidi.inputs.map(info), outputs: WebMidi.outputs.map(info) };
}

/** Matches a port by index (`0`) or by case-insensitive substring of its name. */
export function matchPort<T extends { name: string }>(ports: readonly T[], query: string): T | undefined {
  if (/^\d+$/u.test(query.trim())) return ports[Number(query)];
  const q = query.toLowerCase();
  return ports.find((p) => p.name.toLowerCase() === q) ?? ports.find((p) => p.name.toLowerCase().includes(q));
}

export function findInput(query: string): Input | undefined {
  return matchPort(WebMidi.inputs, query);
}

export function findOutput(query: string): Output | undefined {
  return matchPort(WebMidi.outputs, query);
}

/** One line saying what exists, for errors about a missing port. */
export function describePorts(kind: 'input' | 'output'): string {
  const ports = kind === 'input' ? WebMidi.inputs : WebMidi.outputs;
  if (ports.length === 0 && unavailable) return unavailable.replace(/ \((.*)\): only virtual ports$/u, ': $1');
  return ports.length === 0 ? `there are no MIDI ${kind}s` : `${kind}s: ${ports.map((p, i) => `${i} "${p.name}"`).join(', ')}`;
}

/**
 * Closes webmidi's own handle on an input that diesis reads through jzz directly
 * (src/io/raw-input.ts): the Web MIDI layer under webmidi would otherwise keep splitting the same
 * bytes into a queue that grows while a system-exclusive message is unfinished. The port stays
 * listed. webmidi opens an input again when it comes back, so call this on every return too.
 */
export function closeWebmidiInput(name: string): void {
  for (const input of WebMidi.inputs) if (input.name === name) void input.close().catch(() => undefined);
}

export type PortChange = { readonly kind: 'connected' | 'disconnected'; readonly type: 'input' | 'output'; readonly name: string };

/** Calls back when a port appears or disappears (hot-plug); returns a function that stops listening. */
export function onPortChange(callback: (change: PortChange) => void): () => void {
  const handler =
    (kind: 'connected' | 'disconnected') =>
    (e: { port: { type: string; name: string } }): void =>
      callback({ kind, type: e.port.type === 'input' ? 'input' : 'output', name: e.port.name });
  const connected = handler('connected');
  const disconnected = handler('disconnected');
  WebMidi.addListener('connected', connected);
  WebMidi.addListener('disconnected', disconnected);
  return () => {
    WebMidi.removeListener('connected', connected);
    WebMidi.removeListener('disconnected', disconnected);
  };
}

export type { Input, Output };
