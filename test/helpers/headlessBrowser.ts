// A headless Chromium for tests, on any machine: a system browser when one is installed
// (CHROMIUM_PATH, then the usual names on PATH), otherwise the Chromium that ships inside
// the npm package @sparticuz/chromium (a compressed binary with its libraries, unpacked to
// the temporary folder on first use), driven by playwright-core. So `npm ci && npm test`
// needs nothing from the system package manager, and no browser test is ever skipped.
//
// @sparticuz/chromium is pinned to 147.0.0, the last release whose `engines` accepts Node 20
// (later ones declare Node >= 22.17). Its own launch flags are made for serverless hosts; one
// of them (single-process / in-process GPU, common practice there) makes this build stop with
// SIGTRAP here, so we pass our own plain headless flags instead, the same for either browser.

import { accessSync, constants } from 'node:fs';
import { delimiter, join } from 'node:path';
import { chromium, type Browser } from 'playwright-core';

export const HEADLESS_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

const SYSTEM_NAMES = ['chromium', 'chromium-browser', 'google-chrome', 'google-chrome-stable'];

function executable(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

/** Path of a system Chromium, or null when none is installed. */
export function systemChromium(env: NodeJS.ProcessEnv = process.env): string | null {
  const given = env.CHROMIUM_PATH;
  if (given !== undefined && given !== '') {
    if (!executable(given)) throw new Error(`CHROMIUM_PATH=${given} is not an executable file; unset it to use the bundled Chromium`);
    return given;
  }
  for (const dir of (env.PATH ?? '').split(delimiter)) {
    if (dir === '') continue;
    for (const name of SYSTEM_NAMES) {
      const candidate = join(dir, name);
      if (executable(candidate)) return candidate;
    }
  }
  return null;
}

export interface LaunchedBrowser {
  browser: Browser;
  /** where the executable came from */
  source: 'system' | 'npm package @sparticuz/chromium';
  executablePath: string;
}

/** Starts headless Chromium: the system one if present, else the bundled one. Never skips. */
export async function launchHeadlessChromium(env: NodeJS.ProcessEnv = process.env): Promise<LaunchedBrowser> {
  const system = systemChromium(env);
  let executablePath: string;
  let source: LaunchedBrowser['source'];
  if (system !== null) {
    executablePath = system;
    source = 'system';
  } else {
    const bundled = (await import('@sparticuz/chromium')).default;
    executablePath = await bundled.executablePath();
    source = 'npm package @sparticuz/chromium';
  }
  const browser = await chromium.launch({ executablePath, args: HEADLESS_ARGS, headless: true });
  return { browser, source, executablePath };
}
