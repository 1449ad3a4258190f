import { UserError } from '../util/errors.js';

/** Mono or multi-channel audio as floats in −1…1, one array per channel. */
export interface Audio {
  readonly sampleRate: number;
  readonly channels: readonly Float32Array[];
  /** Sustain loop (sample frames, end exclusive), from a `smpl` chunk. */
  readonly loop?: { readonly start: number; readonly end: number } | undefined;
  /** The root key a `smpl` chunk names (MIDI unity note), if any. */
  readonly rootKey?: number | undefined;
}

export type BitDepth = 16 | 24;

/** Reads a RIFF/WAVE file: PCM 8/16/24/32-bit or 32-bit float, any channel count; the `smpl` loop and root key if present. */
export function readWav(bytes: Uint8Array, file: string): Audio {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const text = (at: number) => String.fromCharCode(...bytes.subarray(at, at + 4));
  if (bytes.length < 12 || text(0) !== 'RIFF' || text(8) !== 'WAVE') throw new UserError(`${file}: not a WAV file (no RIFF/WAVE header)`);
  let format: { code: number; channels: number; rate: number; bits: number } | undefined;
  let data: { at: number; size: number } | undefined;
  let loop: Audio['loop'];
  let rootKey: number | undefined;
  for (let at = 12; at + 8 <= bytes.length; ) {
    const id = text(at);
    const size = view.getUint32(at + 4, true);
    const body = at + 8;
    if (body + size > bytes.length && id !== 'data') throw new UserError(`${file}: the "${id}" chunk is cut short`);
    if (id === 'fmt ') {
      let code = view.getUint16(body, true);
      if (code === 0xfffe && size >= 40) code = view.getUint16(body + 24, true); // WAVE_FORMAT_EXTENSIBLE: the subformat
      format = { code, channels: view.getUint16(body + 2, true), rate: view.getUint32(body + 4, true), bits: view.getUint16(body + 14, true) };
    } else if (id === 'data') data = { at: body, size: Math.min(size, bytes.length - body) };
    else if (id === 'smpl' && size >= 36) {
      rootKey = view.getUint32(body + 12, true);
      if (view.getUint32(body + 28, true) > 0 && size >= 60) loop = { start: view.getUint32(body + 44, true), end: view.getUint32(body + 48, true) + 1 };
    }
    at = body + size + (size % 2);
  }
  if (!format) throw new UserError(`${file}: no "fmt " chunk`);
  if (!data) throw new UserError(`${file}: no "data" chunk`);
  const { code, channels, rate, bits } = format;
  const pcm = code === 1 && [8, 16, 24, 32].includes(bits);
  const float = code === 3 && bits === 32;
  if (!pcm && !float) throw new UserError(`${file}: not PCM audio (format ${code}, ${bits} bits); save it as 16- or 24-bit PCM WAV`);
  if (channels < 1 || rate < 1) throw new UserError(`${file}: ${channels} channels at ${rate} Hz is not usable audio`);
  const frameBytes = (bits / 8) * channels;
  const frames = Math.floor(data.size / frameBytes);
  if (loop && (loop.end <= loop.start || loop.end > frames)) {
    throw new UserError(`${file}: its smpl loop (frames ${loop.start} to ${loop.end - 1}) does not lie within its ${frames} frames`);
  }
  const out = Array.from({ length: channels }, () => new Float32Array(frames));
  for (let f = 0; f < frames; f++) {
    for (let c = 0; c < channels; c++) {
      const p = data.at + f * frameBytes + c * (bits / 8);
      let v: number;
      if (float) v = view.getFloat32(p, true);
      else if (bits === 8) v = (view.getUint8(p) - 128) / 128;
      else if (bits === 16) v = view.getInt16(p, true) / 32768;
      else if (bits === 24) v = ((view.getUint8(p) | (view.getUint8(p + 1) << 8) | (view.getInt8(p + 2) << 16)) / 8388608);
      else v = view.getInt32(p, true) / 2147483648;
      out[c]![f] = v;
    }
  }
  return { sampleRate: rate, channels: out, loop, rootKey };
}

/** Writes integer PCM WAV (16 or 24 bits), with a `smpl` chunk when a loop or root key is given. Values are clipped to −1…1. */
export function writeWav(audio: Audio, bits: BitDepth): Uint8Array {
  const channels = audio.channels.length;
  const frames = audio.channels[0]?.length ?? 0;
  const bytesPer = bits / 8;
  const dataSize = frames * channels * bytesPer;
  const smpl = audio.loop !== undefined || audio.rootKey !== undefined;
  const smplSize = smpl ? 36 + (audio.loop ? 24 : 0) : 0;
  const total = 12 + 24 + 8 + dataSize + (dataSize % 2) + (smpl ? 8 + smplSize : 0);
  const bytes = new Uint8Array(total);
  const view = new DataView(bytes.buffer);
  const put = (at: number, s: string) => [...s].forEach((ch, i) => (bytes[at + i] = ch.charCodeAt(0)));
  put(0, 'RIFF');
  view.setUint32(4, total - 8, true);
  put(8, 'WAVE');
  put(12, 'fmt ');
  view.setUint32(16, 16, true);
  view.setUint16(20, 1, true);
  view.setUint16(22, channels, true);
  view.setUint32(24, audio.sampleRate, true);
  view.setUint32(28, audio.sampleRate * channels * bytesPer, true);
  view.setUint16(32, channels * bytesPer, true);
  view.setUint16(34, bits, true);
  put(36, 'data');
  view.setUint32(40, dataSize, true);
  let p = 44;
  const full = bits === 16 ? 32767 : 8388607;
  for (let f = 0; f < frames; f++) {
    for (let c = 0; c < channels; c++) {
      const v = Math.round(Math.max(-1, Math.min(1, audio.channels[c]![f]!)) * full);
      if (bits === 16) view.setInt16(p, v, true);
      else {
        view.setUint8(p, v & 0xff);
        view.setUint8(p + 1, (v >> 8) & 0xff);
        view.setInt8(p + 2, v >> 16);
      }
      p += bytesPer;
    }
  }
  p += dataSize % 2;
  if (smpl) {
    put(p, 'smpl');
    view.setUint32(p + 4, smplSize, true);
    const b = p + 8;
    view.setUint32(b + 8, Math.round(1e9 / audio.sampleRate), true); // sample period in ns
    view.setUint32(b + 12, audio.rootKey ?? 60, true);
    if (audio.loop) {
      view.setUint32(b + 28, 1, true);
      view.setUint32(b + 44, audio.loop.start, true);
      view.setUint32(b + 48, Math.max(audio.loop.start, audio.loop.end - 1), true);
    }
  }
  return bytes;
}
