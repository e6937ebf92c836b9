// One self-contained HTML page from a ReportDocument (HTML Living Standard). Everything
// the page needs is inside the file: CSS inline, PNG images as base64 data URIs
// (RFC 2397), plots as inline SVG; no scripts, no fonts, no external addresses. A
// Content-Security-Policy meta tag (W3C CSP Level 3) forbids any fetch other than data:
// images, so even a caller's mistake cannot make the report reach the network.
// The renderer is pure: the caller supplies the time stamp and all content.

import { escapeMarkup } from '../figures/escapeMarkup.js';
import { formatNumber, formatScientific } from '../figures/formatNumber.js';
import { FIGURE_COLORS } from '../figures/figurePalette.js';
import type {
  AnimationBlock,
  CautionItem,
  CellValue,
  FigureBlock,
  ImageBlock,
  KeyValueTableBlock,
  ReportBlock,
  ReportDocument,
  ReportSection,
  ResidualHistoryBlock,
  StatusLine,
  TableBlock,
} from './reportModel.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { renderHistogramSvg } from '../figures/histogramSvg.js';

const PAGE_FONT_FAMILY =
  "system-ui, -apple-system, 'Segoe UI', 'Noto Sans', 'DejaVu Sans', 'Liberation Sans', Arial, sans-serif";

const CONTENT_SECURITY_POLICY = "default-src 'none'; img-src data:; style-src 'unsafe-inline'";

