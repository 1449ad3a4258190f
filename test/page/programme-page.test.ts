import { afterAll, describe, expect, it } from 'vitest';
import WebSocket from 'ws';
import { disableMidi } from '../../src/io/midi-system.js';
import { virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { Concert, pieceSpeller } from '../../src/live/concert.js';
import { startSession } from '../../src/live/session.js';
import type { StageState } from '../../src/page/stage-state.js';
import { loadProgrammeFile } from '../../src/presets/programme-file.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { SynthModel, type ModelVoice } from '../../src/synth/reference-synth.js';
import { A440 } from '../../src/tuning/index.js';
import { join } from 'node:path';

const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
const quietIo = { stdout: { write: () => undefined }, stderr: { write: () => undefined } };
const cents = (a: number, b: number): number => 1200 * Math.log2(a / b);
// From the tunings' definitions: quarter-comma meantone E4 = A4 · 2.5 / 5^(3/4); Pythagorean E4 = A4 · 3/4.
const meantoneE4 = (a4: number): number => (a4 * 2.5) / 5 ** 0.75;
const pythagoreanE4 = (a4: number): number => a4 * 0.75;

async function until(check: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!check()) {
    if (Date.now() > end) throw new Error('timed out');
    await wait(10);
  }
}

afterAll(async () => {
  await disableMidi();
});

describe('the stage page steps through a concert programme', () => {
  it('next piece on the page: the synth sounds new notes in the new tuning, held notes in theirs; the page shows the piece; the ends refuse', async () => {
    const programme = loadProgrammeFile(join(import.meta.dirname, '../../presets/programmes/evening.json'));
    const keyboard = virtualInput('page programme keyboard');
    const synth = new SynthModel(440, 400);
    const started = new Map<number, ModelVoice>();
    const port = virtualOutput('page programme synth', (bytes) => {
      const v = synth.receive(performance.now(), bytes);
      if (v) started.set(bytes[1]!, v);
    });
    const first = programme.pieces[0]!;
    const speller = new ControlledSpeller(pieceSpeller(first), [], first.key);
    const session = await startSession(
      {
        inputs: [keyboard.name],
        output: port.name,
        engine: { tuning: first.tuning.tuning, reference: A440, controls: new ControlMap(programme.base.bindings, speller), pieces: new Concert(programme) },
        speller,
        strategy: 'key',
        title: 'test',
        quiet: true,
        virtualOnly: true,
        wait: true,
        startPiece: 0,
        page: { port: 0, pieceTitle: 'test', tuningId: first.tuning.id, tuningName: first.tuning.name },
      },
      quietIo,
    );
    const server = session.page!.server;
    const ws = new WebSocket(`ws://127.0.0.1:${server.port}/live`, { origin: `http://127.0.0.1:${server.port}` });
    const messages: Array<{ type: string; id?: number; result?: unknown; state?: StageState }> = [];
    ws.on('message', (data) => messages.push(JSON.parse(String(data)) as { type: string }));
    await new Promise((resolve) => ws.on('open', resolve));
    const lastState = (): StageState | undefined => messages.filter((m) => m.type === 'state').pop()?.state;
    const control = async (id: number, step: 1 | -1): Promise<unknown> => {
      ws.send(JSON.stringify({ id, control: { kind: 'piece', step } }));
      await until(() => messages.some((m) => m.type === 'result' && m.id === id));
      return messages.find((m) => m.type === 'result' && m.id === id)!.result;
    };
    try {
      await until(() => lastState()?.piece.title === 'Prelude on a ground in D minor');
      expect(lastState()!.piece).toEqual({ title: 'Prelude on a ground in D minor', index: 0, count: 3, canPrevious: false, canNext: true });
      expect(await control(1, -1)).toEqual({ ok: false, reason: 'this is the first piece of the programme' });
      // E4 held in piece 1 (meantone, A4 = 415).
      keyboard.send([0x90, 64, 90]);
      await until(() => synth.active().length === 1);
      const held = synth.active()[0]!;
      expect(Math.abs(cents(synth.frequency(held), meantoneE4(415)))).toBeLessThan(0.3);
      expect(await control(2, 1)).toEqual({ ok: true });
      await until(() => lastState()?.piece.index === 1);
      expect(lastState()!.tuning.id).toBe('pythagorean');
      expect(lastState()!.reference).toBe('A4 = 415 Hz');
      expect(lastState()!.piece).toMatchObject({ canPrevious: true, canNext: true });
      // A new E5 in piece 2's tuning; the held E4 has not moved.
      keyboard.send([0x90, 76, 90]);
      await until(() => synth.active().length === 2);
      const fresh = synth.active().find((v) => v !== held)!;
      expect(Math.abs(cents(synth.frequency(fresh), 2 * pythagoreanE4(415)))).toBeLessThan(0.3);
      expect(Math.abs(cents(synth.frequency(held), meantoneE4(415)))).toBeLessThan(0.3);
      expect(await control(3, 1)).toEqual({ ok: true });
      expect(await control(4, 1)).toEqual({ ok: false, reason: 'this is the last piece of the programme' });
      await until(() => lastState()?.piece.index === 2);
      expect(lastState()!.tuning.id).toBe('werckmeister-3');
      keyboard.send([0x80, 64, 0]);
      keyboard.send([0x80, 76, 0]);
      await until(() => synth.active().length === 0);
    } finally {
      ws.close();
      session.stop('test over');
      await wait(50);
    }
    expect(synth.active()).toHaveLength(0);
  });
});
