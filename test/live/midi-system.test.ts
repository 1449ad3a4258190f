import type { SessionOptions } from '../../src/live/session.js';
import { spawnSync } from 'node:child_process';
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ALSA_SEQUENCER, disableMidi, midiSystemProblem } from '../../src/io/midi-system.js';
import { EXIT_CODES, runUntilStopped } from '../../src/live/run.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { A440 } from '../../src/tuning/index.js';
import { tempDir } from '../support/temp.js';
import { virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { SynthModel } from '../../src/synth/reference-synth.js';

const root = join(import.meta.dirname, '../..');

afterAll(async () => {
  await disableMidi();
});

describe('the MIDI system, when it cannot be opened', () => {
  it('is found missing before the native library is asked (Linux: the ALSA sequencer device)', () => {
    const dir = tempDir('diesis-seq-');
    expect(midiSystemProblem('linux', join(dir, 'seq'))).toBe(`the MIDI system is not available here (no ALSA sequencer at ${join(dir, 'seq')}): only virtual ports`);
    const present = join(dir, 'present');
    writeFileSync(present, '');
    expect(midiSystemProblem('linux', present)).toBeUndefined();
    expect(midiSystemProblem('darwin', join(dir, 'seq'))).toBeUndefined(); // elsewhere the system is always there
  });

  // Only where this machine has no sequencer (as in the project's container): the native library
  // would print its own "ALSA lib …" lines from native code, which only a child process shows.
  it.runIf(process.platform === 'linux' && !existsSync(ALSA_SEQUENCER))('says so in one line, once, with no native noise (built CLI)', () => {
    const run = (...args: string[]) => spawnSync(process.execPath, [join(root, 'bin/diesis.js'), ...args], { cwd: root, encoding: 'utf8', timeout: 20_000 });
    const ports = run('ports');
    expect(ports.stdout).toBe(`the MIDI system is not available here (no ALSA sequencer at ${ALSA_SEQUENCER}): only virtual ports\n`);
    expect(ports.stderr).toBe('');
    expect(ports.status).toBe(0);
    const play = run('play', '--in', 'keyboard', '--out', 'synth');
    expect(play.stderr).toBe(`diesis: no MIDI input matches "keyboard" (the MIDI system is not available here: no ALSA sequencer at ${ALSA_SEQUENCER})\n`);
    expect(play.status).toBe(1);
    const wait = run('play', '--in', 'keyboard', '--out', 'synth', '--wait');
    expect(wait.stderr).toBe(`diesis: --wait: the MIDI system is not available here (no ALSA sequencer at ${ALSA_SEQUENCER}), so no port can appear\n`);
    expect(wait.status).toBe(1);
  });
});

/** A quiet session on virtual ports that waits for its ports to appear. */
function waitingFor(input: string, output: string): SessionOptions {
  return {
    inputs: [input],
    output,
    engine: { tuning: loadTuningPreset('meantone-1-4').tuning, reference: A440 },
    speller: new ControlledSpeller(createStrategy({ strategy: 'fixed' })),
    strategy: 'fixed',
    title: 'test',
    quiet: true,
    virtualOnly: true,
    wait: true,
  };
}

describe('--stop-after while --wait waits for a port', () => {
  it('counts the waiting time too: a port that never comes does not hold the session for ever', async () => {
    let stderr = '';
    const io = { stdout: { write: () => undefined }, stderr: { write: (s: string) => void (stderr += s) } };
    const code = await runUntilStopped(waitingFor('a keyboard that is never plugged in', 'a synth that is never plugged in'), io, 0.3);
    expect(code).toBe(EXIT_CODES.quit);
    expect(stderr).toContain('waiting for "a keyboard that is never plugged in", "a synth that is never plugged in"');
    expect(stderr).toContain('diesis: --stop-after 0.3: stopped while still waiting for the ports');
  });

  it('a port that comes during the wait: the session runs, and the same timer ends it with the panic', async () => {
    const synth = new SynthModel(440);
    const io = { stdout: { write: () => undefined }, stderr: { write: () => undefined } };
    const running = runUntilStopped(waitingFor('late keyboard', 'late synth'), io, 1.5);
    await new Promise((r) => setTimeout(r, 100));
    virtualOutput('late synth', (bytes) => void synth.receive(performance.now(), bytes));
    const keyboard = virtualInput('late keyboard');
    while (synth.zone === undefined) await new Promise((r) => setTimeout(r, 20)); // the session has started: the MPE set-up arrived
    let ended = false;
    void running.then(() => (ended = true));
    keyboard.send([0x90, 60, 90]); // a note held until the timer ends the session
    while (!ended && synth.active().length === 0) await new Promise((r) => setTimeout(r, 10));
    expect(ended).toBe(false);
    expect(synth.active()).toHaveLength(1);
    expect(await running).toBe(EXIT_CODES.quit);
    expect(synth.active()).toEqual([]); // the panic sequence reached the synth
  });
});
