// Figures placed side by side in one SVG: each figure keeps its own coordinate system as
// a nested <svg> at its offset (SVG 1.1, section 5.1.2), top-aligned on a white page.

import { FIGURE_COLORS } from './figurePalette.js';
import { escapeMarkup } from './escapeMarkup.js';

/** Width and height of a figure from its root element. */
export function svgSize(svg: string): { width: number; height: number } {
  const root = /^<svg\b[^>]*>/.exec(svg)?.[0] ?? '';
  const width = Number(/\swidth="([\d.]+)"/.exec(root)?.[1]);
  const height = Number(/\sheight="([\d.]+)"/.exec(root)?.[1]);
  if (!(width > 0) || !(height > 0)) throw new Error('svgSize: the figure has no width and height on its root <svg> element');
  return { width, height };
}

/** Figures left to right with `gapPx` between them, as one `<svg>`. */
export function sideBySideSvg(figures: readonly string[], title: string, gapPx = 16): string {
  if (figures.length === 0) throw new Error('sideBySideSvg: expected at least one figure');
  const sizes = figures.map(svgSize);
  const width = sizes.reduce((w, s) => w + s.width, 0) + gapPx * (figures.length - 1);
  const height = sizes.reduce((h, s) => Math.max(h, s.height), 0);
  const parts = [
    `<svg xmlns="http://www.w3.org/2000/svg" class="tc-plot tc-row" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img">`,
    `<title>${escapeMarkup(title)}</title>`,
    `<rect x="0" y="0" width="${width}" height="${height}" fill="${FIGURE_COLORS.background}"/>`,
  ];
  let x = 0;
  figures.forEach((svg, i) => {
    // The nested root keeps its attributes; only its position is added.
    parts.push(svg.replace(/^<svg\b/, `<svg x="${x}" y="0"`).replace(' xmlns="http://www.w3.org/2000/svg"', ''));
    x += sizes[i]!.width + gapPx;
  });
  parts.push('</svg>');
  return parts.join('\n');
}
