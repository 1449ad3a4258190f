import { describe, expect, it } from 'vitest';
import { renderPreview } from '../../src/audio/preview.js';

describe('the render --wav progress bar', () => {
  it('moves steadily with the audio rendered, not in one jump', () => {
    // Three notes of our own spread over 12 seconds: few messages, much audio between them.
    const messages = [
      { time: 0, data: [0x90, 60, 90] },
      { time: 4000, data: [0x80, 60, 0] },
      { time: 4000, data: [0x90, 64, 90] },
      { time: 8000, data: [0x80, 64, 0] },
      { time: 8000, data: [0x90, 67, 90] },
      { time: 12_000, data: [0x80, 67, 0] },
    ];
    const shares: number[] = [];
    const silent = renderPreview(messages, { sampleRate: 22_050, voice: 'organ' });
    const watched = renderPreview(messages, { sampleRate: 22_050, voice: 'organ', progress: (s) => shares.push(s) });
    expect(shares[0]).toBe(0);
    expect(shares[shares.length - 1]).toBe(1);
    for (let i = 1; i < shares.length; i++) {
      expect(shares[i]!).toBeGreaterThanOrEqual(shares[i - 1]!);
      expect(shares[i]! - shares[i - 1]!, `step ${i}`).toBeLessThanOrEqual(0.02); // never more than 2 % at once
    }
    expect(watched.channels[0]).toEqual(silent.channels[0]); // watching does not change a sample
  });
});
