import type { CommandIo } from '../util/io.js';
import { startSession, type Session, type SessionOptions } from './session.js';

/** Exit codes: 0 quit, 130 SIGINT (Ctrl-C), 143 SIGTERM, 129 SIGHUP (terminal closed), 70 an internal error. */
export const EXIT_CODES = { quit: 0, SIGINT: 130, SIGTERM: 143, SIGHUP: 129, error: 70 } as const;


/**
 * Runs a session until the player quits, a signal arrives, an error escapes or `stopAfter`
 * passes; every one of these ends with the panic sequence sent before the process exits.
 */
export async function runUntilStopped(options: SessionOptions, io: CommandIo, stopAfterSeconds?: number): Promise<number> {
  const session: Session = await startSession(options, io);
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
    if (stopAfterSeconds !== undefined) {
      const timer = setTimeout(() => finish('the end', EXIT_CODES.quit), stopAfterSeconds * 1000);
      cleanups.push(() => clearTimeout(timer));
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

