// Plain-data descriptions of x-y figures (line plots and histograms): what the caller
// hands to renderLinePlotSvg / renderHistogramSvg, and what the report model embeds in
// its plot blocks. Units go into `unit` and are printed in parentheses after the label.

export interface AxisSpec {
  label: string;
  unit?: string;
  log?: boolean;
  /** Fixed axis range; default: the data range extended to nice tick values. */
  min?: number;
  max?: number;
}

export interface SeriesStyle {
  /** '#rgb' or '#rrggbb'; anything else falls back to the palette colour. */
  color?: string;
  line?: 'solid' | 'dashed' | 'dotted' | 'none';
  marker?: 'none' | 'circle' | 'square';
}

export interface LineSeries {
  label: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Symmetric one-sigma error bars, same length as y. */
  yErr?: ArrayLike<number>;
  /** Half-width of a shaded band y +- band around the line (e.g. a model's uncertainty), same length as y. */
  band?: ArrayLike<number>;
  style?: SeriesStyle;
}

export interface PlotMarker {
  /** Position along the axis the marker crosses (x for vertical markers). */
  at: number;
  label?: string;
}

export interface LinePlotSpec {
  title?: string;
  xAxis: AxisSpec;
  yAxis: AxisSpec;
  series: LineSeries[];
  /** Vertical lines, e.g. shell radii. */
  verticalMarkers?: PlotMarker[];
  /** Horizontal lines, e.g. a convergence tolerance. */
  horizontalMarkers?: PlotMarker[];
  widthPx?: number;
  heightPx?: number;
}

export interface HistogramSeries {
  label: string;
  /** counts[i] belongs to the bin [binEdges[i], binEdges[i+1]). */
  counts: ArrayLike<number>;
  color?: string;
}

export interface HistogramSpec {
  title?: string;
  /** Bin edges shared by all series, strictly increasing, length = counts + 1. */
  binEdges: ArrayLike<number>;
  series: HistogramSeries[];
  xAxis: AxisSpec;
  yAxis: AxisSpec;
  widthPx?: number;
  heightPx?: number;
}

/** Options of every SVG figure builder. */
export interface SvgFigureOptions {
  /** Prefix for element ids (clip paths, titles); default: a hash of the figure's markup. */
  idPrefix?: string;
}

/** "label (unit)", or the label alone. */
export function axisTitle(axis: AxisSpec): string {
  return axis.unit ? `${axis.label} (${axis.unit})` : axis.label;
}
