import { monitorEventLoopDelay, performance } from 'node:perf_hooks';
import { WebMidi } from 'webmidi';
import { enableMidi, findInput, findOutput } from '../src/io/midi-system.js';
import { virtualInput, virtualOutput } from '../src/io/virtual-ports.js';
import { startSession } from '../src/live/session.js';
import { loadTuningPreset } from '../src/presets/tuning-presets.js';
import { ControlledSpeller } from '../src/spelling/controlled.js';
import { createStrategy } from '../src/spelling/strategy.js';
import { A440 } from '../src/tuning/index.js';
import WebSocket from 'ws';
import { heading, percentile } from './timing.js';

const quiet = { stdout: { write: () => undefined }, stderr: { write: () => undefined } };
const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

async function until(condition: () => boolean): Promise<void> {
  while (!condition()) await sleep(10);
}

/** Sends `count` notes one at a time into `input` and times each to its note-on at the far end. */
async function timeNotes(send: (bytes: number[]) => void, arrivals: { wait: ((key: number) => void) | undefined }, count: number): Promise<number[]> {
  const times: number[] = [];
  for (let i = 0; i < count; i++) {
    const key = 36 + (i * 7) % 60;
    const arrived = new Promise<void>((resolve) => (arrivals.wait = (k) => k === key && resolve()));
    const t0 = performance.now();
    send([0x90, key, 80]);
    await arrived;
    times.push(performance.now() - t0);
    send([0x80, key, 0]);
    await sleep(1);
  }
  return times.sort((a, b) => a - b);
}

const stats = (t: number[]) => ({ p50: percentile(t, 0.5) * 1000, p99: percentile(t, 0.99) * 1000, max: (t[t.length - 1] ?? 0) * 1000 });

/** Added latency of the bridge against a plain passthrough over the same kind of virtual ports, in one run. */
export async function benchLatency(count = 2000): Promise<void> {
  heading(`live: send → receive through webmidi virtual ports, ${count} notes each`);
  const plainIn = virtualInput('bench plain in');
  const plainArrivals: { wait: ((key: number) => void) | undefined } = { wait: undefined };
  virtualOutput('bench plain out', (bytes) => (bytes[0]! & 0xf0) === 0x90 && plainArrivals.wait?.(bytes[1]!));
  const bridgeIn = virtualInput('bench bridge in');
  const bridgeArrivals: { wait: ((key: number) => void) | undefined } = { wait: undefined };
  virtualOutput('bench bridge out', (bytes) => (bytes[0]! & 0xf0) === 0x90 && bytes[2]! > 0 && bridgeArrivals.wait?.(bytes[1]!));
  // The same bridge with the stage page open and a page connected (a WebSocket client taking every frame).
  const pageIn = virtualInput('bench page in');
  const pageArrivals: { wait: ((key: number) => void) | undefined } = { wait: undefined };
  virtualOutput('bench page out', (bytes) => (bytes[0]! & 0xf0) === 0x90 && bytes[2]! > 0 && pageArrivals.wait?.(bytes[1]!));
  await enableMidi({ virtualOnly: true });
  await until(() => ['plain', 'bridge', 'page'].every((n) => !!findInput(`bench ${n} in`) && !!findOutput(`bench ${n} out`)));
  const plainOut = findOutput('bench plain out')!;
  findInput('bench plain in')!.addListener('midimessage', ((e: { message: { rawData: Uint8Array } }) => plainOut.send(e.message.rawData)) as never);
  const speller = new ControlledSpeller(createStrategy({ strategy: 'follow' }));
  const session = await startSession(
    { inputs: ['bench bridge in'], output: 'bench bridge out', engine: { tuning: loadTuningPreset('meantone-1-4').tuning, reference: A440 }, speller, strategy: 'follow', title: 'bench', quiet: true, virtualOnly: true },
    quiet,
  );
  const tuning = loadTuningPreset('meantone-1-4');
  const withPage = await startSession(
    {
      inputs: ['bench page in'],
      output: 'bench page out',
      engine: { tuning: tuning.tuning, reference: A440 },
      speller: new ControlledSpeller(createStrategy({ strategy: 'follow' })),
      strategy: 'follow',
      title: 'bench',
      quiet: true,
      virtualOnly: true,
      page: { port: 0, pieceTitle: 'bench', tuningId: tuning.id, tuningName: tuning.name },
    },
    quiet,
  );
  const pageUrl = new URL(withPage.page!.server.url);
  const viewer = new WebSocket(`ws://${pageUrl.host}/live`, { origin: pageUrl.origin });
  let frames = 0;
  viewer.on('message', () => void frames++);
  await new Promise((resolve) => viewer.once('open', resolve));
  await timeNotes(plainIn.send, plainArrivals, 200); // warm up every path
  await timeNotes(bridgeIn.send, bridgeArrivals, 200);
  await timeNotes(pageIn.send, pageArrivals, 200);
  const plain = stats(await timeNotes(plainIn.send, plainArrivals, count));
  const bridge = stats(await timeNotes(bridgeIn.send, bridgeArrivals, count));
  const framesBefore = frames;
  const pageStart = performance.now();
  const paged = stats(await timeNotes(pageIn.send, pageArrivals, count));
  const pageSeconds = (performance.now() - pageStart) / 1000;
  const row = (label: string, s: ReturnType<typeof stats>) => `${label.padEnd(12)} p50 ${s.p50.toFixed(1).padStart(6)} µs   p99 ${s.p99.toFixed(1).padStart(7)} µs   max ${s.max.toFixed(1).padStart(8)} µs\n`;
  process.stdout.write(row('passthrough', plain) + row('diesis play', bridge) + row('  + page', paged));
  process.stdout.write(`added at p50 ${(bridge.p50 - plain.p50).toFixed(1)} µs (ratio ${(bridge.p50 / plain.p50).toFixed(2)}), at p99 ${(bridge.p99 - plain.p99).toFixed(1)} µs (ratio ${(bridge.p99 / plain.p99).toFixed(2)})\n`);
  process.stdout.write(
    `with the stage page connected (${((frames - framesBefore) / pageSeconds).toFixed(1)} frames/s to it): added at p50 ${(paged.p50 - plain.p50).toFixed(1)} µs, at p99 ${(paged.p99 - plain.p99).toFixed(1)} µs; the page itself adds ${(paged.p50 - bridge.p50).toFixed(1)} µs at p50, ${(paged.p99 - bridge.p99).toFixed(1)} µs at p99\n`,
  );
  viewer.close();
  session.stop('bench over');
  withPage.stop('bench over');
  WebMidi.removeListener();
}

