/**
 * Reports and static plots of network data: {@link renderReport} (one self-contained HTML file) and
 * {@link renderPlotSvg} (a static SVG figure).
 *
 * @module
 */

export { renderReport, defaultTableFrequencies, type ReportInput, type OverlayReportInput } from './html.js';
export { renderPlotSvg, type PlotSvgOptions } from './svg.js';
export { prepareOverlay, type Dataset, type Overlay, type OverlayPart } from './model.js';
export {
  resistanceCircle,
  reactanceCircle,
  reactanceRimPoint,
  conductanceCircle,
  susceptanceCircle,
  gammaToImpedance,
  type GammaCircle,
} from './smith.js';
