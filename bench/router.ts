import { performance } from 'node:perf_hooks';
import { pitchBend } from '../src/midi/bytes.js';
import { centsToBend } from '../src/midi/pitch-bend.js';
import { loadTuningPreset } from '../src/presets/tuning-presets.js';
import type { OutputContext, OutputStrategy, Placement } from '../src/router/output.js';
import { PitchTable, type TunedNote } from '../src/router/pitch-table.js';
import { Router } from '../src/router/router.js';
import { createEngine, createRouter, DEFAULT_CHANNELS, type EngineOptionsInput } from '../src/router/setup.js';
import { renderEvents } from '../src/render/render-midi.js';
import { fixedSpeller } from '../src/spelling/speller.js';
import { A440, type Tuning } from '../src/tuning/index.js';
import { corpusDir, loadCorpus, type Movement } from './corpus.js';
import { heading, percentile } from './timing.js';

/** The yardstick: a channel per note in turn, and a pitch bend before every note-on. */
class NaiveOutput implements OutputStrategy {
  readonly zoneChannels = DEFAULT_CHANNELS;
  readonly allChannels = DEFAULT_CHANNELS;
  private next = 0;
  start(): void {}
  place(note: TunedNote, _time: number, context: OutputContext): Placement {
    const channel = DEFAULT_CHANNELS[this.next++ % DEFAULT_CHANNELS.length]!;
    context.emit(pitchBend(channel, centsToBend(note.offset.residual, 48).value));
    return { channel, key: note.nearestKey };
  }
  voiceEnded(): void {}
  wheel(): void {}
  panic(): void {}
}

function play(router: Router, movement: Movement, timings?: number[]): { bytesIn: number; bytesOut: number } {
  let bytesIn = 0;
  let bytesOut = 0;
  router.start(0); // set-up messages are sent once, not counted
  for (const e of movement.midi.events) {
    bytesIn += e.data.length;
    const t0 = timings ? performance.now() : 0;
    const out = router.process(e.time, e.data);
    if (timings) timings.push(performance.now() - t0);
    for (const m of out) bytesOut += m.data.length;
  }
  return { bytesIn, bytesOut };
}

/** Engine throughput and per-event cost on the corpus, and output bytes per input byte. */
export function benchRouter(): void {
  const corpus = loadCorpus();
  if (corpus.length === 0) {
    process.stdout.write('\n(router bench skipped: corpus/mozart not found)\n');
    return;
  }
  const tuning = loadTuningPreset('meantone-1-4').tuning;
  const base: EngineOptionsInput = { tuning, reference: A440 };
  heading(`router: the corpus (${corpus.length} movements) played as fast as possible, quarter-comma meantone`);
  for (const [label, options] of [
    ['bend, MPE', base],
    ['bend, multi ±2', { ...base, layout: 'multi', bendRange: 2, channels: [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15] }],
    ['mts-note', { ...base, mode: 'mts-note', channels: [0] }],
    ['mts-octave', { ...base, mode: 'mts-octave', channels: [0] }],
  ] as const) {
    for (const m of corpus) play(createRouter(options as EngineOptionsInput), m); // warm up
    // Throughput: whole passes over the corpus with no clock read per event (the best of three).
    let events = 0;
    let bytesIn = 0;
    let bytesOut = 0;
    let seconds = Infinity;
    for (let pass = 0; pass < 3; pass++) {
      events = bytesIn = bytesOut = 0;
      const start = performance.now();
      for (const m of corpus) {
        const r = play(createRouter(options as EngineOptionsInput), m);
        events += m.midi.events.length;
        bytesIn += r.bytesIn;
        bytesOut += r.bytesOut;
      }
      seconds = Math.min(seconds, (performance.now() - start) / 1000);
    }
    // Cost of each event, measured one by one.
    const timings: number[] = [];
    for (const m of corpus) play(createRouter(options as EngineOptionsInput), m, timings);
    timings.sort((a, b) => a - b);
    process.stdout.write(
      `${label.padEnd(15)} ${Math.round(events / seconds).toLocaleString('en').padStart(10)} events/s   p50 ${(percentile(timings, 0.5) * 1000).toFixed(2)} µs   p99 ${(percentile(timings, 0.99) * 1000).toFixed(2)} µs   bytes out/in ${(bytesOut / bytesIn).toFixed(3)}\n`,
    );
  }
  let naiveIn = 0;
  let naiveOut = 0;
  for (const m of corpus) {
    const table = new PitchTable(tuning, A440, 440);
    const r = play(new Router({ table, speller: fixedSpeller(), output: new NaiveOutput(), wheelRange: 2 }), m);
    naiveIn += r.bytesIn;
    naiveOut += r.bytesOut;
  }
  process.stdout.write(`naive allocator (a bend before every note-on)  bytes out/in ${(naiveOut / naiveIn).toFixed(3)}   (physical minimum 1.000)\n`);
  benchShortPieces(tuning);
}

/**
 * Short four-part pieces (the Schütz corpus: sacred concertos for few voices), rendered whole as a
 * file is: set-up, every event, the closing release and panic. On a short file the set-up and the
 * closing messages weigh most, so this is where sending a bend only when a channel is first used
 * and centring only the channels used shows.
 */
function benchShortPieces(tuning: Tuning): void {
  const pieces = loadCorpus(corpusDir('schuetz'));
  if (pieces.length === 0) return;
  let bytesIn = 0;
  let playing = 0;
  let whole = 0;
  let bends = 0;
  for (const m of pieces) {
    const engine = createEngine({ tuning, reference: A440, gather: 'same-time' });
    const { summary, messages } = renderEvents(m.midi, engine);
    const inBytes = m.midi.events.reduce((n, e) => n + e.data.length, 0);
    bytesIn += inBytes;
    playing += summary.bytesPerInputByte * inBytes;
    whole += summary.wholeBytesPerInputByte * inBytes;
    bends += messages.filter((x) => (x.data[0]! & 0xf0) === 0xe0).length;
  }
  process.stdout.write(
    `short four-part pieces (${pieces.length} Schütz concertos, bend MPE): bytes out/in while playing ${(playing / bytesIn).toFixed(3)}, whole file ${(whole / bytesIn).toFixed(3)} (set-up RPNs and closing panic included), ${(bends / pieces.length).toFixed(1)} bends a piece\n`,
  );
}
