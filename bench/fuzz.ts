import { performance } from 'node:perf_hooks';
import { describeSetup, FUZZ_SETUPS, generatePerformance, runEngineFuzz, runRenderFuzz, type FuzzFlags, type FuzzReport } from '../test/support/fuzz.js';
import { runLiveFuzz } from '../test/support/fuzz-live.js';
import { heading } from './timing.js';

// The fuzz test of test/fuzz/ at scale: the same generator and the same invariant checker
// (test/support/invariants.ts), with the flags the test uses. Figures only; nothing is asserted.
const TEST_FLAGS: FuzzFlags = { knownDefects: false, foundDefects: false };

interface Totals {
  events: number;
  packets: number;
  noteOnsIn: number;
  noteOnsOut: number;
  stuck: number;
  malformed: number;
  retunes: number;
  lost: number;
  ms: number;
}

const row = (label: string, t: Totals): string =>
  `${label.padEnd(30)} ${t.events.toLocaleString('en').padStart(10)} ${t.packets.toLocaleString('en').padStart(10)} ${t.noteOnsIn.toLocaleString('en').padStart(9)} ${String(t.lost).padStart(5)} ${String(t.stuck).padStart(6)} ${String(t.malformed).padStart(9)} ${String(t.retunes).padStart(8)} ${(t.ms / 1000).toFixed(1).padStart(7)} s\n`;

const header = `${'setup'.padEnd(30)} ${'events'.padStart(10)} ${'packets'.padStart(10)} ${'note-ons'.padStart(9)} ${'lost'.padStart(5)} ${'stuck'.padStart(6)} ${'malformed'.padStart(9)} ${'retunes'.padStart(8)} ${'time'.padStart(9)}\n`;

function add(t: Totals, r: FuzzReport, events: number, ms: number): void {
  t.events += events;
  t.packets += r.events;
  t.noteOnsIn += r.counts.inputNoteOns;
  t.noteOnsOut += r.counts.outputNoteOns;
  t.lost += r.counts.inputNoteOns - r.counts.dropped - r.counts.outputNoteOns;
  t.stuck += r.counts.stuck + r.counts.ringing + r.counts.stuckAfterUnplug;
  t.malformed += r.counts.malformed;
  t.retunes += r.counts.retunesUnderNotes;
  t.ms += ms;
}

const empty = (): Totals => ({ events: 0, packets: 0, noteOnsIn: 0, noteOnsOut: 0, stuck: 0, malformed: 0, retunes: 0, lost: 0, ms: 0 });

/**
 * Random performances through the engine and `render` (`events` in all for each, spread over every
 * mode and layout with fixed and follow spelling), and through the live bridge on virtual ports
 * (`liveEvents`), with the test's flags unless told otherwise. Prints events, input note-ons, note-ons lost, stuck notes, malformed messages,
 * retunes under sounding notes and time.
 */
export async function benchFuzz(events = 1_000_000, liveEvents = 1_000_000, FLAGS: FuzzFlags = TEST_FLAGS): Promise<void> {
  heading(`fuzz: random performances, every mode and layout, fixed and follow spelling (flags: knownDefects ${FLAGS.knownDefects ? 'on' : 'off'}, foundDefects ${FLAGS.foundDefects ? 'on' : 'off'})`);
  process.stdout.write('events generated; packets sent (an event may arrive cut in several); note-ons in; lost = in − out − reported dropped; stuck = held, sustained or ringing at the end, or after the device holding them went away\n');
  const perSetup = Math.ceil(events / FUZZ_SETUPS.length);
  const livePerSetup = Math.ceil(liveEvents / FUZZ_SETUPS.length);
  for (const path of ['engine', 'render', 'live'] as const) {
    process.stdout.write(`\n${path}${path === 'live' ? ' (virtual ports, unplugging)' : path === 'engine' ? ' (two devices, unplugging)' : ' (files)'}\n${header}`);
    const total = empty();
    for (const [i, setup] of FUZZ_SETUPS.entries()) {
      const seed = 90_000 + i;
      const count = path === 'live' ? livePerSetup : perSetup;
      const steps = generatePerformance({ seed, events: count, setup, flags: FLAGS, sources: path === 'render' ? 1 : 2, hotplug: path !== 'render' });
      const start = performance.now();
      const report = path === 'engine' ? runEngineFuzz(setup, seed, steps, 2) : path === 'render' ? runRenderFuzz(setup, seed, steps) : await runLiveFuzz(setup, seed, steps);
      const t = empty();
      add(t, report, count, performance.now() - start);
      add(total, report, count, t.ms);
      process.stdout.write(row(describeSetup(setup), t));
      for (const v of report.violations.slice(0, 3)) process.stdout.write(`    ! ${v}\n`);
    }
    process.stdout.write(row('all', total));
  }
}
