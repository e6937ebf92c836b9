// The report document model: plain data that any command (solve, ensemble, compare,
// diagram) fills in and `renderReportHtml` turns into one self-contained HTML file.
// The model carries no HTML: every string is plain text and is escaped by the renderer,
// so a scenario name or a file path can never inject markup into the report.

import type { HistogramSpec, LinePlotSpec } from '../figures/plotSpec.js';

export type { AxisSpec, HistogramSeries, HistogramSpec, LinePlotSpec, LineSeries, PlotMarker, SeriesStyle } from '../figures/plotSpec.js';

/** How serious a status line is; `error` draws the red banner (e.g. "NOT CONVERGED"). */
export type StatusLevel = 'ok' | 'warning' | 'error';

export interface StatusLine {
  level: StatusLevel;
  text: string;
}

export interface ReportDocument {
  title: string;
  subtitle?: string;
  /** ISO 8601 time stamp supplied by the caller (the renderer never reads the clock). */
  createdIso: string;
  /** Shown as banners under the title, most serious first. */
  status: StatusLine[];
  sections: ReportSection[];
  /** Free text for the page foot, e.g. "tiercake 0.1.0, scenario configs/demo.json". */
  footer?: string;
}

export interface ReportSection {
  heading: string;
  /** Anchor name for the contents list; derived from the heading when absent. */
  anchor?: string;
  blocks: ReportBlock[];
}

export type ReportBlock =
  | ParagraphBlock
  | KeyValueTableBlock
  | TableBlock
  | ImageBlock
  | FigureBlock
  | LinePlotBlock
  | HistogramBlock
  | CautionListBlock
  | CodeBlock
  | ResidualHistoryBlock
  | AnimationBlock;

export interface ParagraphBlock {
  kind: 'paragraph';
  text: string;
}

/** A cell value: numbers are formatted by the renderer (see `formatNumber`). */
export type CellValue = string | number | null;

export interface KeyValueRow {
  label: string;
  value: CellValue;
  unit?: string;
  /** The same quantity in the second unit system (e.g. SI beside recoil units). */
  secondValue?: CellValue;
  secondUnit?: string;
  /** Short remark shown in a muted column (e.g. "from scenario", "derived"). */
  note?: string;
}

export interface KeyValueTableBlock {
  kind: 'keyValueTable';
  caption?: string;
  /** Column titles, e.g. { first: 'recoil units', second: 'SI' }. */
  unitSystems?: { first: string; second?: string };
  rows: KeyValueRow[];
}

export interface TableColumn {
  header: string;
  unit?: string;
  /** Numbers default to right alignment, text to left. */
  align?: 'left' | 'right';
}

export interface TableBlock {
  kind: 'table';
  caption?: string;
  columns: TableColumn[];
  rows: CellValue[][];
}

export interface ImageBlock {
  kind: 'image';
  /** Encoded PNG file bytes; embedded as a base64 data URI. */
  pngBytes: Uint8Array;
  alt: string;
  caption?: string;
  /** Display width in CSS pixels (never wider than the page). Default: natural size. */
  displayWidthPx?: number;
  /** Keep pixels square and sharp when scaled up (site-resolved maps). */
  pixelated?: boolean;
}

/** A figure built by src/figures (the same SVG its PNG file was rendered from), inlined. */
export interface FigureBlock {
  kind: 'figure';
  /** One `<svg>` element from a src/figures builder. */
  svg: string;
  caption?: string;
}

export interface LinePlotBlock extends LinePlotSpec {
  kind: 'linePlot';
  caption?: string;
}

export interface HistogramBlock extends HistogramSpec {
  kind: 'histogram';
  caption?: string;
}

export interface CautionItem {
  title: string;
  text: string;
}

export interface CautionListBlock {
  kind: 'cautionList';
  items: (CautionItem | string)[];
}

export interface CodeBlock {
  kind: 'codeBlock';
  caption?: string;
  code: string;
}

/** Residual against sweep number, drawn on a log axis with the tolerance line. */
export interface ResidualHistoryBlock {
  kind: 'residualHistory';
  /** residuals[k] is the residual after sweep k + 1. */
  residuals: ArrayLike<number>;
  tolerance?: number;
  /** Name of the residual, e.g. 'max |delta phi|'. */
  residualLabel?: string;
  caption?: string;
}

/**
 * A sequence of figures shown one at a time (e.g. the frames of an evolution): a row of
 * frame buttons steps through them and a play switch cycles them, in CSS alone (no script).
 */
export interface AnimationBlock {
  kind: 'animation';
  /** One `<svg>` element per frame from a src/figures builder, and its label (e.g. 't = 1.5 ms'). */
  frames: Array<{ svg: string; label: string }>;
  /** Display time of one frame while playing, milliseconds (default 400). */
  frameMs?: number;
  caption?: string;
}
