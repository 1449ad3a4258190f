import type { TimedMessage } from '../../src/midi/bytes.js';
import { DEFAULT_WINDOW, spellKey, type SpelledPitch } from '../../src/pitch/index.js';
import { createEngine, resolveEngineOptions, type EngineOptionsInput } from '../../src/router/setup.js';
import type { Tally } from '../../src/router/tally.js';
import type { Router, RouterEvent } from '../../src/router/router.js';
import { frequency } from '../../src/tuning/index.js';
import { malformation, SynthModel, type ModelVoice } from '../../src/synth/reference-synth.js';

export interface VoiceTag {
  readonly pitch: SpelledPitch;
  /** The tuning's frequency for the spelling, before the wheel. */
  readonly hz: number;
  /** Wheel offset in cents when the note started. */
  readonly wheelAtOnset: number;
}

/**
 * A router wired to the reference synth model. The expected spelling of each key comes from the
 * test (a fixed window by default), its frequency from the tuning core, never from the router.
 */
export class Rig {
  readonly router: Router;
  /** The engine's counts, folded from its events. */
  readonly tally: Tally;
  readonly model: SynthModel;
  readonly events: RouterEvent[] = [];
  readonly sent: TimedMessage[] = [];
  time = 0;
  wheelCents = 0;
  private readonly voices = new Map<number, ModelVoice>();
  private readonly options: ReturnType<typeof resolveEngineOptions>;

  constructor(
    input: EngineOptionsInput,
    private readonly spell: (key: number) => SpelledPitch = (key) => spellKey(input.window ?? DEFAULT_WINDOW, key),
    model?: SynthModel,
  ) {
    this.options = resolveEngineOptions(input);
    const engine = createEngine({ ...input, observer: (e) => this.events.push(e) });
    this.router = engine.router;
    this.tally = engine.tally;
    this.model = model ?? new SynthModel(this.options.synthA4, this.options.releaseGuardMs);
    this.deliver(this.router.start(0));
  }

  /** Feeds output to the model; a voice it starts is tagged with the spelling of `onset` (a key, or the pitch itself). */
  deliver(messages: readonly TimedMessage[], onset?: number | SpelledPitch): ModelVoice[] {
    const started: ModelVoice[] = [];
    for (const m of messages) {
      const problem = malformation(m.data);
      if (problem) throw new Error(`malformed output ${JSON.stringify(m.data)}: ${problem}`);
      this.sent.push(m);
      const voice = this.model.receive(m.time, m.data);
      if (voice) {
        if (onset !== undefined) {
          const pitch = typeof onset === 'number' ? this.spell(onset) : onset;
          const hz = frequency(this.options.tuning, this.options.reference, pitch);
          voice.tag = { pitch, hz, wheelAtOnset: this.wheelCents } satisfies VoiceTag;
        }
        started.push(voice);
      }
    }
    return started;
  }

  at(time: number): this {
    this.time = time;
    this.model.advance(time);
    return this;
  }

  after(ms: number): this {
    return this.at(this.time + ms);
  }

  send(bytes: number[], onset?: number | SpelledPitch, source = 0): ModelVoice[] {
    return this.deliver(this.router.process(this.time, bytes, source), onset);
  }

  on(key: number, velocity = 100, channel = 0): this {
    const started = this.send([0x90 | channel, key, velocity], key);
    const last = started[started.length - 1];
    if (last) this.voices.set(key, last);
    return this;
  }

  off(key: number, channel = 0): this {
    this.send([0x80 | channel, key, 0]);
    return this;
  }

  cc(controller: number, value: number, channel = 0): this {
    this.send([0xb0 | channel, controller, value]);
    return this;
  }

  wheel(value: number): this {
    this.wheelCents = ((value - 8192) / 8192) * this.options.wheelRange * 100;
    this.send([0xe0, value & 0x7f, value >> 7]);
    return this;
  }

  panic(): this {
    this.deliver(this.router.panic(this.time));
    return this;
  }

  /** Largest error in cents of any sounding voice against its spelling's frequency plus the wheel. */
  worstError(): number {
    let worst = 0;
    for (const v of this.model.sounding()) {
      const tag = v.tag as VoiceTag | undefined;
      if (!tag) continue;
      const expected = tag.hz * 2 ** (this.wheelCents / 1200);
      worst = Math.max(worst, Math.abs(1200 * Math.log2(this.model.frequency(v) / expected)));
    }
    return worst;
  }

  /** The model voice the last note-on of input `key` started. */
  voice(key: number): ModelVoice {
    const v = this.voices.get(key);
    if (!v) throw new Error(`no voice was started for key ${key}`);
    return v;
  }
}
