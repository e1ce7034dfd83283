/**
 * Headless Chromium for the browser suites, driven by playwright-core against Debian's /usr/bin/chromium.
 * Without Chromium the suites say so loudly and skip; under CI (CI set) they fail instead.
 */
import fs from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

export const CHROMIUM_PATH = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';

/** Flags that let Chromium start as root on a machine with no outside network. */
const LAUNCH_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--disable-default-apps',
];

export function chromiumAvailable(): boolean {
  return fs.existsSync(CHROMIUM_PATH);
}

/**
 * Call at the top of a browser suite's `before`: skips the suite (loudly) when Chromium is missing,
 * or throws under CI so a missing browser can never pass silently.
 */
export function requireChromium(context: Mocha.Context): void {
  if (chromiumAvailable()) return;
  const message = `Chromium not found at ${CHROMIUM_PATH}: install it with "apt-get install -y chromium"`;
  if (process.env['CI']) throw new Error(`${message} (CI is set, so browser suites must run)`);
  console.warn(`\n  !!! ${message}. SKIPPING browser suite "${context.test?.parent?.title ?? ''}". !!!\n`);
  context.skip();
}

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: LAUNCH_ARGS });
}
