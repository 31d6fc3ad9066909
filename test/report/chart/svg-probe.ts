// Test helper: reads axis ticks, line paths and texts out of a Vega SVG so tests can check plotted values.

export interface Tick {
  label: string;
  pixel: number;
}

/** Tick labels and their pixel positions along the axis whose accessible title starts with `axis`. */
export function axisTicks(svg: string, axis: 'X' | 'Y'): Tick[] {
  const start = svg.indexOf(`aria-label="${axis}-axis titled`);
  if (start < 0) throw new Error(`no ${axis} axis in SVG`);
  const tickGroupStart = svg.indexOf('role-axis-tick', start);
  const tickGroup = svg.slice(tickGroupStart, svg.indexOf('</g>', tickGroupStart));
  const labelGroupStart = svg.indexOf('role-axis-label', start);
  const labelGroup = svg.slice(labelGroupStart, svg.indexOf('</g>', labelGroupStart));
  const tickPixels = [...tickGroup.matchAll(/<line transform="translate\(([-\d.e]+),([-\d.e]+)\)"/g)].map((match) =>
    Number(axis === 'X' ? match[1] : match[2]),
  );
  const labels = [...labelGroup.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((match) => match[1] ?? '');
  if (labels.length !== tickPixels.length) throw new Error(`${axis}: ${labels.length} labels but ${tickPixels.length} ticks`);
  return labels.map((label, index) => ({ label, pixel: tickPixels[index] ?? Number.NaN }));
}

/**
 * Vega snaps tick marks to whole pixels, so a position read through ticks can be off by up to one
 * pixel (on a 280 px plot of 0.94–1.10 pu that is about 0.0006 pu).
 */
export const tickSnapPx = 1;

/** Pixel position of a data value on an axis, by linear interpolation between its outermost ticks. */
export function pixelOf(ticks: Tick[], value: number): number {
  const first = ticks[0];
  const last = ticks[ticks.length - 1];
  if (first === undefined || last === undefined || first === last) throw new Error('need two ticks');
  const firstValue = Number(first.label.replace(/,/g, '').replace('−', '-'));
  const lastValue = Number(last.label.replace(/,/g, '').replace('−', '-'));
  return first.pixel + ((value - firstValue) / (lastValue - firstValue)) * (last.pixel - first.pixel);
}

export interface LinePath {
  vertices: [number, number][];
  stroke: string | undefined;
  dash: string | undefined;
}

/** Every drawn line mark, with vertices parsed from its M/L path. */
export function linePaths(svg: string): LinePath[] {
  return [...svg.matchAll(/<path [^>]*aria-roledescription="line mark"[^>]*>/g)].map((match) => {
    const element = match[0];
    const path = /\sd="([^"]*)"/.exec(element)?.[1] ?? '';
    const vertices = [...path.matchAll(/[ML]([-\d.e]+),([-\d.e]+)/g)].map((vertex): [number, number] => [Number(vertex[1]), Number(vertex[2])]);
    return {
      vertices,
      stroke: /\sstroke="([^"]*)"/.exec(element)?.[1],
      dash: /\sstroke-dasharray="([^"]*)"/.exec(element)?.[1],
    };
  });
}

/** Point marks' symbol outlines, which differ per shape. */
export function pointShapes(svg: string): string[] {
  return [...svg.matchAll(/<path [^>]*aria-roledescription="point"[^>]*\sd="([^"]*)"/g)].map((match) => match[1] ?? '');
}

/** All text content in the SVG, XML entities left as they are. */
export function texts(svg: string): string[] {
  return [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((match) => match[1] ?? '');
}

export interface TextPlacement {
  text: string;
  /** Where the text is anchored, in the SVG's pixels. */
  x: number;
  y: number;
  /** Which end of the text sits at the anchor: `start` (the text runs to the right of x), `middle` or `end`. */
  align: string;
}

/** Every text mark with its anchor point and alignment. */
export function textPlacements(svg: string): TextPlacement[] {
  return [...svg.matchAll(/<text([^>]*)>([^<]*)<\/text>/g)].map((match) => {
    const attributes = match[1] ?? '';
    const at = /transform="translate\(([-\d.e]+),([-\d.e]+)\)"/.exec(attributes);
    return {
      text: match[2] ?? '',
      x: Number(at?.[1] ?? Number.NaN),
      y: Number(at?.[2] ?? Number.NaN),
      align: /text-anchor="([^"]*)"/.exec(attributes)?.[1] ?? 'start',
    };
  });
}
