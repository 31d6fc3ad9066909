// Public entry of chart support: Vega-Lite to SVG rendering and the ready-made study charts.
export { renderChartSvg, type RenderChartOptions } from './render.ts';
export {
  voltageProfileChart,
  pvCurveChart,
  powerAngleChart,
  svcCharacteristicChart,
  svcCharacteristicCorners,
  stabilityMarginPercent,
  loadabilityChart,
  type ChartSpec,
  type VoltageProfileInput,
  type PvCurveInput,
  type PowerAngleInput,
  type SvcCharacteristicInput,
  type SvcCharacteristicCorners,
  type LoadabilityInput,
} from './builders.ts';
export { ChartSpecError, ChartInputError, type ChartSpecErrorCode, type ChartInputErrorCode } from './errors.ts';
export { chartFontStack, seriesColours, seriesDashes, seriesShapes } from './theme.ts';
