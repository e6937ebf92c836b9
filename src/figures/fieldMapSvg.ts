// Heat maps of 2D fields (site densities, camera pictures, parameter planes) as SVG: the
// field as an embedded pixel image through a colour map, axes in the caller's units, a
// colour bar drawn from the same colour scale, optional overlay curves and a scale bar.
// Missing values (NaN, +-Infinity) are drawn in a neutral grey.
//
// Colour scale: linear by default, from the data range (symmetric about zero for the
// diverging map; from zero for a non-negative field that nearly reaches it), or the
// caller's fixed range with values outside drawn at the ends.
// A logarithmic scale (for pictures with a large dynamic range, e.g. time of flight)
// runs from the largest value down `logDecades` decades (default 4), or from the smallest
// positive value if that is higher; values at or below its bottom get the map's low end.

import { colorMapNames, isDivergingColorMap, type ColorMapName } from './colorMaps.js';
import { fieldRgba, type ColorScale, type ColorScaleKind } from './fieldPixels.js';
import { buildGridFrame, checkGrid, pixelsPerSiteOf, type GridFigureSpec } from './gridFrame.js';
import { COLOR_BAR_GAP_PX, colorBarMarkup, planColorBar } from './colorBar.js';
import { openSvg, resolveIds } from './svgMarkup.js';
import type { SvgFigureOptions } from './plotSpec.js';

export interface FieldMapSpec extends GridFigureSpec {
  /** nx * ny values, value(x, y) = values[x * ny + y]. */
  values: ArrayLike<number>;
  /** Colour map name (default 'ember'; see colorMapNames). */
  colorMap?: string;
  /** Fixed value range of the colour scale; values outside are drawn at the ends. */
  valueRange?: { min: number; max: number };
  /** Automatic range symmetric about zero (default: true for diverging maps). */
  symmetricRange?: boolean;
  /** 'linear' (default) or 'log'. */
  colorScale?: ColorScaleKind;
  /** Decades shown by an automatic log scale (default 4). */
  logDecades?: number;
  /** Title of the colour bar, with unit. */
  colorBarLabel?: string;
}

function finiteRange(values: ArrayLike<number>): { min: number; max: number; minPositive: number } | null {
  let min = Infinity;
  let max = -Infinity;
  let minPositive = Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (!Number.isFinite(v)) continue;
    if (v < min) min = v;
    if (v > max) max = v;
    if (v > 0 && v < minPositive) minPositive = v;
  }
  return min <= max ? { min, max, minPositive } : null;
}

/** The colour scale a spec asks for, resolved against its data. */
export function resolveColorScale(spec: FieldMapSpec): ColorScale {
  const mapName = spec.colorMap ?? 'ember';
  const kind = spec.colorScale ?? 'linear';
  if (spec.valueRange) {
    const { min, max } = spec.valueRange;
    if (!Number.isFinite(min) || !Number.isFinite(max) || !(max > min)) {
      throw new Error(`valueRange: expected finite min < max, got [${min}, ${max}]`);
    }
    if (kind === 'log' && !(min > 0)) throw new Error(`valueRange: a log colour scale needs min > 0, got ${min}`);
    return { kind, min, max };
  }
  const r = finiteRange(spec.values);
  if (kind === 'log') {
    const decades = spec.logDecades ?? 4;
    if (!(decades > 0) || !Number.isFinite(decades)) throw new Error(`logDecades: expected a positive number, got ${decades}`);
    if (!r || !(r.max > 0)) return { kind, min: 0.1, max: 1 };
    const low = Math.max(r.minPositive, r.max / 10 ** decades);
    return { kind, min: low < r.max ? low : r.max / 10, max: r.max };
  }
  if (!r) return { kind, min: 0, max: 1 };
  if (spec.symmetricRange ?? isDivergingColorMap(mapName as ColorMapName)) {
    const m = Math.max(Math.abs(r.min), Math.abs(r.max));
    return m > 0 ? { kind, min: -m, max: m } : { kind, min: -1, max: 1 };
  }
  if (r.min === r.max) {
    const pad = r.min === 0 ? 1 : Math.abs(r.min) * 0.05;
    return { kind, min: r.min - pad, max: r.max + pad };
  }
  // A non-negative field whose smallest value is close to zero (an empty edge around a
  // cloud) starts its scale at zero, so the bar's low end reads "nothing there".
  if (r.min >= 0 && r.min < 0.05 * r.max) return { kind, min: 0, max: r.max };
  return { kind, min: r.min, max: r.max };
}

/** A heat map of a scalar field with its colour bar, as one `<svg>`. */
export function renderFieldMapSvg(spec: FieldMapSpec, options: SvgFigureOptions = {}): string {
  checkGrid(spec.values.length, spec.nx, spec.ny, 'field map');
  const mapName = spec.colorMap ?? 'ember';
  if (!colorMapNames.includes(mapName as ColorMapName)) {
    throw new Error(`colorMap: '${mapName}' is unknown; choose one of: ${colorMapNames.join(', ')}`);
  }
  const scale = resolveColorScale(spec);
  const k = pixelsPerSiteOf(spec);
  const plan = planColorBar(scale, spec.nx * k, spec.ny * k, spec.colorBarLabel ?? '');
  const rgba = fieldRgba(spec.values, spec.nx, spec.ny, mapName, scale);
  const frame = buildGridFrame(spec, rgba, plan.panel);
  const bar = plan.horizontal
    ? colorBarMarkup(plan, mapName, scale, Math.round(frame.image.x + (frame.image.width - plan.lengthPx) / 2), frame.panelBelowY + 10)
    : colorBarMarkup(plan, mapName, scale, frame.panelX + COLOR_BAR_GAP_PX, frame.image.y);
  const out = openSvg({ width: frame.width, height: frame.height, title: spec.title ?? 'field map', className: 'tc-map' });
  out.push(...frame.markup, ...bar, '</svg>');
  return resolveIds(out.join('\n'), options.idPrefix);
}
