// The HTML report as text (the browser test opens it in Chromium): self-contained, all
// caller text escaped, status banners ordered, anchors unique, a broken block reported
// instead of losing the report, and the standard cautions carrying the published numbers.
//
// External references used below:
// - RFC 4648 base64 (decoded with Node's Buffer) and the PNG specification (W3C 2003):
//   the embedded image must decode to the very bytes given, with the IHDR size that
//   pngjs (an independent PNG reader) reports.
// - HTML Living Standard, named character references: decoding the five entities we
//   emit must give back the caller's text exactly.
// - Mean-field lobe tip of the n = 1 Mott lobe, zJ/U = 2n + 1 - 2 sqrt(n(n+1)) = 3 - 2 sqrt 2
//   (van Oosten, van der Straten, Stoof, PRA 63, 053601 (2001)), i.e. U/(zJ) = 3 + 2 sqrt 2
//   = 5.828; the caution quotes 6 x 5.828 = 34.97 (z = 6) and 4 x 5.828 = 23.31 (z = 4).
// - Quantum Monte Carlo critical points quoted in the caution: 29.34 in 3D
//   (Capogrosso-Sansone, Prokof'ev, Svistunov, PRB 75, 134302 (2007)) and 16.74 in 2D
//   (Capogrosso-Sansone et al., PRA 77, 015602 (2008)).

import { PNG } from 'pngjs';
import { describe, expect, it } from 'vitest';
import {
  FINITE_TEMPERATURE_CAUTION,
  LASER_SAFETY_CAUTION,
  LOCAL_DENSITY_CAUTION,
  MEAN_FIELD_CAUTION,
  cautionsFor,
} from '../../src/report/cautions.js';
import type { ReportDocument } from '../../src/report/reportModel.js';
import { pngSize, renderReportHtml } from '../../src/report/renderReport.js';
import { renderFieldMapSvg } from '../../src/figures/fieldMapSvg.js';

function decodeEntities(text: string): string {
  return text
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&#39;/g, "'")
    .replace(/&amp;/g, '&');
}

function tinyPng(width: number, height: number): Uint8Array {
  const png = new PNG({ width, height });
  png.data.fill(200);
  return new Uint8Array(PNG.sync.write(png));
}

const HOSTILE = '<script>alert(1)</script> "quoted" & \'single\'';

function baseDoc(): ReportDocument {
  return {
    title: `Run ${HOSTILE}`,
    subtitle: 'sub <i>title</i>',
    createdIso: '2025-03-14T09:26:53+01:00',
    status: [
      { level: 'ok', text: 'written' },
      { level: 'error', text: 'NOT CONVERGED' },
      { level: 'warning', text: 'nmax close' },
    ],
    sections: [
      { heading: 'Results', blocks: [{ kind: 'paragraph', text: `first ${HOSTILE}\n\nsecond` }] },
      { heading: 'Results', blocks: [{ kind: 'codeBlock', code: `{"a": "${HOSTILE}"}\n  </pre></code>` }] },
      {
        heading: 'Tables',
        blocks: [
          {
            kind: 'keyValueTable',
            unitSystems: { first: 'lattice', second: 'SI' },
            rows: [
              { label: 'depth', value: 12, unit: 'Er', secondValue: 3.96e-29, secondUnit: 'J' },
              { label: 'N', value: 40000 },
            ],
          },
          {
            kind: 'table',
            columns: [{ header: 'phase' }, { header: 'radius', unit: 'sites' }],
            rows: [
              ['Mott n = 1', 14.2],
              ['superfluid', null],
            ],
          },
        ],
      },
    ],
  };
}

