import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { main } from '../src/cli/main.js';
import { writeMidiFile } from '../src/render/smf.js';
import { heading } from './timing.js';

/**
 * A piece of our own with `notes` notes: a chromatic walk in two voices, each note 200 ticks long
 * and 240 ticks apart (every delta needs two bytes), with a sustain pedal every bar.
 */
export function syntheticPiece(notes: number): Uint8Array {
  const events: Array<{ tick: number; data: number[] }> = [];
  for (let i = 0; i < notes; i++) {
    const tick = Math.floor(i / 2) * 240;
    const key = 48 + ((i * 7 + (i % 2) * 16) % 36);
    events.push({ tick, data: [0x90, key, 80] }, { tick: tick + 200, data: [0x80, key, 0] });
    if (i % 16 === 0) events.push({ tick, data: [0xb0, 64, i % 32 === 0 ? 127 : 0] });
  }
  events.sort((a, b) => a.tick - b.tick);
  return writeMidiFile({ ticksPerBeat: 480 }, [], [events]);
}

/** `diesis render` time for growing files: it must grow linearly with the number of notes. */
export async function benchRender(sizes: readonly number[] = [5_000, 10_000, 20_000, 40_000]): Promise<void> {
  heading('render: diesis render IN.mid -o OUT.mid (quarter-comma meantone, bend, MPE), whole command');
  const dir = mkdtempSync(join(tmpdir(), 'diesis-bench-render-'));
  const quiet = { write: () => undefined };
  const perNote: number[] = [];
  const totals: number[] = [];
  try {
    const warm = join(dir, 'warm.mid');
    writeFileSync(warm, syntheticPiece(2_000));
    await main(['node', 'diesis', 'render', warm, '-o', join(dir, 'warm-out.mid')], { stdout: quiet, stderr: quiet }); // warm-up, not counted
    for (const notes of sizes) {
      const input = join(dir, `in-${notes}.mid`);
      writeFileSync(input, syntheticPiece(notes));
      const t0 = performance.now();
      const code = await main(['node', 'diesis', 'render', input, '-o', join(dir, `out-${notes}.mid`)], { stdout: quiet, stderr: quiet });
      const ms = performance.now() - t0;
      perNote.push(ms / notes);
      totals.push(ms);
      process.stdout.write(`${String(notes).padStart(6)} notes  ${(ms / 1000).toFixed(2).padStart(6)} s  ${((ms / notes) * 1000).toFixed(1).padStart(6)} µs per note${code === 0 ? '' : `  (exit ${code})`}\n`);
    }
    const ratio = (perNote[perNote.length - 1] ?? NaN) / (perNote[0] ?? NaN);
    const added = ((totals[totals.length - 1] ?? NaN) - (totals[0] ?? NaN)) / ((sizes[sizes.length - 1] ?? NaN) - (sizes[0] ?? NaN));
    process.stdout.write(`time per note, longest file over shortest: ${ratio.toFixed(2)} (1.00 = linear; below 1 the fixed start-up cost dominates)\n`);
    process.stdout.write(`each added note costs ${(added * 1000).toFixed(1)} µs (from the shortest to the longest file)\n`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
