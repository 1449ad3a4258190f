import { performance } from 'node:perf_hooks';

/** Runs `fn` repeatedly for about `ms` milliseconds; returns operations per second and µs per operation. */
export function measure(fn: () => void, ms = 500): { perSecond: number; microseconds: number } {
  for (let i = 0; i < 100; i++) fn(); // warm up
  let count = 0;
  const start = performance.now();
  let now = start;
  while (now - start < ms) {
    for (let i = 0; i < 100; i++) fn();
    count += 100;
    now = performance.now();
  }
  const seconds = (now - start) / 1000;
  return { perSecond: count / seconds, microseconds: (seconds * 1e6) / count };
}

export function percentile(sorted: readonly number[], q: number): number {
  if (sorted.length === 0) return NaN;
  const index = Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1));
  return sorted[index] ?? NaN;
}

export function heading(title: string): void {
  process.stdout.write(`\n== ${title}\n`);
}
