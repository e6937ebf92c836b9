// The figure stack: every figure is built as SVG from plain data (scales map values to
// pixels, marks draw, axes and legends come from the scales) and turned into PNG only at
// the edge, by svgToPng. The HTML report inlines the same SVG strings.
export { renderLinePlotSvg } from './linePlotSvg.js';
export { renderHistogramSvg } from './histogramSvg.js';
export { renderFieldMapSvg, resolveColorScale, type FieldMapSpec } from './fieldMapSvg.js';
export { renderPhaseMapSvg, type PhaseMapSpec } from './phaseMapSvg.js';
export { sideBySideSvg, svgSize } from './composeSvg.js';
export { svgToPng, type PngOptions } from './svgToPng.js';
export type { GridAxis, OverlayLine, ScaleBar, GridFigureSpec } from './gridFrame.js';
export type * from './plotSpec.js';
export { colorMapNames, colorMapDescription, type ColorMapName } from './colorMaps.js';
