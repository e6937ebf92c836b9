// The browser the report tests use: the system lookup, and the bundled Chromium of
// @sparticuz/chromium started for real (whatever the machine has installed), so the
// fall-back that a fresh clone depends on is exercised on every machine.

import { mkdtempSync, rmSync, writeFileSync, chmodSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { launchHeadlessChromium, systemChromium } from '../helpers/headlessBrowser.js';

describe('headless Chromium for tests', () => {
  it('finds a system browser only on PATH or through CHROMIUM_PATH', () => {
    const dir = mkdtempSync(join(tmpdir(), 'tiercake-fake-browser-'));
    try {
      expect(systemChromium({ PATH: '' })).toBeNull();
      const fake = join(dir, 'chromium');
      writeFileSync(fake, '#!/bin/sh\n');
      chmodSync(fake, 0o755);
      expect(systemChromium({ PATH: dir })).toBe(fake);
      expect(systemChromium({ PATH: '', CHROMIUM_PATH: fake })).toBe(fake);
      expect(() => systemChromium({ PATH: '', CHROMIUM_PATH: join(dir, 'missing') })).toThrow(/CHROMIUM_PATH/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('starts the bundled Chromium when no system browser is found, and renders a page', async () => {
    const { browser, source } = await launchHeadlessChromium({ PATH: '' });
    try {
      expect(source).toBe('npm package @sparticuz/chromium');
      const page = await browser.newPage();
      await page.setContent('<p id="x">2 + 2 = <span>4</span></p>');
      expect(await page.locator('#x span').textContent()).toBe('4');
      expect(await page.evaluate(() => 6 * 7)).toBe(42);
    } finally {
      await browser.close();
    }
  });
});