describe('renderReportHtml', () => {
  it('is one self-contained page: CSP, no scripts, no addresses, no external references', () => {
    const html = renderReportHtml(baseDoc());
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).toContain(`<meta http-equiv="Content-Security-Policy" content="default-src 'none'; img-src data:; style-src 'unsafe-inline'">`);
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/https?:|\/\/[a-z]/i);
    expect(html).not.toMatch(/<link|@import|url\((?!#)/i);
  });

  it('escapes every piece of caller text and keeps it recoverable', () => {
    const html = renderReportHtml(baseDoc());
    expect(html).toContain('<title>Run &lt;script&gt;alert(1)&lt;/script&gt; &quot;quoted&quot; &amp; &#39;single&#39;</title>');
    expect(html).toContain('sub &lt;i&gt;title&lt;/i&gt;');
    const code = /<pre><code>([\s\S]*?)<\/code><\/pre>/.exec(html)![1]!;
    expect(decodeEntities(code)).toBe(`{"a": "${HOSTILE}"}\n  </pre></code>`);
    expect(html).toContain('<p class="block">first &lt;script&gt;');
    expect(html).toContain('<p class="block">second</p>');
  });

  it('orders banners error first, warning, ok; the error is an alert', () => {
    const html = renderReportHtml(baseDoc());
    const levels = [...html.matchAll(/<div class="banner banner-(\w+)"/g)].map((m) => m[1]);
    expect(levels).toEqual(['error', 'warning', 'ok']);
    expect(html).toContain('<div class="banner banner-error" role="alert"><span class="banner-tag">Error</span><span class="banner-text">NOT CONVERGED</span>');
  });

  it('gives repeated headings distinct anchors and links the contents list to them', () => {
    const html = renderReportHtml(baseDoc());
    const ids = [...html.matchAll(/<section class="report-section" id="([^"]+)"/g)].map((m) => m[1]);
    const links = [...html.matchAll(/<li><a href="#([^"]+)">/g)].map((m) => m[1]);
    expect(ids).toEqual(['s-results', 's-results-2', 's-tables']);
    expect(links).toEqual(ids);
  });

  it('shows the creation time in UTC (09:26 at +01:00 is 08:26 UTC)', () => {
    expect(renderReportHtml(baseDoc())).toContain('<time datetime="2025-03-14T09:26:53+01:00">2025-03-14 08:26 UTC</time>');
  });

  it('lays out tables: two unit systems side by side, numbers right-aligned and formatted', () => {
    const html = renderReportHtml(baseDoc());
    expect(html).toContain('<th scope="col">lattice</th><th scope="col">SI</th>');
    expect(html).toContain('<td class="value">12<span class="unit">Er</span></td><td class="value">3.96 \u00D7 10\u207B\u00B2\u2079<span class="unit">J</span></td>');
    expect(html).toContain('<th scope="col" class="num">radius<span class="unit">sites</span></th>');
    expect(html).toContain('<td class="num">14.2</td>');
    expect(html).toContain('<td class="num missing">\u2014</td>');
  });

  it('embeds a PNG as a data URI that decodes to the same bytes, with its true size', () => {
    const png = tinyPng(7, 5);
    const html = renderReportHtml({
      title: 't',
      createdIso: '2025-01-01T00:00:00Z',
      status: [],
      sections: [{ heading: 'img', blocks: [{ kind: 'image', pngBytes: png, alt: 'a "map"', displayWidthPx: 140, pixelated: true }] }],
    });
    const m = /<img class="pixelated" src="data:image\/png;base64,([A-Za-z0-9+/=]+)" alt="a &quot;map&quot;" width="(\d+)" height="(\d+)" style="width:140px">/.exec(html);
    expect(m).not.toBeNull();
    const decoded = Buffer.from(m![1]!, 'base64');
    expect(decoded.equals(Buffer.from(png))).toBe(true);
    const read = PNG.sync.read(decoded);
    expect([Number(m![2]), Number(m![3])]).toEqual([read.width, read.height]);
    expect(pngSize(png)).toEqual({ widthPx: 7, heightPx: 5 });
  });

  it('keeps the report when one block is bad: the block says why, a warning banner says where', () => {
    const html = renderReportHtml({
      title: 't',
      createdIso: '2025-01-01T00:00:00Z',
      status: [],
      sections: [
        {
          heading: 'Spread',
          blocks: [
            { kind: 'histogram', binEdges: [0, 1, 2], series: [{ label: 'short', counts: [1] }], xAxis: { label: 'x' }, yAxis: { label: 'n' } },
            { kind: 'image', pngBytes: new Uint8Array([1, 2, 3]), alt: 'not a png' },
            { kind: 'paragraph', text: 'still here' },
          ],
        },
      ],
    });
    expect(html).toContain("This histogram block could not be drawn: series[0] &#39;short&#39;: 1 counts for 2 bins");
    expect(html).toContain('This image block could not be drawn: pngBytes: not a PNG file');
    expect(html).toContain('2 parts of this report could not be drawn: Spread, block 1 (histogram); Spread, block 2 (image).');
    expect(html).toContain('<p class="block">still here</p>');
  });

  it('gives each plot its own ids and inlines it without a namespace address', () => {
    const plot = {
      kind: 'linePlot' as const,
      xAxis: { label: 'x' },
      yAxis: { label: 'y' },
      series: [{ label: 's', x: [0, 1], y: [0, 1] }],
    };
    const html = renderReportHtml({
      title: 't',
      createdIso: '2025-01-01T00:00:00Z',
      status: [],
      sections: [{ heading: 'p', blocks: [plot, plot, { kind: 'residualHistory', residuals: [1, 0.1, 0.01], tolerance: 0.001 }] }],
    });
    const ids = [...html.matchAll(/<svg class="tc-plot" id="([^"]+)"/g)].map((m) => m[1]);
    expect(ids).toHaveLength(3);
    expect(new Set(ids).size).toBe(3);
    expect(html).toContain('tolerance 1 \u00D7 10\u207B\u00B3');
  });

  it('inlines a figure block as the very SVG of its image file, and refuses anything that is not one <svg>', () => {
    const values = Float64Array.from({ length: 12 }, (_, i) => i);
    const a = renderFieldMapSvg({ values, nx: 4, ny: 3, title: 'map a' });
    const b = renderFieldMapSvg({ values: values.map((v) => -v), nx: 4, ny: 3, title: 'map b' });
    const html = renderReportHtml({
      title: 't',
      createdIso: '2025-01-01T00:00:00Z',
      status: [],
      sections: [
        { heading: 'maps', blocks: [{ kind: 'figure', svg: a, caption: 'first' }, { kind: 'figure', svg: b }] },
        { heading: 'bad', blocks: [{ kind: 'figure', svg: '<img src="x">' }] },
      ],
    });
    expect(html).toContain(a.replace(' xmlns="http://www.w3.org/2000/svg"', ''));
    expect(html).not.toContain('http://www.w3.org/2000/svg');
    // Two different figures, two sets of ids (taken from each figure's content).
    const ids = [...html.matchAll(/<svg class="tc-plot tc-map" id="([^"]+)"/g)].map((m) => m[1]);
    expect(ids).toHaveLength(2);
    expect(new Set(ids).size).toBe(2);
    expect(html).toContain('This figure block could not be drawn: svg: expected one &lt;svg&gt; element');
    expect(html).not.toContain('<img src="x">');
  });
});

describe('standard cautions', () => {
  it('quote the published critical points and the mean-field values they are compared with', () => {
    const text = MEAN_FIELD_CAUTION.text;
    for (const s of ['29.34', 'PRB 75, 134302 (2007)', '34.97', '16.74', 'PRA 77, 015602 (2008)', '23.31', '1D', 'too small']) {
      expect(text).toContain(s);
    }
    // The mean-field numbers in the text must follow from the lobe tip of van Oosten et
    // al. (2001), U/(zJ) = 3 + 2 sqrt 2 = 5.828: 3D (z = 6) and 2D (z = 4).
    const tip = 3 + 2 * Math.sqrt(2);
    const threeD = /theory gives ([\d.]+) \(= 6 \u00D7 ([\d.]+)\)/.exec(text);
    expect(threeD).not.toBeNull();
    expect(Number(threeD![2])).toBeCloseTo(tip, 3); // quoted to 3 decimals
    expect(Number(threeD![1])).toBeCloseTo(6 * tip, 2); // 34.97
    const twoD = /16\.74 \([^)]*\)\) and (\d+\.\d+)/.exec(text);
    expect(twoD).not.toBeNull();
    expect(Number(twoD![1])).toBeCloseTo(4 * tip, 2); // 23.31
    // The Monte Carlo values quoted lie below mean field, as the text claims.
    const qmc3D = Number(/\(U\/J\)c = ([\d.]+)/.exec(text)![1]);
    expect(qmc3D).toBe(29.34);
    expect(qmc3D).toBeLessThan(6 * tip);
    // A larger critical U/J means a smaller Mott region: the title must say so.
    expect(MEAN_FIELD_CAUTION.title).toMatch(/shrinks the Mott/);
  });

  it('send laser questions to local rules and the lab calibration', () => {
    expect(LASER_SAFETY_CAUTION.text).toMatch(/laser-safety rules/);
    expect(LASER_SAFETY_CAUTION.text).toMatch(/laser-safety officer/);
    expect(LASER_SAFETY_CAUTION.text).toMatch(/calibration/);
  });

  it('are picked by what the result depends on', () => {
    expect(cautionsFor({ depthFromBeamPower: false, finiteTemperature: false, showsLocalDensityPlots: false })).toEqual([
      MEAN_FIELD_CAUTION,
    ]);
    expect(cautionsFor({ depthFromBeamPower: true, finiteTemperature: true, showsLocalDensityPlots: true })).toEqual([
      MEAN_FIELD_CAUTION,
      LASER_SAFETY_CAUTION,
      FINITE_TEMPERATURE_CAUTION,
      LOCAL_DENSITY_CAUTION,
    ]);
  });
});