const STYLE = `
:root { color-scheme: light; --ink: ${FIGURE_COLORS.ink}; --muted: ${FIGURE_COLORS.mutedInk};
  --rule: ${FIGURE_COLORS.rule}; --paper: #ffffff; --desk: #f3f4f6; --accent: #2a5a8c;
  --err: #a32630; --err-soft: #fbeaea; --warn: #8a5a00; --warn-soft: #fdf3dc; --ok: #2a5a8c; --ok-soft: #eaf1f8; }
* { box-sizing: border-box; }
html { background: var(--desk); }
body { margin: 0; color: var(--ink); font: 15px/1.5 ${PAGE_FONT_FAMILY}; }
.page { max-width: 1040px; margin: 0 auto; padding: 28px 20px 40px; }
.sheet { background: var(--paper); border: 1px solid var(--rule); border-radius: 6px; padding: 28px 36px 32px; }
header.report-head { border-bottom: 1px solid var(--rule); padding-bottom: 14px; margin-bottom: 8px; }
.kicker { margin: 0; font-size: 12px; letter-spacing: .08em; text-transform: uppercase; color: var(--muted); }
h1 { font-size: 27px; line-height: 1.2; margin: 4px 0 4px; font-weight: 650; }
.subtitle { margin: 0 0 6px; font-size: 16px; color: var(--muted); }
.created { margin: 0; font-size: 13px; color: var(--muted); }
.status { margin-top: 14px; display: grid; gap: 8px; }
.banner { display: flex; gap: 12px; align-items: baseline; padding: 10px 14px; border-radius: 5px;
  border: 1px solid; border-left-width: 6px; print-color-adjust: exact; -webkit-print-color-adjust: exact; }
.banner-tag { flex: none; font-size: 12px; font-weight: 700; letter-spacing: .06em; text-transform: uppercase; }
.banner-text { font-weight: 600; }
.banner-error { background: var(--err); border-color: #7c1a22; color: #fff; }
.banner-error .banner-text { font-size: 17px; }
.banner-warning { background: var(--warn-soft); border-color: #d9a93a; color: #4d3500; }
.banner-ok { background: var(--ok-soft); border-color: #9db8d3; color: #1e3f63; }
nav.contents { margin: 18px 0 8px; padding: 10px 16px 12px; background: #f7f8fa; border: 1px solid var(--rule); border-radius: 5px; }
nav.contents h2 { font-size: 12px; letter-spacing: .08em; text-transform: uppercase; color: var(--muted); margin: 0 0 6px; border: 0; padding: 0; }
nav.contents ol { margin: 0; padding-left: 22px; columns: 2 220px; column-gap: 28px; }
nav.contents li { break-inside: avoid; padding: 1px 0; }
a { color: var(--accent); text-decoration: none; }
a:hover { text-decoration: underline; }
section.report-section { margin-top: 26px; }
section.report-section > h2 { font-size: 19px; font-weight: 650; margin: 0 0 12px; padding-bottom: 5px; border-bottom: 2px solid var(--ink); }
.block { margin: 0 0 20px; }
p.block { max-width: 72ch; }
figure { margin: 0 0 22px; }
figcaption, caption { font-size: 13px; color: var(--muted); text-align: left; caption-side: bottom; padding-top: 6px; max-width: 80ch; }
.table-wrap { overflow-x: auto; }
table { border-collapse: collapse; font-variant-numeric: tabular-nums; font-size: 14px; }
th, td { padding: 5px 12px 5px 0; border-bottom: 1px solid #e6e8ec; vertical-align: baseline; }
thead th { border-bottom: 1.5px solid var(--ink); font-weight: 600; text-align: left; white-space: nowrap; }
thead th.num { text-align: right; }
th .unit { display: block; font-weight: 400; font-size: 12px; color: var(--muted); }
td.num { text-align: right; white-space: nowrap; }
td.missing { color: var(--muted); }
table.kv th[scope=row] { font-weight: 500; text-align: left; padding-right: 24px; }
table.kv td.value { white-space: nowrap; }
table.kv .unit { color: var(--muted); margin-left: .3em; }
table.kv td.note { color: var(--muted); font-size: 13px; }
.plot > svg.tc-plot { display: block; max-width: 100%; height: auto; }
svg.tc-plot image.pixels, svg.tc-plot image.color-strip { image-rendering: pixelated; }
.figure-image img { display: block; max-width: 100%; height: auto; border: 1px solid var(--rule); background: #fff; }
.figure-image img.pixelated { image-rendering: pixelated; }
.cautions { border-left: 4px solid #c79a3c; background: #fcf8ee; padding: 10px 16px 10px 14px; border-radius: 0 5px 5px 0; print-color-adjust: exact; -webkit-print-color-adjust: exact; }
.cautions ul { margin: 0; padding-left: 18px; }
.cautions li { margin: 6px 0; max-width: 80ch; }
.cautions li strong { font-weight: 650; }
pre { margin: 0; padding: 12px 14px; background: #f5f6f8; border: 1px solid var(--rule); border-radius: 5px; overflow: auto;
  max-height: 32em; font: 12.5px/1.45 ui-monospace, 'SFMono-Regular', Menlo, Consolas, 'DejaVu Sans Mono', 'Liberation Mono', monospace; }
.code figcaption { caption-side: top; padding: 0 0 6px; }
.block-error { border: 1px dashed var(--err); color: var(--err); background: var(--err-soft); padding: 8px 12px; border-radius: 5px; font-size: 14px; }
footer.report-foot { margin-top: 30px; padding-top: 10px; border-top: 1px solid var(--rule); font-size: 12.5px; color: var(--muted); }
@media (max-width: 640px) { .page { padding: 0; } .sheet { border: 0; border-radius: 0; padding: 18px 14px; } }
@media print {
  html { background: #fff; }
  body { font-size: 10.5pt; }
  .page { max-width: none; padding: 0; }
  .sheet { border: 0; padding: 0; }
  a { color: inherit; }
  pre { max-height: none; overflow: visible; white-space: pre-wrap; word-break: break-word; }
  figure, table, .banner, .cautions, nav.contents { break-inside: avoid; }
  section.report-section > h2 { break-after: avoid; }
  .table-wrap { overflow: visible; }
}
@page { margin: 14mm 14mm 16mm; }
`;

const SEVERITY: Record<StatusLine['level'], number> = { error: 0, warning: 1, ok: 2 };
const TAG: Record<StatusLine['level'], string> = { error: 'Error', warning: 'Warning', ok: 'OK' };

/** Width and height from the PNG IHDR chunk (PNG specification, W3C 2003, 11.2.2). */
export function pngSize(bytes: Uint8Array): { widthPx: number; heightPx: number } {
  const signature = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  const isPng =
    bytes.length >= 24 &&
    signature.every((b, i) => bytes[i] === b) &&
    String.fromCharCode(bytes[12]!, bytes[13]!, bytes[14]!, bytes[15]!) === 'IHDR';
  if (!isPng) throw new RangeError('pngBytes: not a PNG file (the PNG signature and IHDR chunk are missing)');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return { widthPx: view.getUint32(16), heightPx: view.getUint32(20) };
}

