// Sizes shared by every figure, in CSS pixels of the SVG (= PNG pixels at scale 1). Text
// sizes follow common practice for figures read on screen and on A4 paper at about
// 100 % (tick labels 12 px, axis titles 13 px, titles 15 px).

export const FIGURE_TEXT = {
  tickPx: 12,
  axisPx: 13,
  titlePx: 15,
  legendPx: 12,
  /** Notes inside a plot (hidden points, scale-bar label). */
  notePx: 11,
} as const;

export const FIGURE_SIZES = {
  /** Empty border around a figure. */
  paddingPx: 12,
  tickPx: 5,
  minorTickPx: 3,
  /** Between a tick and its label. */
  tickGapPx: 3,
  /** Between tick labels and the axis title. */
  titleGapPx: 7,
  /** Between the title line and what is below it. */
  titleBelowPx: 10,
  /** Least free space between neighbouring tick labels. */
  labelSpacingPx: 8,
} as const;
