import wavefile from 'wavefile';
import { describe, expect, it } from 'vitest';
import { readWav, writeWav } from '../../src/audio/wav.js';

const { WaveFile } = wavefile;

describe('WAV files, checked against a registry WAV library (wavefile)', () => {
  const samples = Float32Array.from({ length: 1000 }, (_, n) => 0.8 * Math.sin(n / 7) * (n % 3 === 0 ? 1 : -0.5));

  it.each([16, 24] as const)('writes %i-bit PCM that wavefile reads back sample for sample', (bits) => {
    const bytes = writeWav({ sampleRate: 48_000, channels: [samples], loop: { start: 100, end: 900 }, rootKey: 62 }, bits);
    const wav = new WaveFile(bytes);
    expect(wav.fmt).toMatchObject({ audioFormat: 1, numChannels: 1, sampleRate: 48_000, bitsPerSample: bits });
    const full = bits === 16 ? 32767 : 8388607;
    const read = wav.getSamples(false, Float64Array) as unknown as Float64Array;
    expect(read.length).toBe(samples.length);
    read.forEach((v, i) => expect(v).toBe(Math.round(samples[i]! * full)));
    expect(wav.smpl).toMatchObject({ dwMIDIUnityNote: 62, dwNumSampleLoops: 1 });
  });

  it.each(['16', '24', '32f'] as const)('reads what wavefile writes (%s), stereo included', (depth) => {
    const wav = new WaveFile();
    const left = Array.from(samples, (v) => (depth === '32f' ? v : Math.round(v * (depth === '16' ? 32767 : 8388607))));
    wav.fromScratch(2, 44_100, depth, [left, left.map((v) => -v)]);
    const audio = readWav(wav.toBuffer(), 'test.wav');
    expect(audio.sampleRate).toBe(44_100);
    expect(audio.channels).toHaveLength(2);
    const scale = depth === '16' ? 32768 : depth === '24' ? 8388608 : 1;
    audio.channels[0]!.forEach((v, i) => expect(v).toBeCloseTo(left[i]! / scale, 6));
    audio.channels[1]!.forEach((v, i) => expect(v).toBeCloseTo(-left[i]! / scale, 6));
  });

  it('refuses what is not PCM audio, in one line naming the file', () => {
    const wav = new WaveFile();
    wav.fromScratch(1, 8000, '8m', [0, 1, 2, 3]); // μ-law
    expect(() => readWav(wav.toBuffer(), 'law.wav')).toThrow(/^law\.wav: not PCM audio/u);
    expect(() => readWav(new Uint8Array([1, 2, 3]), 'junk.wav')).toThrow(/^junk\.wav: not a WAV file/u);
  });
});

describe('a damaged smpl loop', () => {
  it('is refused in one line instead of playing silence or NaN', () => {
    // A loop that ends after the data: written with our writer, then read back.
    const bytes = writeWav({ sampleRate: 44_100, channels: [new Float32Array(100)], loop: { start: 10, end: 500 } }, 16);
    expect(() => readWav(bytes, 'loop.wav')).toThrow(/^loop\.wav: its smpl loop \(frames 10 to 499\) does not lie within its 100 frames$/u);
  });
});
