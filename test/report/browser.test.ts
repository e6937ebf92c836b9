// The HTML report opened in a real browser: headless Chromium driven by playwright-core
// (a system Chromium when installed, else the one bundled in @sparticuz/chromium:
// test/helpers/headlessBrowser.ts). A sample report holding every block kind must load with no console
// or page errors and no network traffic beyond the file itself, its images must decode,
// its plots must have a size and their paths, the error banner must show, and nothing may
// stick out of a phone-width page. A full-page screenshot is kept for a human to look at
// (/tmp/report-sample.png).
//
// The sample content is an invented experiment; its numbers are display data only (this
// file tests the renderer, not the physics).

import { copyFileSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { PNG } from 'pngjs';
import type { Browser } from 'playwright-core';
import { launchHeadlessChromium } from '../helpers/headlessBrowser.js';
import { afterAll, describe, expect, it } from 'vitest';
import { LASER_SAFETY_CAUTION, MEAN_FIELD_CAUTION } from '../../src/report/cautions.js';
import type { ReportDocument } from '../../src/report/reportModel.js';
import { renderReportHtml } from '../../src/report/renderReport.js';
import { renderFieldMapSvg } from '../../src/figures/fieldMapSvg.js';

/** A 12 x 10 site heat map (a checkerboard of two values) as the solve writers make them. */
function sampleFieldMap(): string {
  const values = Float64Array.from({ length: 120 }, (_, i) => ((Math.floor(i / 10) + (i % 10)) % 2 === 0 ? 0.2 : 1.8));
  return renderFieldMapSvg({ values, nx: 12, ny: 10, title: 'checkerboard density', colorBarLabel: 'atoms per site' });
}

/** A 48 x 32 RGBA test card: a smooth two-colour ramp with a dark square in one corner. */
function makeTestPng(): Uint8Array {
  const width = 48;
  const height = 32;
  const png = new PNG({ width, height });
  for (let yPx = 0; yPx < height; yPx++) {
    for (let xPx = 0; xPx < width; xPx++) {
      const i = (yPx * width + xPx) * 4;
      const dark = xPx < 8 && yPx < 8;
      png.data[i] = dark ? 20 : Math.round((255 * xPx) / (width - 1));
      png.data[i + 1] = dark ? 20 : 90;
      png.data[i + 2] = dark ? 20 : Math.round((255 * yPx) / (height - 1));
      png.data[i + 3] = 255;
    }
  }
  return new Uint8Array(PNG.sync.write(png));
}

/** A report with every block kind, shaped like the output of a solve that did not converge. */
function sampleReport(png: Uint8Array): ReportDocument {
  const radius = Array.from({ length: 41 }, (_, k) => k * 0.5);
  // Display data: a stepped density profile (plateaus at 2 and 1), smoothed at the edges.
  const step = (r: number, edge: number): number => 1 / (1 + Math.exp((r - edge) / 0.4));
  const density = radius.map((r) => step(r, 6) + step(r, 14));
  const densityErr = density.map((n) => 0.03 + 0.04 * n);
  const variance = radius.map((r, k) => 0.25 * (step(r, 6.5) - step(r, 5.5)) ** 2 + 0.002 * k);
  const residuals = Array.from({ length: 60 }, (_, k) => 0.3 * Math.exp(-k / 6) + 1e-6 * (1 + (k % 3)));
  const edges = Array.from({ length: 21 }, (_, k) => k * 0.1);
  const countsA = edges.slice(1).map((_, k) => Math.round(80 * Math.exp(-(((k - 8) / 3) ** 2))));
  const countsB = edges.slice(1).map((_, k) => Math.round(60 * Math.exp(-(((k - 11) / 4) ** 2))));
  return {
    title: 'Invented run: Rb-87 in a 3D lattice, 12 Er, N = 40 000',
    subtitle: 'Scenario configs/example-run.json, tiny layered trap, T = 0',
    createdIso: '2025-03-14T09:26:53Z',
    status: [
      { level: 'ok', text: 'Outputs written to out/example-run' },
      { level: 'warning', text: 'Occupation truncated at nmax = 4; largest |nmax> weight 3e-7' },
      { level: 'error', text: 'NOT CONVERGED: residual 2.1e-6 after 60 sweeps (tolerance 1e-8)' },
    ],
    footer: 'tiercake 0.1.0 (renderer test sample)',
    sections: [
      {
        heading: 'Summary',
        blocks: [
          {
            kind: 'paragraph',
            text: 'A Mott core with filling 2 surrounded by a filling-1 shell.\n\nSecond paragraph with <markup> that must stay text & not become tags.',
          },
          {
            kind: 'keyValueTable',
            caption: 'Parameters in recoil units and in SI units.',
            unitSystems: { first: 'lattice units', second: 'SI' },
            rows: [
              { label: 'Lattice depth', value: 12, unit: 'Er', secondValue: 3.96e-29, secondUnit: 'J', note: 'from scenario' },
              { label: 'Tunnelling J', value: 0.01495, unit: 'Er', secondValue: 7.4, secondUnit: 'Hz \u00D7 h' },
              { label: 'Atom number', value: 40000, note: 'fixed' },
              { label: 'Chemical potential', value: null },
            ],
          },
          {
            kind: 'table',
            caption: 'Shells from the centre outwards.',
            columns: [
              { header: 'Phase' },
              { header: 'Outer radius', unit: 'sites' },
              { header: 'Atoms' },
              { header: 'Superfluid fraction' },
            ],
            rows: [
              ['Mott n = 2', 6.1, 14850, 0],
              ['superfluid ring', 7.4, 5210, 0.82],
              ['Mott n = 1', 14.2, 19940, null],
            ],
          },
        ],
      },
      {
        heading: 'Images',
        blocks: [
          { kind: 'image', pngBytes: png, alt: 'Test card image', caption: 'A test card, drawn pixelated at 8x.', displayWidthPx: 384, pixelated: true },
          { kind: 'figure', svg: sampleFieldMap(), caption: 'A heat map from the figure stack, inlined as SVG.' },
        ],
      },
      {
        heading: 'Profiles',
        blocks: [
          {
            kind: 'linePlot',
            caption: 'Azimuthally averaged density with one-sigma spread; dashed lines mark shell edges.',
            xAxis: { label: 'radius', unit: 'sites' },
            yAxis: { label: 'density', unit: 'atoms/site' },
            series: [
              { label: 'mean density', x: radius, y: density, yErr: densityErr },
              { label: 'variance <script>', x: radius, y: variance, style: { line: 'dashed' } },
            ],
            verticalMarkers: [{ at: 6.1, label: 'n = 2 edge' }, { at: 14.2, label: 'n = 1 edge' }],
          },
          {
            kind: 'histogram',
            caption: 'Distribution of |phi|^2 over disorder realisations.',
            binEdges: edges,
            series: [
              { label: 'weak disorder', counts: countsA },
              { label: 'strong disorder', counts: countsB },
            ],
            xAxis: { label: 'condensate density |\u03C6|\u00B2' },
            yAxis: { label: 'sites' },
          },
        ],
      },
      {
        heading: 'Convergence',
        blocks: [
          { kind: 'residualHistory', residuals, tolerance: 1e-8, residualLabel: 'max |\u0394\u03C6|', caption: 'Residual after each sweep.' },
          {
            kind: 'codeBlock',
            caption: 'Resolved scenario',
            // Long enough (about 50 lines) to need the scroll box on screen.
            code: JSON.stringify(
              {
                lattice: { shape: [32, 32, 8], depthEr: [12, 12, 12] },
                trap: { omegaHz: [60, 60, 150] },
                sweepsBetweenChecks: Array.from({ length: 40 }, (_, k) => k + 1),
                note: '</code><b>x</b>',
              },
              null,
              2,
            ),
          },
        ],
      },
      { heading: 'Cautions', blocks: [{ kind: 'cautionList', items: [MEAN_FIELD_CAUTION, LASER_SAFETY_CAUTION, 'A plain caution string.'] }] },
    ],
  };
}

const EXPECTED_PLOTS = [
  { series: 2 }, // line plot
  { series: 2 }, // histogram
  { series: 1 }, // residual history
];

describe('report in headless Chromium', () => {
  let browser: Browser | undefined;
  let workDir = '';

  afterAll(async () => {
    await browser?.close();
    if (workDir) rmSync(workDir, { recursive: true, force: true });
  });

  /** Headless Chromium (system or bundled); a failure to start fails the test, never skips it. */
  async function launch(): Promise<Browser> {
    workDir = mkdtempSync(join(tmpdir(), 'tiercake-report-'));
    browser = (await launchHeadlessChromium()).browser;
    return browser;
  }

  it('loads offline, renders every block and shows the error banner', async () => {
    const chromiumBrowser = await launch();
    const html = renderReportHtml(sampleReport(makeTestPng()));
    const file = join(workDir, 'report.html');
    writeFileSync(file, html);
    const fileUrl = pathToFileURL(file).href;

    // Nothing in the file may point anywhere: every src/href is a data URI or an in-page anchor.
    for (const m of html.matchAll(/\s(?:src|href)="([^"]*)"/g)) {
      expect(m[1]!.startsWith('data:') || m[1]!.startsWith('#'), `reference ${m[1]!.slice(0, 40)}`).toBe(true);
    }
    expect(html).not.toMatch(/<script/i);

    const page = await chromiumBrowser.newPage({ viewport: { width: 1100, height: 900 } });
    const consoleErrors: string[] = [];
    const pageErrors: string[] = [];
    const requests: string[] = [];
    page.on('console', (msg) => {
      if (msg.type() === 'error' || msg.type() === 'warning') consoleErrors.push(`${msg.type()}: ${msg.text()}`);
    });
    page.on('pageerror', (err) => pageErrors.push(err.message));
    page.on('request', (req) => requests.push(req.url()));
    await page.goto(fileUrl, { waitUntil: 'load' });

    expect(consoleErrors).toEqual([]);
    expect(pageErrors).toEqual([]);
    const foreign = requests.filter((u) => u !== fileUrl && !u.startsWith('data:'));
    expect(foreign).toEqual([]);

    // Images decoded (naturalWidth is 0 for a broken image) at their true size.
    const images = await page.locator('img').evaluateAll((els) =>
      els.map((el) => ({ natural: el.naturalWidth as number, naturalH: el.naturalHeight as number, complete: el.complete as boolean })),
    );
    expect(images).toEqual([{ natural: 48, naturalH: 32, complete: true }]);

    // Plots: one svg per plot block, each with a size and one drawn path per series
    // (gathered in one round trip to the page).
    const plots = await page.locator('figure > svg.tc-plot:not(.tc-map)').evaluateAll((els) =>
      els.map((el) => {
        const box = el.getBoundingClientRect();
        return {
          width: box.width as number,
          height: box.height as number,
          paths: [...el.querySelectorAll('path.series')].map((p: any) => {
            const b = p.getBBox();
            return { width: b.width as number, height: b.height as number, d: (p.getAttribute('d') ?? '') as string };
          }),
        };
      }),
    );
    expect(plots).toHaveLength(EXPECTED_PLOTS.length);
    plots.forEach((plot, k) => {
      expect(plot.width, `plot ${k} width`).toBeGreaterThan(100);
      expect(plot.height, `plot ${k} height`).toBeGreaterThan(100);
      expect(plot.paths).toHaveLength(EXPECTED_PLOTS[k]!.series);
      for (const b of plot.paths) {
        expect(b.d.length).toBeGreaterThan(20);
        expect(b.width).toBeGreaterThan(0);
        expect(b.height).toBeGreaterThan(0);
      }
    });
    // The inlined heat map: its site pixels are drawn without smoothing (the report's CSS),
    // at the size the figure asks for, and its embedded image decodes.
    const map = await page.locator('svg.tc-map image.pixels').evaluate((el: any) => ({
      rendering: (globalThis as any).getComputedStyle(el).imageRendering as string,
      width: el.getBoundingClientRect().width as number,
      attribute: Number(el.getAttribute('width')),
    }));
    expect(map.rendering).toBe('pixelated');
    expect(map.width).toBeCloseTo(map.attribute, 0);
    // The label with markup is shown as text, not run.
    expect(await page.locator('svg.tc-plot:not(.tc-map)').first().textContent()).toContain('variance <script>');
    expect(await page.locator('main').textContent()).toContain('</code><b>x</b>');

    // Error banner first, visible and red.
    const banner = page.locator('.status .banner').first();
    expect(await banner.getAttribute('class')).toContain('banner-error');
    expect(await banner.isVisible()).toBe(true);
    expect(await banner.textContent()).toContain('NOT CONVERGED');
    const rgb = await banner.evaluate((el) => el.ownerDocument.defaultView.getComputedStyle(el).backgroundColor as string);
    const [r, g, b] = (rgb.match(/\d+/g) ?? []).map(Number);
    expect(r! > 2 * g! && r! > 2 * b!, `banner colour ${rgb}`).toBe(true);

    // Every contents link leads to a section of the page.
    const links = await page.locator('nav.contents a').evaluateAll((els) =>
      els.map((el) => ((el.getAttribute('href') ?? '') as string).slice(1)),
    );
    expect(links).toHaveLength(5);
    for (const id of links) expect(await page.locator(`section[id="${id}"]`).count()).toBe(1);

    const shot = join(workDir, 'report.png');
    await page.screenshot({ path: shot, fullPage: true });
    expect(statSync(shot).size).toBeGreaterThan(10_000);
    copyFileSync(shot, '/tmp/report-sample.png');

    // On screen the long scenario listing sits in its own scroll box.
    const preOnScreen = await page.locator('pre').evaluate((el) => ({
      scroll: el.scrollHeight as number,
      client: el.clientHeight as number,
    }));
    expect(preOnScreen.scroll).toBeGreaterThan(preOnScreen.client);

    // On a phone-width page, images and plots shrink to fit instead of sticking out.
    await page.setViewportSize({ width: 400, height: 800 });
    const overflow = await page.locator('img, svg.tc-plot').evaluateAll((els) =>
      els.map((el) => {
        const rect = el.getBoundingClientRect();
        return { right: rect.right as number, width: rect.width as number };
      }),
    );
    for (const o of overflow) {
      expect(o.width).toBeGreaterThan(0);
      expect(o.right).toBeLessThanOrEqual(400);
    }

    // Printed on A4 (about 720 CSS px between 14 mm margins): the banner and the contents
    // stay, the scenario text is not cut off by a scroll box, nothing sticks out.
    await page.emulateMedia({ media: 'print' });
    await page.setViewportSize({ width: 720, height: 1000 });
    expect(await banner.isVisible()).toBe(true);
    expect(await page.locator('nav.contents').isVisible()).toBe(true);
    const pre = await page.locator('pre').evaluate((el) => ({
      scroll: el.scrollHeight as number,
      client: el.clientHeight as number,
    }));
    expect(pre.scroll).toBeLessThanOrEqual(pre.client);
    const printed = await page.locator('img, svg.tc-plot, table').evaluateAll((els) =>
      els.map((el) => el.getBoundingClientRect().right as number),
    );
    for (const right of printed) expect(right).toBeLessThanOrEqual(720);
    await page.close();
  });
});
