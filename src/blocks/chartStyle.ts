// How the study charts tell series apart and mark references: colours, dashes and shapes that survive a black-and-white print.

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
