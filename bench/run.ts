// Prints the project's figures; nothing here is asserted (tests assert behaviour, not time).
import { benchRouter } from './router.js';
import { benchSpelling } from './spelling.js';
import { benchTuning } from './tuning.js';

process.stdout.write(`diesis benchmarks · node ${process.version} · ${new Date().toISOString()}\n`);
benchTuning();
benchRouter();
benchSpelling();
