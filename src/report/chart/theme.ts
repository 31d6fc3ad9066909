// The kvarbook chart look: font stack, calm palette and black-and-white-safe series styles.
import type { Config } from 'vega-lite';

/**
 * Fonts named in every SVG. Liberation Sans comes first because its widths match the character-width
 * estimate Vega uses for label layout when no canvas is available, so labels neither overlap nor drift.
 */
export const chartFontStack = '"Liberation Sans", "Helvetica Neue", Arial, sans-serif';

/**
 * Series colours: muted, distinguishable in print, and still different in lightness so a greyscale
 * copy keeps them apart. Order matters: the first series gets the darkest, most neutral colour.
 */
export const seriesColours = ['#1d3f5e', '#b0532b', '#2f7a57', '#6b4f8f', '#8a6a1c', '#4f6b78'] as const;

/** Stroke dash patterns per series so that lines stay distinct when printed in black and white. */
export const seriesDashes: number[][] = [
  [1, 0],
  [7, 3],
  [2, 2],
  [9, 3, 2, 3],
  [4, 4],
  [12, 4],
];

/** Point shapes per series, the second cue besides dashes for black-and-white prints. */
export const seriesShapes = ['circle', 'square', 'triangle-up', 'diamond', 'cross', 'triangle-down'] as const;

/** Fill for "allowed" regions such as a voltage band: light enough to print under lines. */
export const allowedBandFill = '#dfe9e1';

/** Colour for reference lines (limits, margins, operating points). */
export const referenceInk = '#3b3b3b';

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
