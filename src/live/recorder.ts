import { META, tempoMeta, textMeta, writeMidiFile, type MetaEvent } from '../render/smf.js';

/**
 * Records a take: what came in and what went out, with their times, as a Standard MIDI File
 * (one track each, 500 ticks per beat at 120 bpm, so a tick is a millisecond).
 */
export class Recorder {
  private readonly input: Array<{ tick: number; data: readonly number[] }> = [];
  private readonly output: Array<{ tick: number; data: readonly number[] }> = [];
  private start: number | undefined;

  private tick(time: number): number {
    this.start ??= time;
    return Math.max(0, Math.round(time - this.start));
  }

  received(time: number, data: readonly number[]): void {
    this.input.push({ tick: this.tick(time), data });
  }

  sent(time: number, data: readonly number[]): void {
    this.output.push({ tick: this.tick(time), data });
  }

  toMidiFile(): Uint8Array {
    const meta: Array<{ tick: number; meta: MetaEvent }> = [
      { tick: 0, meta: tempoMeta(500_000) },
      { tick: 0, meta: textMeta(META.trackName, 'diesis take: track 2 as played, track 3 as sent') },
    ];
    const byTick = (a: { tick: number }, b: { tick: number }): number => a.tick - b.tick;
    return writeMidiFile({ ticksPerBeat: 500 }, meta, [[...this.input].sort(byTick), [...this.output].sort(byTick)]);
  }
}