function base64(bytes: Uint8Array): string {
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('base64');
}

function cellText(value: CellValue): string {
  if (value === null || value === undefined) return '\u2014';
  return typeof value === 'number' ? formatNumber(value) : value;
}

/** Paragraphs separated by blank lines; single newlines become line breaks. */
function paragraphsHtml(text: string): string {
  return text
    .split(/\n\s*\n/)
    .filter((p) => p.trim().length > 0)
    .map((p) => `<p class="block">${escapeMarkup(p.trim()).replace(/\n/g, '<br>')}</p>`)
    .join('\n');
}

function keyValueHtml(block: KeyValueTableBlock): string {
  const hasSecond = block.rows.some((r) => r.secondValue !== undefined);
  const hasNote = block.rows.some((r) => r.note !== undefined && r.note !== '');
  const valueCell = (value: CellValue | undefined, unit: string | undefined): string => {
    if (value === undefined) return '<td class="value missing"></td>';
    const u = unit ? `<span class="unit">${escapeMarkup(unit)}</span>` : '';
    return `<td class="value${value === null ? ' missing' : ''}">${escapeMarkup(cellText(value))}${value === null ? '' : u}</td>`;
  };
  const head =
    block.unitSystems !== undefined
      ? `<thead><tr><th scope="col">Quantity</th><th scope="col">${escapeMarkup(block.unitSystems.first)}</th>` +
        (hasSecond ? `<th scope="col">${escapeMarkup(block.unitSystems.second ?? '')}</th>` : '') +
        (hasNote ? '<th scope="col"></th>' : '') +
        '</tr></thead>'
      : '';
  const body = block.rows
    .map(
      (r) =>
        `<tr><th scope="row">${escapeMarkup(r.label)}</th>${valueCell(r.value, r.unit)}` +
        (hasSecond ? valueCell(r.secondValue, r.secondUnit) : '') +
        (hasNote ? `<td class="note">${escapeMarkup(r.note ?? '')}</td>` : '') +
        '</tr>',
    )
    .join('');
  const caption = block.caption ? `<caption>${escapeMarkup(block.caption)}</caption>` : '';
  return `<div class="block table-wrap"><table class="kv">${caption}${head}<tbody>${body}</tbody></table></div>`;
}

function tableHtml(block: TableBlock): string {
  const columnCount = block.columns.length;
  block.rows.forEach((row, i) => {
    if (row.length !== columnCount) {
      throw new RangeError(`rows[${i}]: has ${row.length} cells but the table has ${columnCount} columns`);
    }
  });
  // A column is numeric (right-aligned) when every filled cell holds a number.
  const numeric = block.columns.map((c, j) => {
    if (c.align) return c.align === 'right';
    const filled = block.rows.map((r) => r[j]).filter((v) => v !== null && v !== undefined);
    return filled.length > 0 && filled.every((v) => typeof v === 'number');
  });
  const head = block.columns
    .map(
      (c, j) =>
        `<th scope="col"${numeric[j] ? ' class="num"' : ''}>${escapeMarkup(c.header)}` +
        (c.unit ? `<span class="unit">${escapeMarkup(c.unit)}</span>` : '') +
        '</th>',
    )
    .join('');
  const body = block.rows
    .map(
      (row) =>
        '<tr>' +
        row
          .map((v, j) => {
            const cls = [numeric[j] ? 'num' : '', v === null ? 'missing' : ''].filter(Boolean).join(' ');
            return `<td${cls ? ` class="${cls}"` : ''}>${escapeMarkup(cellText(v))}</td>`;
          })
          .join('') +
        '</tr>',
    )
    .join('');
  const caption = block.caption ? `<caption>${escapeMarkup(block.caption)}</caption>` : '';
  return `<div class="block table-wrap"><table class="data">${caption}<thead><tr>${head}</tr></thead><tbody>${body}</tbody></table></div>`;
}

