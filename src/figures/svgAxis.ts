// Axes drawn from scales: outward tick marks with labels on one side of a frame, the
// band of space they take, and the choice of how many ticks fit without overlapping
// labels. Positions come from the scale; this file knows no data.

import { scaleTicks, type AxisTicks, type Scale } from './scales.js';
import { capHeightPx, descentPx, textWidthPx } from './textMeasure.js';
import { FIGURE_SIZES, FIGURE_TEXT } from './figureStyle.js';
import { FIGURE_COLORS } from './figurePalette.js';
import { escapeMarkup } from './escapeMarkup.js';
import { px, svgText } from './svgMarkup.js';

export type AxisSide = 'bottom' | 'left' | 'right';

/** Whether neighbouring labels of `ticks` on `side` keep the least spacing. */
export function labelsFit(scale: Scale, ticks: AxisTicks, side: AxisSide, fontPx: number = FIGURE_TEXT.tickPx): boolean {
  for (let i = 1; i < ticks.major.length; i++) {
    const gap = Math.abs(scale.map(ticks.major[i]!) - scale.map(ticks.major[i - 1]!));
    const need =
      side === 'bottom'
        ? (textWidthPx(ticks.labels[i]!, fontPx) + textWidthPx(ticks.labels[i - 1]!, fontPx)) / 2 + FIGURE_SIZES.labelSpacingPx
        : capHeightPx(fontPx) + FIGURE_SIZES.labelSpacingPx / 2;
    if (gap < need) return false;
  }
  return true;
}

/**
 * Ticks of `scale` aiming at one per `pixelsPerTick` of its length, with fewer asked
 * of d3 until the labels no longer collide (at least one tick remains).
 */
export function fittingTicks(scale: Scale, side: AxisSide, pixelsPerTick: number, fontPx: number = FIGURE_TEXT.tickPx): AxisTicks {
  const length = Math.abs(scale.range[1] - scale.range[0]);
  let count = Math.max(2, Math.round(length / pixelsPerTick));
  let ticks = scaleTicks(scale, count);
  while (count > 1 && !labelsFit(scale, ticks, side, fontPx)) {
    count -= 1;
    ticks = scaleTicks(scale, count);
  }
  if (!labelsFit(scale, ticks, side, fontPx)) {
    // Even d3's coarsest choice collides (long labels on a short axis): keep every other.
    while (ticks.major.length > 1 && !labelsFit(scale, ticks, side, fontPx)) {
      ticks = { ...ticks, major: ticks.major.filter((_, i) => i % 2 === 0), labels: ticks.labels.filter((_, i) => i % 2 === 0) };
    }
  }
  return ticks;
}

/** Thickness of the band outside the frame that ticks and labels take on `side`. */
export function axisBandPx(ticks: AxisTicks, side: AxisSide, fontPx: number = FIGURE_TEXT.tickPx): number {
  const { tickPx, tickGapPx } = FIGURE_SIZES;
  if (side === 'bottom') return tickPx + tickGapPx + capHeightPx(fontPx) + descentPx(fontPx);
  const widest = ticks.labels.reduce((w, l) => Math.max(w, textWidthPx(l, fontPx)), 0);
  return tickPx + tickGapPx + widest;
}

export interface AxisDrawing {
  scale: Scale;
  ticks: AxisTicks;
  side: AxisSide;
  /** Coordinate of the frame line the ticks stand on (y for 'bottom', x otherwise). */
  edgePx: number;
  /** Name written into data-axis (tests read ticks back by it). */
  name: string;
  fontPx?: number;
}

/** Tick marks and labels of one axis. */
export function axisMarkup(a: AxisDrawing): string[] {
  const fontPx = a.fontPx ?? FIGURE_TEXT.tickPx;
  const { tickPx, minorTickPx, tickGapPx } = FIGURE_SIZES;
  const ink = FIGURE_COLORS.ink;
  const stroke = FIGURE_COLORS.mutedInk;
  const out: string[] = [];
  const sign = a.side === 'left' ? -1 : 1;
  a.ticks.major.forEach((v, i) => {
    const p = a.scale.map(v);
    const label = a.ticks.labels[i]!;
    const data = `data-axis="${escapeMarkup(a.name)}" data-value="${escapeMarkup(String(v))}"`;
    if (a.side === 'bottom') {
      out.push(
        `<line class="tick" ${data} x1="${px(p)}" y1="${px(a.edgePx)}" x2="${px(p)}" y2="${px(a.edgePx + tickPx)}" stroke="${stroke}"/>`,
        svgText(label, p, a.edgePx + tickPx + tickGapPx + capHeightPx(fontPx), { sizePx: fontPx, anchor: 'middle', color: ink, className: 'tick-label' }),
      );
    } else {
      const x2 = a.edgePx + sign * tickPx;
      out.push(
        `<line class="tick" ${data} x1="${px(a.edgePx)}" y1="${px(p)}" x2="${px(x2)}" y2="${px(p)}" stroke="${stroke}"/>`,
        svgText(label, x2 + sign * tickGapPx, p + capHeightPx(fontPx) / 2, {
          sizePx: fontPx,
          anchor: a.side === 'left' ? 'end' : 'start',
          color: ink,
          className: 'tick-label',
        }),
      );
    }
  });
  for (const v of a.ticks.minor) {
    const p = a.scale.map(v);
    if (!Number.isFinite(p)) continue;
    out.push(
      a.side === 'bottom'
        ? `<line class="tick-minor" data-axis="${escapeMarkup(a.name)}" x1="${px(p)}" y1="${px(a.edgePx)}" x2="${px(p)}" y2="${px(a.edgePx + minorTickPx)}" stroke="${stroke}"/>`
        : `<line class="tick-minor" data-axis="${escapeMarkup(a.name)}" x1="${px(a.edgePx)}" y1="${px(p)}" x2="${px(a.edgePx + sign * minorTickPx)}" y2="${px(p)}" stroke="${stroke}"/>`,
    );
  }
  return out;
}

/** Half the width of the first and last bottom labels: how far they reach past the axis ends. */
export function bottomLabelOverhang(scale: Scale, ticks: AxisTicks, fontPx: number = FIGURE_TEXT.tickPx): { left: number; right: number } {
  const lo = Math.min(scale.range[0], scale.range[1]);
  const hi = Math.max(scale.range[0], scale.range[1]);
  let left = 0;
  let right = 0;
  ticks.major.forEach((v, i) => {
    const p = scale.map(v);
    const half = textWidthPx(ticks.labels[i]!, fontPx) / 2;
    left = Math.max(left, lo - (p - half));
    right = Math.max(right, p + half - hi);
  });
  return { left, right };
}
