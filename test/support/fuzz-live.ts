import { enableMidi } from '../../src/io/midi-system.js';
import { virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { Bridge } from '../../src/live/bridge.js';
import { createRouter } from '../../src/router/setup.js';
import { type FuzzReport, type FuzzSetup, type FuzzStep, fuzzEngine, letGo, observe, RELEASE_GUARD_MS } from './fuzz.js';
import { InvariantChecker } from './invariants.js';
import { ReferenceStream } from './reference-stream.js';

const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function until(condition: () => boolean, what: string, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!condition()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await pause(1);
  }
}

let runs = 0;

/**
 * Plays steps through the live bridge on in-process virtual ports (a keyboard and a pedal box in,
 * the reference synth out), with unplugging and plugging back, checked by the invariants. The
 * bridge's clock is the performance's own time, so gaps and timeouts happen as written without
 * waiting for them.
 */
export async function runLiveFuzz(setup: FuzzSetup, seed: number, steps: readonly FuzzStep[]): Promise<FuzzReport & { readonly inputDrops: number }> {
  await enableMidi({ virtualOnly: true });
  const id = ++runs;
  let now = 0;
  const checker = new InvariantChecker({ mode: setup.mode, tailMs: RELEASE_GUARD_MS });
  const devices = [virtualInput(`fuzz keyboard ${id}`), virtualInput(`fuzz pedals ${id}`)];
  const synthPort = virtualOutput(`fuzz synth ${id}`, (bytes) => checker.output(now, bytes));
  const router = createRouter(fuzzEngine(setup, seed, (e) => observe(checker, e)));
  const names = devices.map((d) => d.name);
  await until(() => Bridge.portsPresent(names, synthPort.name), 'the virtual ports');
  checker.input([]);
  const bridge = Bridge.open({ inputs: names, output: synthPort.name, router, clock: () => now });
  const streams = devices.map(() => new ReferenceStream());
  const send = (source: number, bytes: number[]): void => {
    checker.input(streams[source]!.feed(bytes), source);
    devices[source]!.send(bytes);
  };
  try {
    let sinceYield = 0;
    for (const step of steps) {
      now = step.time;
      if ('hotplug' in step) {
        const device = devices[step.source]!;
        if (step.hotplug === 'unplug') {
          checker.input([]);
          device.unplug();
          await until(() => bridge.inputsConnected[step.source] === false, 'the unplug');
          streams[step.source]!.cut();
          checker.unplugged(step.source);
        } else {
          device.plug();
          await until(() => bridge.inputsConnected[step.source] === true, 'the plug');
        }
        continue;
      }
      send(step.source, step.bytes);
      if (++sinceYield >= 200) {
        sinceYield = 0;
        await pause(0); // let the bridge's timer run now and then
      }
    }
    for (let source = 0; source < devices.length; source++) send(source, letGo());
    const counts = checker.finish(now);
    const bookMismatch = Math.abs(router.soundingCount - checker.synth.active().length);
    return {
      setup,
      path: 'live',
      events: steps.length,
      counts,
      bookMismatch,
      violations: checker.violations,
      clean: checker.clean && bookMismatch === 0,
      inputDrops: bridge.inputDrops.bytes,
    };
  } finally {
    bridge.stop('fuzz over');
  }
}