function imageHtml(block: ImageBlock): string {
  const { widthPx, heightPx } = pngSize(block.pngBytes);
  let style = '';
  if (block.displayWidthPx !== undefined) {
    if (!Number.isFinite(block.displayWidthPx) || block.displayWidthPx <= 0) {
      throw new RangeError(`displayWidthPx: expected a positive number of pixels, got ${block.displayWidthPx}`);
    }
    style = ` style="width:${Math.round(block.displayWidthPx)}px"`;
  }
  const cls = block.pixelated ? ' class="pixelated"' : '';
  const caption = block.caption ? `<figcaption>${escapeMarkup(block.caption)}</figcaption>` : '';
  return (
    `<figure class="block figure-image"><img${cls} src="data:image/png;base64,${base64(block.pngBytes)}" ` +
    `alt="${escapeMarkup(block.alt)}" width="${widthPx}" height="${heightPx}"${style}>${caption}</figure>`
  );
}

/** Inline SVG in HTML takes its namespace from the parser; dropping xmlns keeps the file free of any address. */
function inlineSvg(svg: string): string {
  return svg.split(' xmlns="http://www.w3.org/2000/svg"').join('');
}

function plotFigure(svg: string, caption: string | undefined): string {
  const cap = caption ? `<figcaption>${escapeMarkup(caption)}</figcaption>` : '';
  return `<figure class="block plot">${inlineSvg(svg)}${cap}</figure>`;
}

function figureHtml(block: FigureBlock): string {
  if (!/^<svg\b/.test(block.svg) || !block.svg.trimEnd().endsWith('</svg>')) {
    throw new RangeError('svg: expected one <svg> element from a figure builder');
  }
  return plotFigure(block.svg, block.caption);
}

function residualHistoryHtml(block: ResidualHistoryBlock, idPrefix: string): string {
  const n = block.residuals.length;
  const sweeps = new Float64Array(n);
  for (let k = 0; k < n; k++) sweeps[k] = k + 1;
  const svg = renderLinePlotSvg(
    {
      xAxis: { label: 'sweep' },
      yAxis: { label: block.residualLabel ?? 'residual', log: true },
      series: [
        {
          label: block.residualLabel ?? 'residual',
          x: sweeps,
          y: block.residuals,
          style: { marker: n <= 40 ? 'circle' : 'none' },
        },
      ],
      ...(block.tolerance !== undefined && block.tolerance > 0
        ? { horizontalMarkers: [{ at: block.tolerance, label: `tolerance ${formatScientific(block.tolerance, 3)}` }] }
        : {}),
      heightPx: 300,
    },
    { idPrefix },
  );
  return plotFigure(svg, block.caption);
}

/**
 * Frames stacked in one grid cell. A radio button per frame shows that frame (sibling
 * selectors); the play switch runs one CSS animation per frame, each visible for its slot of
 * the cycle (negative delays put frame k at k x frameMs into the cycle). No script, so the
 * page's Content-Security-Policy stays as strict as ever.
 */
