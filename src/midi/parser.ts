import { channelDataLength, EOX, isRealTime, SYSEX, systemCommonDataLength } from './bytes.js';

/** Longest system-exclusive message accepted; a longer one is dropped as malformed. */
export const MAX_SYSEX_BYTES = 65_536;

/**
 * Turns any byte stream into whole, well-formed MIDI messages (MIDI 1.0): running status for
 * channel messages, real-time bytes anywhere (even inside other messages), system exclusive up
 * to F7. Data bytes without a status, truncated messages and unterminated sysex are dropped and
 * counted; nothing ever throws.
 */
export class MidiStreamParser {
  /** Longest system-exclusive message this parser accepts (F0 and F7 included). */
  readonly maxSysexBytes: number;
  private status = 0;
  private needed = 0;
  private buffer: number[] = [];
  private sysex: number[] | undefined;
  /** Bytes dropped because they did not form a whole, valid message. */
  dropped = 0;
  /** System-exclusive messages dropped: cut by a status byte, too long, or abandoned (`dropSysex`). */
  droppedSysex = 0;

  constructor(options: { readonly maxSysexBytes?: number } = {}) {
    this.maxSysexBytes = options.maxSysexBytes ?? MAX_SYSEX_BYTES;
  }

  /** Bytes of the system-exclusive message being received (F0 included), 0 when none is. */
  get pendingSysexBytes(): number {
    return this.sysex?.length ?? 0;
  }

  /** Gives up the system-exclusive message being received (it took too long); its bytes count as dropped. */
  dropSysex(): void {
    if (!this.sysex) return;
    this.dropped += this.sysex.length;
    this.droppedSysex++;
    this.sysex = undefined;
  }

  /** Feeds bytes; `onMessage` receives each complete message (a fresh array). */
  feed(bytes: ArrayLike<number>, onMessage: (message: number[]) => void): void {
    for (let i = 0; i < bytes.length; i++) {
      const raw = bytes[i] ?? 0;
      const byte = Number.isInteger(raw) && raw >= 0 && raw <= 255 ? raw : -1;
      if (byte < 0) {
        this.dropped++;
        continue;
      }
      if (byte >= 0x80) this.statusByte(byte, onMessage);
      else this.dataByte(byte, onMessage);
    }
  }

  private statusByte(byte: number, onMessage: (message: number[]) => void): void {
    if (isRealTime(byte)) {
      if (byte === 0xf9 || byte === 0xfd) this.dropped++; // undefined real-time bytes
      else onMessage([byte]);
      return;
    }
    if (this.sysex) {
      if (byte === EOX) {
        this.sysex.push(EOX);
        onMessage(this.sysex);
        this.sysex = undefined;
        return;
      }
      this.dropSysex(); // a status byte before F7: the sysex is incomplete
    }
    this.dropped += this.buffer.length; // a message cut short by a new status
    this.buffer = [];
    if (byte === SYSEX) {
      this.status = 0;
      this.sysex = [SYSEX];
      return;
    }
    if (byte < 0xf0) {
      this.status = byte;
      this.needed = channelDataLength(byte);
      this.buffer = [byte];
      return;
    }
    this.status = 0; // system common cancels running status
    const length = systemCommonDataLength(byte);
    if (length === undefined) {
      this.dropped++; // F4, F5, or a stray F7
      return;
    }
    if (length === 0) onMessage([byte]);
    else {
      this.needed = length;
      this.buffer = [byte];
    }
  }

  private dataByte(byte: number, onMessage: (message: number[]) => void): void {
    if (this.sysex) {
      if (this.sysex.length >= this.maxSysexBytes - 1) {
        this.dropped++; // this byte, then the rest
        this.dropSysex();
        return;
      }
      this.sysex.push(byte);
      return;
    }
    if (this.buffer.length === 0) {
      if (this.status === 0) {
        this.dropped++;
        return;
      }
      this.buffer = [this.status]; // running status
      this.needed = channelDataLength(this.status);
    }
    this.buffer.push(byte);
    if (this.buffer.length === this.needed + 1) {
      const message = this.buffer;
      this.buffer = [];
      onMessage(message);
    }
  }

  /** Forgets any partial message (a port closed mid-message). */
  reset(): void {
    this.dropped += this.buffer.length;
    this.buffer = [];
    this.dropSysex();
    this.status = 0;
  }
}
