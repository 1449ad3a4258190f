import type { CommandIo } from '../util/io.js';
import { startSession, StoppedWhileWaiting, type Session, type SessionOptions } from './session.js';

/** Exit codes: 0 quit, 130 SIGINT (Ctrl-C), 143 SIGTERM, 129 SIGHUP (terminal closed), 70 an internal error. */
export const EXIT_CODES = { quit: 0, SIGINT: 130, SIGTERM: 143, SIGHUP: 129, error: 70 } as const;


/**
 * Runs a session until the player quits, a signal arrives, an error escapes or `stopAfter`
 * passes; every one of these ends with the panic sequence sent before the process exits.
 */
export async function runUntilStopped(options: SessionOptions, io: CommandIo, stopAfterSeconds?: number): Promise<number> {
  // The stop timer starts now, so the time spent waiting for a port (--wait) counts too.
  const stopAfter = new AbortController();
  const timer = stopAfterSeconds === undefined ? undefined : setTimeout(() => stopAfter.abort(), stopAfterSeconds * 1000);
  let session: Session;
  try {
    session = await startSession({ ...options, stopWaiting: stopAfter.signal }, io);
  } catch (error) {
    clearTimeout(timer);
    if (!(error instanceof StoppedWhileWaiting)) throw error;
    io.stderr.write(`diesis: --stop-after ${stopAfterSeconds ?? ''}: stopped while still waiting for the ports\n`);
    return EXIT_CODES.quit;
  }
  return new Promise<number>((resolve) => {
    const cleanups: Array<() => void> = [];
    const finish = (reason: string, code: number): void => {
      session.stop(reason);
      for (const c of cleanups) c();
      resolve(code);
    };
    const on = (event: NodeJS.Signals, code: number): void => {
      const handler = (): void => finish(event, code);
      process.once(event, handler);
      cleanups.push(() => process.removeListener(event, handler));
    };
    on('SIGINT', EXIT_CODES.SIGINT);
    on('SIGTERM', EXIT_CODES.SIGTERM);
    on('SIGHUP', EXIT_CODES.SIGHUP);
    const crash = (error: unknown): void => {
      io.stderr.write(`diesis: internal error: ${error instanceof Error ? error.message : String(error)}\n`);
      finish('internal error', EXIT_CODES.error);
    };
    process.once('uncaughtException', crash);
    process.once('unhandledRejection', crash);
    cleanups.push(() => {
      process.removeListener('uncaughtException', crash);
      process.removeListener('unhandledRejection', crash);
    });
    if (timer !== undefined) {
      const end = (): void => finish('the end', EXIT_CODES.quit);
      if (stopAfter.signal.aborted) queueMicrotask(end);
      else stopAfter.signal.addEventListener('abort', end, { once: true });
      cleanups.push(() => {
        clearTimeout(timer);
        stopAfter.signal.removeEventListener('abort', end);
      });
    }
    const stdin = process.stdin;
    if (stdin.isTTY && !options.quiet) {
      stdin.setRawMode(true);
      stdin.resume();
      const key = (data: Buffer): void => {
        const text = data.toString();
        if (text === '\u0003') finish('SIGINT', EXIT_CODES.SIGINT); // Ctrl-C while the terminal is raw
        else if (text === 'q') finish('quit', EXIT_CODES.quit);
        else if (text === 'p' || text === ' ') session.panic();
      };
      stdin.on('data', key);
      cleanups.push(() => {
        stdin.removeListener('data', key);
        stdin.setRawMode(false);
        stdin.pause();
      });
    }
  });
}

