import { existsSync } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

/** Debian's chromium (installed by .ci/run when missing); no browser is downloaded. */
export const CHROMIUM = process.env['DIESIS_CHROMIUM'] ?? '/usr/bin/chromium';

/** Launches the headless chromium the browser tests drive, or says in one line how to get it. */
export async function launchChromium(): Promise<Browser> {
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: install Debian's chromium (apt-get install -y chromium) or set DIESIS_CHROMIUM`);
  return chromium.launch({ executablePath: CHROMIUM });
}
