/**
 * An independent reading of a MIDI byte stream, written from the MIDI 1.0 Detailed Specification
 * (not from src/midi/parser.ts), for the fuzz tests: how many note-ons a sender's bytes hold, and
 * which messages they are. Rules: a channel status sets running status; system common cancels it;
 * real-time bytes (F8–FF; F9 and FD undefined) stand alone wherever they appear; F0 opens a
 * system-exclusive message that F7 closes and any other non-real-time status abandons; data
 * bytes with no status to belong to are ignored.
 */
export class ReferenceStream {
  private running = 0;
  private message: number[] = [];
  private needed = 0;
  private sysex: number[] | undefined;

  /** The running status in force (0 when none): data bytes now would continue it. */
  get runningStatus(): number {
    return this.message.length === 0 && !this.sysex ? this.running : 0;
  }

  clone(): ReferenceStream {
    const copy = new ReferenceStream();
    copy.running = this.running;
    copy.message = [...this.message];
    copy.needed = this.needed;
    copy.sysex = this.sysex ? [...this.sysex] : undefined;
    return copy;
  }

  /** The whole messages these bytes complete, in order. */
  feed(bytes: ArrayLike<number>): number[][] {
    const out: number[][] = [];
    for (let i = 0; i < bytes.length; i++) this.byte(bytes[i]!, out);
    return out;
  }

  /** The stream was cut (the port went away): a message in progress is lost. */
  cut(): void {
    this.running = 0;
    this.message = [];
    this.sysex = undefined;
  }

  private byte(b: number, out: number[][]): void {
    if (b >= 0xf8) {
      if (b !== 0xf9 && b !== 0xfd) out.push([b]);
      return;
    }
    if (b >= 0x80) {
      const wasSysex = this.sysex;
      this.sysex = undefined;
      this.message = [];
      if (b === 0xf7) {
        if (wasSysex) out.push([...wasSysex, 0xf7]);
        this.running = 0;
        return;
      }
      if (b === 0xf0) {
        this.running = 0;
        this.sysex = [0xf0];
        return;
      }
      if (b < 0xf0) {
        this.running = b;
        this.start(b);
        return;
      }
      this.running = 0;
      const length = b === 0xf2 ? 2 : b === 0xf1 || b === 0xf3 ? 1 : b === 0xf6 ? 0 : -1;
      if (length < 0) return; // F4, F5: undefined
      if (length === 0) out.push([b]);
      else {
        this.message = [b];
        this.needed = length;
      }
      return;
    }
    if (this.sysex) {
      this.sysex.push(b);
      return;
    }
    if (this.message.length === 0) {
      if (this.running === 0) return;
      this.start(this.running);
    }
    this.message.push(b);
    if (this.message.length === this.needed + 1) {
      out.push(this.message);
      this.message = [];
    }
  }

  private start(status: number): void {
    const kind = status & 0xf0;
    this.message = [status];
    this.needed = kind === 0xc0 || kind === 0xd0 ? 1 : 2;
  }
}

/** A note-on that starts a note (velocity above 0; MIDI 1.0: velocity 0 is a note-off). */
export const isNoteOn = (m: readonly number[]): boolean => (m[0]! & 0xf0) === 0x90 && m[0]! < 0xf0 && (m[2] ?? 0) > 0;
