import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { disableMidi } from '../../src/io/midi-system.js';
import { launchChromium } from '../support/browser.js';
import { virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { Concert, pieceSpeller } from '../../src/live/concert.js';
import { startSession } from '../../src/live/session.js';
import { loadProgrammeFile } from '../../src/presets/programme-file.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { SynthModel } from '../../src/synth/reference-synth.js';
import { A440 } from '../../src/tuning/index.js';
import { packageRoot } from '../../src/util/package-root.js';

const ARTIFACTS = join(packageRoot(), 'test-artifacts');
const quietIo = { stdout: { write: () => undefined }, stderr: { write: () => undefined } };
const cents = (a: number, b: number): number => 1200 * Math.log2(a / b);

let browser: Browser;
beforeAll(async () => {
  browser = await launchChromium();
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await disableMidi();
});

describe('a concert programme on the stage page in a real browser (headless chromium)', () => {
  it('next piece on the page changes the piece shown and the tuning the synth sounds; a held note keeps its own', async () => {
    const programme = loadProgrammeFile(join(packageRoot(), 'presets/programmes/evening.json'));
    const keyboard = virtualInput('browser programme keyboard');
    const synth = new SynthModel(440, 400);
    virtualOutput('browser programme synth', (bytes) => void synth.receive(performance.now(), bytes));
    const first = programme.pieces[0]!;
    const speller = new ControlledSpeller(pieceSpeller(first), [], first.key);
    const session = await startSession(
      {
        inputs: [keyboard.name],
        output: 'browser programme synth',
        engine: { tuning: first.tuning.tuning, reference: A440, controls: new ControlMap(programme.base.bindings, speller), pieces: new Concert(programme) },
        speller,
        strategy: 'key',
        title: 'programme test',
        quiet: true,
        virtualOnly: true,
        wait: true,
        startPiece: 0,
        page: { port: 0, pieceTitle: 'programme test', tuningId: first.tuning.id, tuningName: first.tuning.name },
      },
      quietIo,
    );
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    const problems: string[] = [];
    page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    try {
      await page.goto(session.page!.server.url);
      await page.waitForSelector('#link[data-state="open"]');
      await page.waitForSelector('#piece-title:text("Prelude on a ground in D minor")');
      expect(await page.textContent('#piece-count')).toBe('1 / 3');
      expect(await page.isDisabled('#previous')).toBe(true);
      // E4 held from piece 1: quarter-comma meantone at A4 = 415 (E4 = A4 · 2.5 / 5^(3/4), from the tuning's definition).
      keyboard.send([0x90, 64, 90]);
      await page.waitForSelector('.note[data-spelling="E4"]');
      const held = synth.active()[0]!;
      await page.click('#next');
      await page.waitForSelector('#piece-title:text("Pastorale with drones")');
      expect(await page.textContent('#piece-count')).toBe('2 / 3');
      expect(await page.textContent('#tuning-name')).toBe(programme.pieces[1]!.tuning.name);
      expect(await page.isDisabled('#previous')).toBe(false);
      // A new E5 in Pythagorean tuning at A4 = 415 (E4 = A4 · 3/4, a pure fourth below A); the held E4 unmoved.
      keyboard.send([0x90, 76, 90]);
      await page.waitForSelector('.note[data-spelling="E5"]');
      const fresh = synth.active().find((v) => v !== held)!;
      expect(Math.abs(cents(synth.frequency(fresh), 2 * 415 * 0.75))).toBeLessThan(0.3);
      expect(Math.abs(cents(synth.frequency(held), (415 * 2.5) / 5 ** 0.75))).toBeLessThan(0.3);
      await page.click('#next');
      await page.waitForSelector('#piece-title:text("Rondo through the keys")');
      expect(await page.isDisabled('#next')).toBe(true);
      await page.waitForSelector('#strategy:text("follow")'); // the piece's own strategy
      mkdirSync(ARTIFACTS, { recursive: true });
      await page.screenshot({ path: join(ARTIFACTS, 'stage-page-programme.png'), fullPage: true });
      keyboard.send([0x80, 64, 0]);
      keyboard.send([0x80, 76, 0]);
      expect(problems).toEqual([]);
    } finally {
      await page.close();
      session.stop('test over');
    }
  }, 60_000);
});
