// Prints the project's figures; nothing here is asserted (tests assert behaviour, not time).
// `npm run bench` runs everything with a one-minute soak; `npm run bench:soak` the ten-minute one.
import { disableMidi } from '../src/io/midi-system.js';
import { benchAdaptive } from './adaptive.js';
import { benchAudio } from './audio.js';
import { benchEveryKey } from './every-key.js';
import { benchFuzz } from './fuzz.js';
import { benchLatency, benchSoak } from './live.js';
import { benchRender } from './render.js';
import { benchRouter } from './router.js';
import { benchScore } from './score.js';
import { benchSpelling } from './spelling.js';
import { benchTuning } from './tuning.js';

const soakOnly = process.argv.includes('--soak');
const minutes = Number(process.argv.find((a) => a.startsWith('--minutes='))?.slice('--minutes='.length) ?? (soakOnly ? 10 : 1));
process.stdout.write(`diesis benchmarks · node ${process.version} · ${new Date().toISOString()}\n`);
if (!soakOnly) {
  benchTuning();
  benchRouter();
  benchSpelling();
  benchEveryKey(false);
  benchEveryKey(true);
  benchAdaptive();
  benchScore();
  benchAudio();
  await benchRender();
  await benchLatency();
  await benchFuzz();
}
await benchSoak(minutes);
await disableMidi();