/**
 * A dense performance through the live path in real time: about 50 notes a second with the
 * sustain pedal going down and up, chords and runs. Prints heap before and after and the longest
 * event-loop stall.
 */
export async function benchSoak(minutes: number): Promise<void> {
  heading(`live: a ${minutes}-minute dense performance (about 50 notes/s, pedalling) through diesis play`);
  const input = virtualInput('soak keyboard');
  let received = 0;
  virtualOutput('soak synth', () => void received++);
  await enableMidi({ virtualOnly: true });
  await until(() => !!findInput('soak keyboard') && !!findOutput('soak synth'));
  const speller = new ControlledSpeller(createStrategy({ strategy: 'follow' }));
  const session = await startSession(
    { inputs: ['soak keyboard'], output: 'soak synth', engine: { tuning: loadTuningPreset('meantone-1-4').tuning, reference: A440 }, speller, strategy: 'follow', title: 'soak', quiet: true, virtualOnly: true },
    quiet,
  );
  (globalThis as { gc?: () => void }).gc?.();
  const heapBefore = process.memoryUsage().heapUsed;
  const loop = monitorEventLoopDelay({ resolution: 1 });
  loop.enable();
  const end = performance.now() + minutes * 60_000;
  let sent = 0;
  let step = 0;
  const held: number[] = [];
  while (performance.now() < end) {
    // Five notes every 100 ms: a chord or a run, each released 200–400 ms later; the pedal changes each second.
    for (let i = 0; i < 5; i++) {
      const key = 36 + ((step * 5 + i * 7) % 61);
      input.send([0x90, key, 60 + (i * 13) % 60]);
      held.push(key);
      sent++;
    }
    while (held.length > 15) input.send([0x80, held.shift()!, 0]);
    if (step % 10 === 0) input.send([0xb0, 64, step % 20 === 0 ? 127 : 0]);
    step++;
    await sleep(100);
  }
  for (const k of held) input.send([0x80, k, 0]);
  input.send([0xb0, 64, 0]);
  await sleep(500);
  loop.disable();
  (globalThis as { gc?: () => void }).gc?.();
  const heapAfter = process.memoryUsage().heapUsed;
  process.stdout.write(`notes sent ${sent.toLocaleString('en')}, messages received by the synth ${received.toLocaleString('en')}\n`);
  process.stdout.write(`heap before ${(heapBefore / 1e6).toFixed(1)} MB, after ${(heapAfter / 1e6).toFixed(1)} MB; longest event-loop stall ${(loop.max / 1e6).toFixed(2)} ms (p99 ${(loop.percentile(99) / 1e6).toFixed(2)} ms)\n`);
  session.stop('soak over');
}
