import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { disableMidi } from '../../src/io/midi-system.js';
import { launchChromium } from '../support/browser.js';
import { virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { startSession, type Session } from '../../src/live/session.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { SynthModel } from '../../src/synth/reference-synth.js';
import { A440 } from '../../src/tuning/index.js';
import { packageRoot } from '../../src/util/package-root.js';

const ARTIFACTS = join(packageRoot(), 'test-artifacts');
const quietIo = { stdout: { write: () => undefined }, stderr: { write: () => undefined } };
const meantone = loadTuningPreset('meantone-1-4');

let browser: Browser;
beforeAll(async () => {
  browser = await launchChromium();
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await disableMidi();
});

/** A session between virtual ports with its stage page, and the page open in the browser. */
async function stageWithPage(): Promise<{ session: Session; page: Page; keyboard: ReturnType<typeof virtualInput>; synth: SynthModel; received: number[][]; problems: string[] }> {
  const keyboard = virtualInput('page test keyboard');
  const synth = new SynthModel(440, 400);
  const received: number[][] = [];
  virtualOutput('page test synth', (bytes) => {
    received.push(bytes);
    synth.receive(performance.now(), bytes);
  });
  const speller = new ControlledSpeller(createStrategy({ strategy: 'fixed' }));
  const session = await startSession(
    {
      inputs: [keyboard.name],
      output: 'page test synth',
      engine: { tuning: meantone.tuning, reference: A440 },
      speller,
      strategy: 'fixed',
      title: 'page test',
      quiet: true,
      virtualOnly: true,
      wait: true,
      page: { port: 0, pieceTitle: 'A test in E♭', tuningId: meantone.id, tuningName: meantone.name },
    },
    quietIo,
  );
  const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
  const problems: string[] = [];
  page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('requestfailed', (r) => problems.push(`request failed: ${r.url()}`));
  await page.goto(session.page!.server.url);
  await page.waitForSelector('#link[data-state="open"]');
  return { session, page, keyboard, synth, received, problems };
}

const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
async function until(condition: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!condition()) {
    if (Date.now() > end) throw new Error('timed out waiting');
    await wait(10);
  }
}

describe('the stage page in a real browser (headless chromium)', () => {
  it('shows what is played, steers the engine, panics the synth, and comes back after a restart', async () => {
    const { session, page, keyboard, synth, received, problems } = await stageWithPage();
    // Every request the page made went to its own server: nothing from anywhere else.
    const origin = new URL(session.page!.server.url).origin;
    const foreign: string[] = [];
    page.on('request', (r) => !r.url().startsWith(origin) && !r.url().startsWith('data:') && foreign.push(r.url()));
    expect(await page.textContent('#piece-title')).toBe('A test in E♭');
    expect(await page.textContent('#tuning-name')).toBe('1/4-comma meantone');
    expect(await page.textContent('#reference')).toBe('A4 = 440 Hz');

    // Play a chord: its spellings appear with their cents (fixed window E♭..G♯: key 68 is G♯, 63 is E♭).
    for (const key of [60, 63, 68]) keyboard.send([0x90, key, 90]);
    await page.waitForSelector('.note[data-spelling="G♯4"]');
    expect(await page.locator('.note .name').allTextContents()).toEqual(['C4', 'E♭4', 'G♯4']);
    // G♯4 at A4 = 440 in quarter-comma meantone: five fifths of 1200·log2(5)/4 cents above A, less 12-ET's 500.
    const gSharp = 5 * ((1200 * Math.log2(5)) / 4 - 700);
    expect(await page.textContent('.note[data-spelling="G♯4"] .cents')).toBe(`\u2212${Math.abs(gSharp).toFixed(1)} ¢`);
    expect(await page.textContent('#key-8 .spelling')).toBe('G♯');
    expect(await page.getAttribute('#key-8', 'class')).toContain('lit');

    // The sustain pedal holds them after the keys are up: the page says so.
    keyboard.send([0xb0, 64, 127]);
    for (const key of [60, 63, 68]) keyboard.send([0x80, key, 0]);
    await page.waitForSelector('.note.held[data-spelling="G♯4"]');
    expect(await page.getAttribute('#lamp-sustain', 'class')).toContain('on');
    expect(await page.locator('#picture').evaluate((img) => { const i = img as unknown as { complete: boolean; naturalWidth: number }; return i.complete && i.naturalWidth > 1000; })).toBe(true);
    mkdirSync(ARTIFACTS, { recursive: true });
    await page.screenshot({ path: join(ARTIFACTS, 'stage-page.png'), fullPage: true });

    // Flip from the page: key 68 now gives A♭ there and in the engine.
    await page.click('#flip');
    await page.waitForSelector('#flip[aria-pressed="true"]');
    expect(await page.textContent('#key-8 .spelling')).toBe('A♭');
    keyboard.send([0x90, 68, 90]);
    await page.waitForSelector('.note[data-spelling="A♭4"]');
    await page.click('#flip');
    await page.waitForSelector('#flip[aria-pressed="false"]');

    // 12-ET comparison and set key, from the page.
    await page.click('#compare');
    await page.waitForSelector('#passing', { state: 'visible' });
    expect(await page.textContent('#key-8 .cents')).toBe('0.0');
    await page.click('#compare');
    await page.waitForSelector('#passing', { state: 'hidden' });
    await page.selectOption('#tonic', 'Db');
    await page.selectOption('#mode', 'major');
    await page.click('#set-key');
    await page.waitForSelector('#key-1 .spelling:text("D♭")');
    expect(await page.textContent('#key')).toBe('D♭ major');
    expect(await page.textContent('#window')).toBe('F♭..A'); // D♭ major's window: from its lowered third (F♭) to its raised fifth (A)

    // Panic on the page: All Notes Off and centred bends reach the synth (MIDI 1.0), nothing sounds.
    const before = received.length;
    expect(synth.active().length).toBeGreaterThan(0);
    await page.click('#panic');
    await until(() => received.slice(before).some((m) => (m[0]! & 0xf0) === 0xb0 && m[1] === 123));
    expect(received.slice(before).some((m) => (m[0]! & 0xf0) === 0xe0 && m[1] === 0 && m[2] === 64)).toBe(true);
    expect(synth.active()).toEqual([]);
    await page.waitForSelector('#sounding-count:text("(0)")');
    expect(await page.textContent('#warnings li')).toContain('PANIC');

    // The server restarts on the same port: the page reconnects by itself and shows new notes.
    const server = session.page!.server;
    const port = server.port;
    await server.stop();
    await page.waitForSelector('#link[data-state="closed"]');
    await server.start({ port });
    await page.waitForSelector('#link[data-state="open"]', { timeout: 10_000 });
    keyboard.send([0xb0, 64, 0]);
    keyboard.send([0x90, 70, 90]);
    await page.waitForSelector('.note[data-spelling="B♭4"]');
    keyboard.send([0x80, 70, 0]);

    expect(foreign).toEqual([]);
    expect(problems).toEqual([]);
    await page.close();
    session.stop('test over');
  }, 60_000);
});
