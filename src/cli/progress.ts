import type { Output } from '../util/io.js';

/** A progress bar on a terminal (nothing elsewhere): `update(share)` with 0…1, `done()` clears it. */
export function progressBar(stream: Output, label: string): { update(share: number): void; done(): void } {
  if (!stream.isTTY) return { update: () => undefined, done: () => undefined };
  let last = -1;
  return {
    update(share) {
      const percent = Math.floor(share * 100);
      if (percent === last) return;
      last = percent;
      const width = 30;
      const filled = Math.round((percent / 100) * width);
      stream.write(`\r${label} [${'#'.repeat(filled)}${'-'.repeat(width - filled)}] ${String(percent).padStart(3)}%`);
    },
    done() {
      stream.write('\r\u001b[2K');
    },
  };
}
