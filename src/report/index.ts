// The HTML report: document model, renderer, SVG charts and standard cautions.
export type * from './reportModel.js';
export { renderReportHtml, pngSize } from './renderReport.js';
export { renderLinePlotSvg, renderHistogramSvg } from '../figures/svgPlot.js';
export type { SvgPlotOptions } from '../figures/svgPlot.js';
export {
  MEAN_FIELD_CAUTION,
  LASER_SAFETY_CAUTION,
  LOCAL_DENSITY_CAUTION,
  FINITE_TEMPERATURE_CAUTION,
  cautionsFor,
} from './cautions.js';
export type { CautionContext } from './cautions.js';
export { formatNumber, formatScientific } from './formatNumber.js';
export { escapeMarkup } from './escapeMarkup.js';
export { niceLinearTicks, niceLogTicks } from '../figures/axisTicks.js';