function animationHtml(block: AnimationBlock, idPrefix: string): string {
  const n = block.frames.length;
  if (n === 0) throw new RangeError('frames: expected at least one frame');
  for (const f of block.frames) {
    if (!/^<svg\b/.test(f.svg) || !f.svg.trimEnd().endsWith('</svg>')) throw new RangeError('frames: expected one <svg> element per frame');
  }
  const frameMs = block.frameMs ?? 400;
  if (!(frameMs > 0) || !Number.isFinite(frameMs)) throw new RangeError(`frameMs: expected a positive number of milliseconds, got ${frameMs}`);
  const id = `anim-${idPrefix}`;
  const cycle = n * frameMs;
  const slot = 100 / n;
  const rules = [
    `#${id} .anim-frames { display: grid; }`,
    `#${id} .anim-frame { grid-area: 1 / 1; visibility: hidden; }`,
    `#${id} .anim-frame svg { display: block; max-width: 100%; height: auto; }`,
    `#${id} .anim-controls { display: flex; flex-wrap: wrap; gap: 4px; align-items: center; margin: 6px 0; font-size: 13px; }`,
    `#${id} .anim-controls label { cursor: pointer; padding: 1px 6px; border: 1px solid var(--rule); border-radius: 3px; }`,
    `#${id} input { position: absolute; opacity: 0; width: 1px; height: 1px; }`,
    `#${id} .anim-play { font-weight: 600; }`,
    `#${id} .anim-time { margin: 2px 0 4px; font-size: 14px; font-weight: 600; font-variant-numeric: tabular-nums; }`,
    `#${id} input.anim-play-switch:checked ~ .anim-controls .anim-play { background: var(--ok-soft); }`,
    `@keyframes ${id}-show { 0% { visibility: visible; } ${slot.toFixed(4)}% { visibility: hidden; } 100% { visibility: hidden; } }`,
  ];
  for (let k = 0; k < n; k++) {
    rules.push(`#${id} input.anim-pick-${k}:checked ~ .anim-frames .anim-frame-${k} { visibility: visible; }`);
    rules.push(`#${id} input.anim-pick-${k}:checked ~ .anim-controls .anim-label-${k} { background: var(--ok-soft); }`);
    const delay = -(((n - k) % n) * frameMs);
    rules.push(`#${id} input.anim-play-switch:checked ~ .anim-frames .anim-frame-${k} { animation: ${id}-show ${cycle}ms step-end ${delay}ms infinite; }`);
  }
  const inputs = [
    `<input type="checkbox" class="anim-play-switch" id="${id}-play">`,
    ...block.frames.map((_, k) => `<input type="radio" name="${id}" class="anim-pick-${k}" id="${id}-${k}"${k === 0 ? ' checked' : ''}>`),
  ].join('');
  const controls =
    `<div class="anim-controls"><label class="anim-play" for="${id}-play">play / pause</label>` +
    block.frames.map((f, k) => `<label class="anim-label-${k}" for="${id}-${k}" title="${escapeMarkup(f.label)}">${k + 1}</label>`).join('') +
    '</div>';
  const frames =
    '<div class="anim-frames">' +
    block.frames
      .map((f, k) => `<div class="anim-frame anim-frame-${k}" role="img" aria-label="${escapeMarkup(f.label)}"><p class="anim-time">${escapeMarkup(`${k + 1}/${n}: ${f.label}`)}</p>${inlineSvg(f.svg)}</div>`)
      .join('') +
    '</div>';
  const cap = block.caption ? `<figcaption>${escapeMarkup(block.caption)}</figcaption>` : '';
  return `<figure class="block animation" id="${id}"><style>${rules.join('\n')}</style>${inputs}${controls}${frames}${cap}</figure>`;
}

function cautionHtml(items: (CautionItem | string)[]): string {
  const list = items
    .map((item) =>
      typeof item === 'string'
        ? `<li>${escapeMarkup(item)}</li>`
        : `<li><strong>${escapeMarkup(item.title)}.</strong> ${escapeMarkup(item.text)}</li>`,
    )
    .join('');
  return `<div class="block cautions" role="note"><ul>${list}</ul></div>`;
}

function blockHtml(block: ReportBlock, idPrefix: string): string {
  switch (block.kind) {
    case 'paragraph':
      return paragraphsHtml(block.text);
    case 'keyValueTable':
      return keyValueHtml(block);
    case 'table':
      return tableHtml(block);
    case 'image':
      return imageHtml(block);
    case 'figure':
      return figureHtml(block);
    case 'linePlot':
      return plotFigure(renderLinePlotSvg(block, { idPrefix }), block.caption);
    case 'histogram':
      return plotFigure(renderHistogramSvg(block, { idPrefix }), block.caption);
    case 'cautionList':
      return cautionHtml(block.items);
    case 'codeBlock': {
      const cap = block.caption ? `<figcaption>${escapeMarkup(block.caption)}</figcaption>` : '';
      return `<figure class="block code">${cap}<pre><code>${escapeMarkup(block.code)}</code></pre></figure>`;
    }
    case 'residualHistory':
      return residualHistoryHtml(block, idPrefix);
    case 'animation':
      return animationHtml(block, idPrefix);
    default: {
      const unknown: { kind?: unknown } = block;
      throw new RangeError(`unknown block kind '${String(unknown.kind)}'`);
    }
  }
}

