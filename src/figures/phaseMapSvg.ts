// Phase maps as SVG: every site painted with the colour of its phase (phasePalette.ts),
// Mott sites by their filling, and a legend listing the phases present, in the order
// superfluid, Mott shells by filling, Bose glass, normal fluid, empty.

import { buildGridFrame, checkGrid, type GridFigureSpec } from './gridFrame.js';
import { siteColorsRgba } from './fieldPixels.js';
import { isPhaseCode, mottShadeCount, phaseColor, phaseLabel, PhaseCode } from './phasePalette.js';
import { FIGURE_COLORS, hexColor, type Rgb8 } from './figurePalette.js';
import { FIGURE_TEXT } from './figureStyle.js';
import { capHeightPx, textWidthPx } from './textMeasure.js';
import { openSvg, px, resolveIds, svgText } from './svgMarkup.js';
import type { SvgFigureOptions } from './plotSpec.js';

export interface PhaseMapSpec extends GridFigureSpec {
  /** A PhaseCode per site, value(x, y) at [x * ny + y]. */
  phase: ArrayLike<number>;
  /** Mott filling per site (read only at Mott sites). */
  filling: ArrayLike<number>;
  /** Title above the legend (default 'phase'). */
  legendTitle?: string;
}

const LEGEND_GAP_PX = 18;
const ROW_PX = 19;
const SWATCH_PX = 12;

/** A phase map with its legend, as one `<svg>`. */
export function renderPhaseMapSvg(spec: PhaseMapSpec, options: SvgFigureOptions = {}): string {
  const { nx, ny, phase, filling } = spec;
  checkGrid(phase.length, nx, ny, 'phase map');
  if (filling.length !== phase.length) {
    throw new Error(`phase map: filling has ${filling.length} values but phase has ${phase.length}; pass one filling per site`);
  }
  const seenPhase = new Uint8Array(5);
  const seenFilling = new Uint8Array(mottShadeCount + 1);
  const rgba = siteColorsRgba(nx, ny, (x, y): Rgb8 => {
    const i = x * ny + y;
    const code = phase[i]!;
    if (!isPhaseCode(code)) throw new Error(`phase map: site (x = ${x}, y = ${y}) has unknown phase code ${code}; expected 0..4`);
    let n = 0;
    if (code === PhaseCode.mott) {
      n = filling[i]!;
      if (!Number.isInteger(n) || n < 1) throw new Error(`phase map: Mott site (x = ${x}, y = ${y}) has filling ${n}; expected an integer >= 1`);
      n = Math.min(n, mottShadeCount);
      seenFilling[n] = 1;
    } else {
      seenPhase[code] = 1;
    }
    return phaseColor(code, n);
  });
  const entries: { color: Rgb8; label: string }[] = [];
  const add = (code: PhaseCode, n: number): void => {
    entries.push({ color: phaseColor(code, n), label: phaseLabel(code, n) });
  };
  if (seenPhase[PhaseCode.superfluid]) add(PhaseCode.superfluid, 0);
  for (let n = 1; n <= mottShadeCount; n++) if (seenFilling[n]) add(PhaseCode.mott, n);
  for (const code of [PhaseCode.boseGlass, PhaseCode.normalFluid, PhaseCode.empty]) if (seenPhase[code]) add(code, 0);

  const title = spec.legendTitle ?? 'phase';
  const fontPx = FIGURE_TEXT.legendPx;
  const labelsW = entries.reduce((w, e) => Math.max(w, textWidthPx(e.label, fontPx)), 0);
  const width = LEGEND_GAP_PX + Math.max(SWATCH_PX + 7 + labelsW, title ? textWidthPx(title, fontPx) : 0);
  const height = (title ? ROW_PX : 0) + entries.length * ROW_PX;
  const frame = buildGridFrame(spec, rgba, { rightWidth: width, rightHeight: height, bottomHeight: 0, bottomWidth: 0, topNote: false });

  const lx = frame.panelX + LEGEND_GAP_PX;
  let ly = frame.image.y;
  const legend: string[] = ['<g class="legend">'];
  const mid = (rowTop: number): number => rowTop + ROW_PX / 2 + capHeightPx(fontPx) / 2 - 1;
  if (title) {
    legend.push(svgText(title, lx, mid(ly), { sizePx: fontPx, color: FIGURE_COLORS.mutedInk }));
    ly += ROW_PX;
  }
  for (const e of entries) {
    const top = ly + (ROW_PX - SWATCH_PX) / 2 - 1;
    legend.push(
      `<g class="legend-entry"><rect x="${px(lx)}" y="${px(top)}" width="${SWATCH_PX}" height="${SWATCH_PX}" fill="${hexColor(e.color)}" stroke="${FIGURE_COLORS.swatchEdge}" stroke-width="0.8"/>` +
        svgText(e.label, lx + SWATCH_PX + 7, mid(ly), { sizePx: fontPx }) +
        '</g>',
    );
    ly += ROW_PX;
  }
  legend.push('</g>');
  const out = openSvg({ width: frame.width, height: frame.height, title: spec.title ?? 'phase map', className: 'tc-map' });
  out.push(...frame.markup, ...legend, '</svg>');
  return resolveIds(out.join('\n'), options.idPrefix);
}
