import { UserError } from '../util/errors.js';

/** Parses `2-16`, `1,3,5-8` (channels as a synth shows them, 1…16) into channels 0…15. */
export function parseChannels(text: string, what = '--channels'): number[] {
  const channels: number[] = [];
  const fail = (detail: string): never => {
    throw new UserError(`${what ? `${what} ` : ''}"${text}": ${detail}`, 2);
  };
  for (const part of text.split(',')) {
    const match = /^\s*(\d+)\s*(?:-\s*(\d+)\s*)?$/u.exec(part);
    if (!match) fail(`write channels 1–16 as a list or ranges, such as 2-16 or 1,3,5-8`);
    const from = Number(match![1]);
    const to = Number(match![2] ?? match![1]);
    for (const c of [from, to]) if (c < 1 || c > 16) fail(`${c} is not a MIDI channel (1–16)`);
    if (to < from) fail(`${part.trim()} runs downward; write the lower channel first`);
    for (let c = from; c <= to; c++) if (!channels.includes(c - 1)) channels.push(c - 1);
  }
  return channels;
}

/** Channels 0…15 as a synth shows them, ranges joined: `2–16`, `1,3,5–8`. */
export function formatChannels(channels: readonly number[]): string {
  const sorted = [...new Set(channels)].sort((a, b) => a - b).map((c) => c + 1);
  const parts: string[] = [];
  for (let i = 0; i < sorted.length; ) {
    let j = i;
    while (j + 1 < sorted.length && sorted[j + 1] === (sorted[j] ?? 0) + 1) j++;
    parts.push(j > i + 1 ? `${sorted[i]}–${sorted[j]}` : sorted.slice(i, j + 1).join(','));
    i = j + 1;
  }
  return parts.join(',');
}
