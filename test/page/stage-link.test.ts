import { networkInterfaces } from 'node:os';
import jsqrModule from 'jsqr';
import { describe, expect, it } from 'vitest';
import { runCli } from '../cli/run-cli.js';
import { openStagePage, qrText } from '../../src/page/stage-link.js';

/** jsQR ships as CommonJS with a declared default export: take the function either way it arrives. */
const jsQR = ((jsqrModule as unknown as { default?: unknown }).default ?? jsqrModule) as typeof jsqrModule.default;

const lanAddress = Object.values(networkInterfaces())
  .flat()
  .find((a) => a && a.family === 'IPv4' && !a.internal)?.address;

/**
 * Reads a QR code printed with half-block characters back into an image and decodes it with an
 * independent reader (jsQR): a glyph's painted half is light, its empty half dark.
 */
function decodeTerminalQr(text: string): string | undefined {
  const rows: boolean[][] = [];
  for (const line of text.split('\n').filter((l) => l.length > 0)) {
    const top: boolean[] = [];
    const bottom: boolean[] = [];
    for (const ch of line) {
      top.push(ch === '█' || ch === '▀');
      bottom.push(ch === '█' || ch === '▄');
    }
    rows.push(top, bottom);
  }
  const scale = 6;
  const margin = 4;
  const modules = Math.max(...rows.map((r) => r.length));
  const width = (modules + 2 * margin) * scale;
  const height = (rows.length + 2 * margin) * scale;
  const pixels = new Uint8ClampedArray(width * height * 4).fill(255);
  rows.forEach((row, y) =>
    row.forEach((light, x) => {
      if (light) return;
      for (let dy = 0; dy < scale; dy++) {
        for (let dx = 0; dx < scale; dx++) {
          const i = (((y + margin) * scale + dy) * width + (x + margin) * scale + dx) * 4;
          pixels[i] = pixels[i + 1] = pixels[i + 2] = 0;
        }
      }
    }),
  );
  return jsQR(pixels, width, height, { inversionAttempts: 'attemptBoth' })?.data;
}

describe('the stage page’s address in the terminal', () => {
  it('is a QR code that a camera reads as the address with its token', () => {
    const url = 'http://192.0.2.2:8421/?token=abcdefghijklmnopqrstuvwx';
    expect(decodeTerminalQr(qrText(url))).toBe(url);
  });

  it('on this computer: the address alone, no token, no QR code', async () => {
    const link = await openStagePage({ port: 0, pieceTitle: 'p', tuningId: 'meantone-1-4', tuningName: 'm' });
    try {
      expect(link.banner).toBe(`stage page: http://127.0.0.1:${link.server.port}/`);
    } finally {
      await link.stop();
    }
  });

  it('opened to the network: the address with a fresh token, and its QR code', async () => {
    expect(lanAddress).toBeDefined();
    const link = await openStagePage({ port: 0, host: lanAddress, pieceTitle: 'p', tuningId: 'meantone-1-4', tuningName: 'm' });
    const again = await openStagePage({ port: 0, host: lanAddress, pieceTitle: 'p', tuningId: 'meantone-1-4', tuningName: 'm' });
    try {
      const [first, ...qr] = link.banner.split('\n');
      const url = `http://${lanAddress}:${link.server.port}/?token=${link.server.token}`;
      expect(first).toBe(`stage page: ${url}  (open to the network: the address carries its token)`);
      expect(decodeTerminalQr(qr.join('\n'))).toBe(url);
      expect(again.server.token).not.toBe(link.server.token);
    } finally {
      await link.stop();
      await again.stop();
    }
  });

  it('demo refuses --loop with --once (exit 2)', async () => {
    expect(await runCli('demo', '--loop', '--once')).toMatchObject({ code: 2, stderr: 'diesis: demo: --loop and --once cannot both be given\n' });
  });

  it('play refuses a bad --page port in one line (exit 2)', async () => {
    const result = await runCli('play', '--in', 'x', '--out', 'y', '--page', 'eighty');
    expect(result.code).toBe(2);
    expect(result.stderr).toBe('diesis: --page "eighty" must be a whole number from 0 to 65535\n');
  });
});
