#!/usr/bin/env node
// Entry point of the `diesis` command: the compiled CLI lives in dist/ (built by `npm run build`,
// which `npm ci` runs through the `prepare` script).
import { main } from '../dist/src/cli/main.js';

// A reader that stops early (`diesis presets | head`) is not an error.
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (error) => {
    if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw error;
  });
}

main(process.argv).then(
  (code) => {
    process.exitCode = code;
  },
  (error) => {
    process.stderr.write(`diesis: internal error: ${error instanceof Error ? error.message : String(error)}\n`);
    process.exitCode = 70;
  },
);
