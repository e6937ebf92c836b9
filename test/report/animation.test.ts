// The animation block of the report (renderReport.ts) in a real browser (headless Chromium,
// test/helpers/headlessBrowser.ts): frames are stepped by their buttons and cycled by the play
// switch in CSS alone, so the page keeps its script-free Content-Security-Policy. Exactly one
// frame is visible at a time; the visible one follows the clicked button; while playing it
// changes with time. The frames are display data (a moving bright square).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { renderReportHtml } from '../../src/report/renderReport.js';
import { renderFieldMapSvg } from '../../src/figures/fieldMapSvg.js';
import { launchHeadlessChromium } from '../helpers/headlessBrowser.js';

function frame(k: number): { svg: string; label: string } {
  const values = Float64Array.from({ length: 64 }, (_, i) => (Math.floor(i / 8) === k + 2 && i % 8 === k + 2 ? 1 : 0));
  return { svg: renderFieldMapSvg({ values, nx: 8, ny: 8, title: `frame ${k}`, valueRange: { min: 0, max: 1 } }), label: `t = ${k} ms` };
}

describe('report animation', () => {
  it('steps and plays its frames without a script', async () => {
    const html = renderReportHtml({
      title: 'animation sample',
      createdIso: '2025-01-01T00:00:00Z',
      status: [],
      sections: [{ heading: 'Animation', blocks: [{ kind: 'animation', frames: [0, 1, 2, 3].map(frame), frameMs: 150, caption: 'four frames' }] }],
    });
    expect(html).not.toMatch(/<script/i);
    expect(html).toContain("default-src 'none'");
    const file = join(mkdtempSync(join(tmpdir(), 'tiercake-animation-')), 'report.html');
    writeFileSync(file, html);
    const { browser } = await launchHeadlessChromium();
    try {
      const page = await browser.newPage();
      const problems: string[] = [];
      page.on('console', (m) => m.type() === 'error' && problems.push(m.text()));
      page.on('pageerror', (e) => problems.push(e.message));
      await page.goto(pathToFileURL(file).href);
      const visible = (): Promise<number[]> =>
        page
          .locator('.anim-frame')
          .evaluateAll((els) => els.map((el: any, k) => (el.ownerDocument.defaultView.getComputedStyle(el).visibility === 'visible' ? k : -1)).filter((k) => k >= 0));
      expect(await visible()).toEqual([0]);
      await page.locator('.anim-controls label', { hasText: /^3$/ }).click();
      expect(await visible()).toEqual([2]);
      expect(await page.locator('.anim-frame-2 .anim-time').textContent()).toBe('3/4: t = 2 ms');
      await page.locator('.anim-controls label.anim-play').click();
      const seen = new Set<number>();
      for (let k = 0; k < 12; k++) {
        const now = await visible();
        expect(now.length).toBe(1);
        seen.add(now[0]);
        await page.waitForTimeout(70);
      }
      expect(seen.size).toBeGreaterThanOrEqual(3);
      await page.locator('.anim-controls label.anim-play').click();
      expect(await visible()).toEqual([2]);
      expect(problems).toEqual([]);
    } finally {
      await browser.close();
    }
  });
});
