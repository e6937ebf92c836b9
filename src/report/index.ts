// The HTML report: document model, renderer, SVG charts and standard cautions.
export type * from './reportModel.js';
export { renderReportHtml, pngSize } from './renderReport.js';
export { renderLinePlotSvg } from '../figures/linePlotSvg.js';
export { renderHistogramSvg } from '../figures/histogramSvg.js';
export type { SvgFigureOptions } from '../figures/plotSpec.js';
export {
  MEAN_FIELD_CAUTION,
  LASER_SAFETY_CAUTION,
  LOCAL_DENSITY_CAUTION,
  FINITE_TEMPERATURE_CAUTION,
  cautionsFor,
} from './cautions.js';
export type { CautionContext } from './cautions.js';
export { formatNumber, formatScientific } from '../figures/formatNumber.js';
export { escapeMarkup } from '../figures/escapeMarkup.js';
