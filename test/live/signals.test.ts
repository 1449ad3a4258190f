import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(import.meta.dirname, '../..');

/** Spawns a child holding a chord through the bridge, signals it once it is ready, and reads its report. */
function signalled(signal: NodeJS.Signals | 'crash'): Promise<{ exitCode: number | null; report: { code: number; active: number; after: number[][] }; readyHeld: number }> {
  return new Promise((resolve, reject) => {
    const env = signal === 'crash' ? { ...process.env, CRASH: '1' } : process.env;
    const child = spawn(process.execPath, [join(root, 'test/fixtures/signal-child.js')], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let readyHeld = -1;
    child.stdout.on('data', (chunk: Buffer) => {
      out += chunk.toString();
      const ready = /^ready (\d+)$/mu.exec(out);
      if (ready && readyHeld < 0) {
        readyHeld = Number(ready[1]);
        if (signal !== 'crash') child.kill(signal);
      }
    });
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`the child did not finish: ${out}`));
    }, 20_000);
    child.on('exit', (exitCode) => {
      clearTimeout(timer);
      const last = out.trim().split('\n').pop() ?? '{}';
      resolve({ exitCode, report: JSON.parse(last) as { code: number; active: number; after: number[][] }, readyHeld });
    });
  });
}

// The virtual ports live inside the child process, so its synth is what reports: the test checks
// that the panic sequence reached it after the signal and before the process exited.
describe('signals and crashes end the session with a panic first', () => {
  it.each([
    ['SIGINT', 130],
    ['SIGTERM', 143],
    ['SIGHUP', 129],
    ['crash', 70],
  ] as const)('%s: notes off, pedals up, All Notes Off and centred bends reach the synth; exit %i', async (signal, code) => {
    const { exitCode, report, readyHeld } = await signalled(signal);
    expect(readyHeld).toBe(4); // a chord was sounding when the signal came
    expect(exitCode).toBe(code);
    expect(report.active).toBe(0);
    const after = report.after;
    expect(after.filter((m) => (m[0]! & 0xf0) === 0x80)).toHaveLength(4); // a note-off for each held key
    expect(after.some((m) => (m[0]! & 0xf0) === 0xb0 && m[1] === 64 && m[2] === 0)).toBe(true);
    expect(after.some((m) => (m[0]! & 0xf0) === 0xb0 && m[1] === 123)).toBe(true);
    expect(after.some((m) => (m[0]! & 0xf0) === 0xe0 && m[1] === 0 && m[2] === 64)).toBe(true);
  });
});

/** Runs a command in a child process, sends `signal` (SIGINT unless told) once its output matches `ready`, and gives what it printed and its exit code. */
function interrupted(args: string[], ready: RegExp, signal: NodeJS.Signals = 'SIGINT'): Promise<{ exitCode: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, args, { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    let sent = false;
    child.stdout.on('data', (chunk: Buffer) => {
      stdout += chunk.toString();
      if (!sent && ready.test(stdout)) {
        sent = true;
        child.kill(signal);
      }
    });
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    const timer = setTimeout(() => {
      child.kill('SIGKILL');
      reject(new Error(`the child did not finish: ${stdout}${stderr}`));
    }, 20_000);
    child.on('exit', (exitCode) => {
      clearTimeout(timer);
      resolve({ exitCode, stdout, stderr });
    });
  });
}

// Exit codes for a signal: 128 + its number (SIGINT 2), as shells report a process a signal ended (common practice, no source).
describe('Ctrl-C ends play and the demo alike: every note released, then exit 130', () => {
  it('play started through the command line (main), not only through the session', async () => {
    const { exitCode, stdout } = await interrupted([join(root, 'test/fixtures/main-child.js')], /^ready 3$/mu);
    expect(stdout).toMatch(/^ready 3$/mu); // a chord was sounding when Ctrl-C came
    expect(JSON.parse(stdout.trim().split('\n').pop() ?? '{}')).toEqual({ code: 130, active: 0 });
    expect(exitCode).toBe(130);
  });

  it('diesis demo (what npm start runs)', async () => {
    // Interrupted in the flipped bar (A♭4 is printed there), while the piece plays on with --loop.
    const { exitCode, stdout } = await interrupted([join(root, 'bin/diesis.js'), 'demo', '--loop', '--no-page'], /A♭4\s+key\s+68/u);
    expect(stdout).toMatch(/PANIC \(SIGINT\)/u);
    expect(stdout).toMatch(/nothing is left sounding\.\n$/u); // the demo's own synth holds nothing at the end
    expect(exitCode).toBe(130);
  });
});

describe('ports --watch ends on a signal as play does', () => {
  it.each([
    ['SIGINT', 130],
    ['SIGTERM', 143],
  ] as const)('%s: exit %i, and the input is let go', async (signal, code) => {
    const { exitCode, stdout } = await interrupted([join(root, 'test/fixtures/watch-child.js')], /^ready$/mu, signal);
    expect(stdout).toMatch(/controller 64 \(sustain pedal\) on channel 1: 127\n/u); // it was watching when the signal came
    // heardAfterEnd: a message sent after main returned did not reach the watch.
    expect(JSON.parse(stdout.trim().split('\n').pop() ?? '{}')).toEqual({ code, heardAfterEnd: false });
    expect(exitCode).toBe(code);
  });
});

describe('npm start', () => {
  it('runs the demo on a machine without MIDI hardware and exits 0', async () => {
    const { stdout, stderr, exitCode } = await new Promise<{ stdout: string; stderr: string; exitCode: number | null }>((resolve) => {
      const child = spawn(process.execPath, [join(root, 'bin/diesis.js'), 'demo'], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
      let text = '';
      let errors = '';
      child.stdout.on('data', (c: Buffer) => (text += c.toString()));
      child.stderr.on('data', (c: Buffer) => (errors += c.toString()));
      child.on('exit', (exitCode) => resolve({ stdout: text, stderr: errors, exitCode }));
    });
    expect(stderr).toMatch(/^stage page: http:\/\/127\.0\.0\.1:\d+\/$/mu); // it serves the stage page and says where
    expect(exitCode).toBe(0);
    expect(stdout).toMatch(/A♭4\s+key\s+68/u); // the flipped bar
    expect(stdout).toMatch(/G♯4\s+key\s+68/u);
    expect(stdout).toMatch(/D♭3\s+key\s+49/u);
    expect(stdout).toMatch(/C♯5\s+key\s+73/u);
    expect(stdout).toMatch(/the synth sounded 26 notes, each within 0\.\d+ cent of its spelling's frequency; nothing is left sounding/u);
  }, 30_000);
});