/** Anchor names: lower-case words joined by '-', made unique within the page. */
function anchorFor(section: ReportSection, used: Set<string>): string {
  const base =
    (section.anchor ?? section.heading)
      .toLowerCase()
      .normalize('NFKD')
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-+|-+$/g, '')
      .slice(0, 48) || 'section';
  let name = `s-${base}`;
  for (let k = 2; used.has(name); k++) name = `s-${base}-${k}`;
  used.add(name);
  return name;
}

/** "2025-03-14 09:26 UTC" from an ISO time stamp; unparseable text is shown as given. */
function createdText(iso: string): string {
  const t = Date.parse(iso);
  if (Number.isNaN(t)) return iso;
  const s = new Date(t).toISOString();
  return `${s.slice(0, 10)} ${s.slice(11, 16)} UTC`;
}

function bannerHtml(status: StatusLine): string {
  const role = status.level === 'error' ? ' role="alert"' : '';
  return (
    `<div class="banner banner-${status.level}"${role}><span class="banner-tag">${TAG[status.level]}</span>` +
    `<span class="banner-text">${escapeMarkup(status.text)}</span></div>`
  );
}

/**
 * The whole report as one HTML document. A block that cannot be drawn (bad data) is
 * replaced by a visible note naming the problem, and a warning banner says so: the rest
 * of the report is still written.
 */
export function renderReportHtml(doc: ReportDocument): string {
  const used = new Set<string>();
  const failures: string[] = [];
  let plotCount = 0;
  const sections = doc.sections.map((section) => {
    const anchor = anchorFor(section, used);
    const blocks = section.blocks.map((block, b) => {
      plotCount += 1;
      try {
        return blockHtml(block, `plot-${plotCount}`);
      } catch (err) {
        const message = err instanceof Error ? err.message : String(err);
        failures.push(`${section.heading}, block ${b + 1} (${block.kind})`);
        return `<div class="block block-error" role="note">This ${escapeMarkup(block.kind)} block could not be drawn: ${escapeMarkup(message)}</div>`;
      }
    });
    return { anchor, heading: section.heading, html: blocks.join('\n') };
  });

  const status: StatusLine[] = [...doc.status];
  if (failures.length > 0) {
    status.push({
      level: 'warning',
      text: `${failures.length} part${failures.length === 1 ? '' : 's'} of this report could not be drawn: ${failures.join('; ')}.`,
    });
  }
  status.sort((a, b) => SEVERITY[a.level] - SEVERITY[b.level]);

  const nav =
    sections.length > 0
      ? `<nav class="contents" aria-label="Contents"><h2>Contents</h2><ol>${sections
          .map((s) => `<li><a href="#${s.anchor}">${escapeMarkup(s.heading)}</a></li>`)
          .join('')}</ol></nav>`
      : '';
  const body = sections
    .map((s) => `<section class="report-section" id="${s.anchor}">\n<h2>${escapeMarkup(s.heading)}</h2>\n${s.html}\n</section>`)
    .join('\n');

  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${CONTENT_SECURITY_POLICY}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    '<meta name="generator" content="tiercake">',
    `<title>${escapeMarkup(doc.title)}</title>`,
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    '<div class="page"><div class="sheet">',
    '<header class="report-head">',
    '<p class="kicker">tiercake report</p>',
    `<h1>${escapeMarkup(doc.title)}</h1>`,
    doc.subtitle ? `<p class="subtitle">${escapeMarkup(doc.subtitle)}</p>` : '',
    `<p class="created">Created <time datetime="${escapeMarkup(doc.createdIso)}">${escapeMarkup(createdText(doc.createdIso))}</time></p>`,
    status.length > 0 ? `<div class="status">${status.map(bannerHtml).join('')}</div>` : '',
    '</header>',
    nav,
    '<main>',
    body,
    '</main>',
    doc.footer ? `<footer class="report-foot">${escapeMarkup(doc.footer)}</footer>` : '',
    '</div></div>',
    '</body>',
    '</html>',
    '',
  ]
    .filter((line) => line !== '')
    .join('\n')
    .concat('\n');
}
