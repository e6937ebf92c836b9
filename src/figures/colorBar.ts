// The colour bar of a heat map, a legend drawn from the colour scale: a strip of the map
// (an embedded 1-pixel-wide image, one map entry per pixel, the map's ends at the bar's
// ends), its frame, ticks and labels from the same scale, and its title. Vertical beside
// the image, or horizontal under a flat strip of sites.

import { createScale, type AxisTicks, type Scale } from './scales.js';
import { axisBandPx, axisMarkup, fittingTicks } from './svgAxis.js';
import { ascentPx, descentPx } from './textMeasure.js';
import { FIGURE_SIZES, FIGURE_TEXT } from './figureStyle.js';
import { FIGURE_COLORS } from './figurePalette.js';
import { px, svgText } from './svgMarkup.js';
import { colorStripRgba, pngDataUri, type ColorScale } from './fieldPixels.js';
import type { PanelSpace } from './gridFrame.js';
import { fitText } from './textFit.js';

export const COLOR_BAR_GAP_PX = 18;
export const COLOR_BAR_THICKNESS_PX = 16;
export const MIN_COLOR_BAR_PX = 160;

export interface ColorBarLayout {
  horizontal: boolean;
  lengthPx: number;
  ticks: AxisTicks;
  title: string;
  titlePx: number;
  panel: PanelSpace;
}

function barScale(scale: ColorScale, from: number, to: number): Scale {
  return createScale(scale.kind, [scale.min, scale.max], [from, to], 'colour scale');
}

/**
 * Plan the bar for an image of imgW x imgH pixels: a flat image (a strip of a few sites)
 * gets a horizontal bar below it instead of a stubby vertical one.
 */
export function planColorBar(scale: ColorScale, imgW: number, imgH: number, title: string): ColorBarLayout {
  const horizontal = imgH < MIN_COLOR_BAR_PX && imgW >= 2 * MIN_COLOR_BAR_PX;
  const lengthPx = horizontal ? Math.min(imgW, 360) : Math.max(imgH, MIN_COLOR_BAR_PX);
  const ticks = horizontal
    ? fittingTicks(barScale(scale, 0, lengthPx), 'bottom', 80)
    : fittingTicks(barScale(scale, lengthPx, 0), 'right', 60);
  const axisPx = FIGURE_TEXT.axisPx;
  const fitted = fitText(title, lengthPx, axisPx);
  const titlePx = fitted.fontPx;
  const titleBand = title ? FIGURE_SIZES.titleGapPx + ascentPx(titlePx) + descentPx(titlePx) : 0;
  const thickness = COLOR_BAR_THICKNESS_PX;
  const panel: PanelSpace = horizontal
    ? {
        rightWidth: 0,
        rightHeight: 0,
        bottomHeight: 10 + thickness + axisBandPx(ticks, 'bottom') + (title || ticks.note ? FIGURE_SIZES.titleGapPx + ascentPx(axisPx) + descentPx(axisPx) : 0),
        bottomWidth: lengthPx,
        topNote: false,
      }
    : {
        rightWidth: COLOR_BAR_GAP_PX + thickness + axisBandPx(ticks, 'right') + titleBand,
        rightHeight: lengthPx,
        bottomHeight: 0,
        bottomWidth: 0,
        topNote: ticks.note !== '',
      };
  return { horizontal, lengthPx, ticks, title: fitted.text, titlePx, panel };
}

/** The bar's markup. (x, y) is the top-left corner of the strip. */
export function colorBarMarkup(plan: ColorBarLayout, mapName: string, scale: ColorScale, x: number, y: number): string[] {
  const t = COLOR_BAR_THICKNESS_PX;
  const L = plan.lengthPx;
  const strip = colorStripRgba(mapName, Math.max(2, Math.round(L)), plan.horizontal);
  const w = plan.horizontal ? L : t;
  const h = plan.horizontal ? t : L;
  const out: string[] = [
    `<g class="color-bar" data-map="${mapName}" data-min="${scale.min}" data-max="${scale.max}" data-scale="${scale.kind}">`,
    `<image class="color-strip" x="${px(x)}" y="${px(y)}" width="${px(w)}" height="${px(h)}" preserveAspectRatio="none" image-rendering="optimizeSpeed" href="${pngDataUri(strip.width, strip.height, strip.rgba)}"/>`,
    `<rect x="${px(x - 0.5)}" y="${px(y - 0.5)}" width="${px(w + 1)}" height="${px(h + 1)}" fill="none" stroke="${FIGURE_COLORS.ink}" stroke-width="1"/>`,
  ];
  const tickPx = FIGURE_TEXT.tickPx;
  if (plan.horizontal) {
    const s = barScale(scale, x, x + L);
    out.push(...axisMarkup({ scale: s, ticks: plan.ticks, side: 'bottom', edgePx: y + t + 0.5, name: 'color' }));
    const base = y + t + axisBandPx(plan.ticks, 'bottom') + FIGURE_SIZES.titleGapPx + ascentPx(plan.titlePx);
    if (plan.title) out.push(svgText(plan.title, x + L / 2, base, { sizePx: plan.titlePx, anchor: 'middle', className: 'axis-label' }));
    if (plan.ticks.note) out.push(svgText(plan.ticks.note, x + L, base, { sizePx: tickPx, anchor: 'end', color: FIGURE_COLORS.mutedInk, className: 'axis-note' }));
  } else {
    const s = barScale(scale, y + L, y);
    out.push(...axisMarkup({ scale: s, ticks: plan.ticks, side: 'right', edgePx: x + t + 0.5, name: 'color' }));
    if (plan.ticks.note) out.push(svgText(plan.ticks.note, x, y - descentPx(tickPx) - 3, { sizePx: tickPx, color: FIGURE_COLORS.mutedInk, className: 'axis-note' }));
    if (plan.title) {
      const tx = x + t + axisBandPx(plan.ticks, 'right') + FIGURE_SIZES.titleGapPx + ascentPx(plan.titlePx);
      out.push(svgText(plan.title, tx, y + L / 2, { sizePx: plan.titlePx, anchor: 'middle', rotateDeg: -90, className: 'axis-label' }));
    }
  }
  out.push('</g>');
  return out;
}
