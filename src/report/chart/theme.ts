// The frame of every rendered chart: font stack, background, axes and legends (series styles are the block library's).
import type { Config } from 'vega-lite';
import { seriesColours } from '../../blocks/chartStyle.ts';

/**
 * Fonts named in every SVG. Liberation Sans comes first because its widths match the character-width
 * estimate Vega uses for label layout when no canvas is available, so labels neither overlap nor drift.
 */
export const chartFontStack = '"Liberation Sans", "Helvetica Neue", Arial, sans-serif';

/** Defaults applied under every spec; a spec's own config still wins. */
export const chartBaseConfig: Config = {
  font: chartFontStack,
  background: '#ffffff',
  padding: 8,
  view: { stroke: '#9aa5ad', strokeWidth: 0.75 },
  title: { fontSize: 13, fontWeight: 'bold', anchor: 'start', color: '#1b1b1b', offset: 8 },
  axis: {
    labelFontSize: 10,
    titleFontSize: 11,
    titleFontWeight: 'normal',
    labelColor: '#2b2b2b',
    titleColor: '#1b1b1b',
    domainColor: '#5c666d',
    tickColor: '#5c666d',
    gridColor: '#e3e7ea',
    gridDash: [2, 2],
  },
  legend: { labelFontSize: 10, titleFontSize: 10, symbolStrokeWidth: 1.6, orient: 'bottom', direction: 'horizontal', labelLimit: 280, columns: 3 },
  range: { category: [...seriesColours] },
  line: { strokeWidth: 1.6 },
  point: { size: 36, filled: true },
};
