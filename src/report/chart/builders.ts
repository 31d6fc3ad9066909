// Ready-made Vega-Lite specs for the charts a reactive-compensation study usually needs.
import { ChartInputError } from './errors.ts';
import { allowedBandFill, referenceInk, seriesColours, seriesDashes, seriesShapes } from './theme.ts';

/** A Vega-Lite spec as a plain object, so the author can still adjust it before rendering. */
export type ChartSpec = Record<string, unknown>;

const defaultWidthPx = 480;
const defaultHeightPx = 280;

export interface VoltageProfileInput {
  cases: { label: string; points: { distanceKm: number; voltagePu: number }[] }[];
  /** Allowed voltage band, shaded behind the profiles. */
  bandPu?: { min: number; max: number };
  title?: string;
}

/** Per-unit voltage along the line, one styled series per case, allowed band shaded. */
export function voltageProfileChart(input: VoltageProfileInput): ChartSpec {
  const labels = seriesLabels(input.cases, 'cases');
  const values = input.cases.flatMap((series, seriesIndex) =>
    nonEmpty(series.points, `cases[${seriesIndex}].points`).map((point, order) => ({
      series: series.label,
      order,
      distanceKm: finite(point.distanceKm, `cases[${seriesIndex}].points[${order}].distanceKm`),
      voltagePu: finite(point.voltagePu, `cases[${seriesIndex}].points[${order}].voltagePu`),
    })),
  );
  const x = { field: 'distanceKm', type: 'quantitative', title: 'Distance from sending end (km)' };
  const y = { field: 'voltagePu', type: 'quantitative', title: 'Voltage (pu)', scale: { zero: false } };
  const layers: ChartSpec[] = [];
  if (input.bandPu) {
    const band = orderedRange(input.bandPu.min, input.bandPu.max, 'bandPu');
    layers.push(horizontalBandLayer(band, 'Voltage (pu)', `allowed ${band.min}–${band.max} pu`));
  }
  layers.push(seriesLayer(values, labels, x, y, 'Case'));
  return frame(input.title ?? 'Voltage profile along the line', layers);
}

export interface PvCurveInput {
  curves: { label: string; points: { pMw: number; voltagePu: number }[]; nose?: { pMw: number; voltagePu: number } }[];
  title?: string;
}

/** Receiving-end P-V curves, drawn in the given point order so both branches of each curve show; noses marked. */
export function pvCurveChart(input: PvCurveInput): ChartSpec {
  const labels = seriesLabels(input.curves, 'curves');
  const values = input.curves.flatMap((curve, curveIndex) =>
    nonEmpty(curve.points, `curves[${curveIndex}].points`).map((point, order) => ({
      series: curve.label,
      order,
      pMw: finite(point.pMw, `curves[${curveIndex}].points[${order}].pMw`),
      voltagePu: finite(point.voltagePu, `curves[${curveIndex}].points[${order}].voltagePu`),
    })),
  );
  const x = { field: 'pMw', type: 'quantitative', title: 'Receiving-end active power P (MW)' };
  const y = { field: 'voltagePu', type: 'quantitative', title: 'Receiving-end voltage (pu)', scale: { zero: false } };
  const noses = input.curves.flatMap((curve, curveIndex) =>
    curve.nose
      ? [
          {
            pMw: finite(curve.nose.pMw, `curves[${curveIndex}].nose.pMw`),
            voltagePu: finite(curve.nose.voltagePu, `curves[${curveIndex}].nose.voltagePu`),
            note: `nose ${formatNumber(curve.nose.pMw)} MW, ${formatNumber(curve.nose.voltagePu)} pu`,
          },
        ]
      : [],
  );
  const layers: ChartSpec[] = [seriesLayer(values, labels, x, y, 'Curve')];
  // The nose is the rightmost point of its curve, so its note goes to the left.
  if (noses.length > 0) layers.push(annotatedPointsLayer(noses, 'pMw', 'voltagePu', 'triangle-down', 'left'));
  return frame(input.title ?? 'P-V curves at the receiving end', layers);
}

export interface PowerAngleInput {
  curves: { label: string; points: { angleDeg: number; pMw: number }[] }[];
  operatingPoint?: { angleDeg: number; pMw: number };
  /** Maximum transferable power; when absent, the largest P of the first curve. */
  maxPowerMw?: number;
  title?: string;
}

/** Steady-state stability margin in % of Pmax: (Pmax − P0) / Pmax × 100. */
export function stabilityMarginPercent(maxPowerMw: number, operatingPowerMw: number): number {
  finite(operatingPowerMw, 'operatingPoint.pMw');
  if (!Number.isFinite(maxPowerMw) || maxPowerMw <= 0) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity: 'maxPowerMw',
      value: maxPowerMw,
      allowed: 'a finite power greater than 0 MW',
      hint: 'Pass the peak of the P-δ curve, e.g. V_S·V_R/X in MW.',
    });
  }
  if (operatingPowerMw > maxPowerMw) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity: 'operatingPoint.pMw',
      value: operatingPowerMw,
      allowed: `at most maxPowerMw = ${maxPowerMw} MW`,
      hint: 'An operating point above Pmax has no steady state; check the curve or the operating point.',
    });
  }
  return ((maxPowerMw - operatingPowerMw) / maxPowerMw) * 100;
}

/** P-δ curves with the operating point, Pmax and the steady-state stability margin annotated. */
export function powerAngleChart(input: PowerAngleInput): ChartSpec {
  const labels = seriesLabels(input.curves, 'curves');
  const values = input.curves.flatMap((curve, curveIndex) =>
    nonEmpty(curve.points, `curves[${curveIndex}].points`).map((point, order) => ({
      series: curve.label,
      order,
      angleDeg: finite(point.angleDeg, `curves[${curveIndex}].points[${order}].angleDeg`),
      pMw: finite(point.pMw, `curves[${curveIndex}].points[${order}].pMw`),
    })),
  );
  const x = { field: 'angleDeg', type: 'quantitative', title: 'Power angle δ (degrees)' };
  const y = { field: 'pMw', type: 'quantitative', title: 'Active power P (MW)' };
  const layers: ChartSpec[] = [seriesLayer(values, labels, x, y, 'Curve')];
  const operatingPoint = input.operatingPoint;
  if (operatingPoint) {
    const firstCurvePeak = Math.max(...values.filter((value) => value.series === labels[0]).map((value) => value.pMw));
    const maxPowerMw = input.maxPowerMw ?? firstCurvePeak;
    const marginPercent = stabilityMarginPercent(maxPowerMw, operatingPoint.pMw);
    layers.push(
      referenceRuleLayer('y', maxPowerMw, `Pmax = ${formatNumber(maxPowerMw)} MW`, 'Active power P (MW)'),
      referenceRuleLayer('y', operatingPoint.pMw, `P0 = ${formatNumber(operatingPoint.pMw)} MW`, 'Active power P (MW)'),
      annotatedPointsLayer(
        [
          {
            angleDeg: finite(operatingPoint.angleDeg, 'operatingPoint.angleDeg'),
            pMw: operatingPoint.pMw,
            note: `operating point δ0 = ${formatNumber(operatingPoint.angleDeg)}°`,
          },
        ],
        'angleDeg',
        'pMw',
        'diamond',
        'right',
      ),
    );
    // The margin goes into the subtitle: inside the plot it would cross a curve for some data.
    return frame(input.title ?? 'Power-angle curves', layers, `Stability margin (Pmax − P0)/Pmax = ${marginPercent.toFixed(1)} %`);
  }
  return frame(input.title ?? 'Power-angle curves', layers);
}

export interface SvcCharacteristicInput {
  /** Slope of the control range in % on the SVC base (reactance Xs = slope/100 pu). */
  slopePercent: number;
  /** Voltage at zero SVC current. */
  referenceVoltagePu: number;
  /** Largest capacitive susceptance, on the SVC base. */
  bMaxCapacitivePu: number;
  /** Largest inductive susceptance, on the SVC base. */
  bMaxInductivePu: number;
  operatingPoints?: { label: string; currentPu: number; voltagePu: number }[];
  title?: string;
}

export interface SvcCharacteristicCorners {
  /** Where the control slope meets the capacitive limit line I = −B_C·V. */
  capacitiveCorner: { currentPu: number; voltagePu: number };
  /** Where the control slope meets the inductive limit line I = B_L·V. */
  inductiveCorner: { currentPu: number; voltagePu: number };
}

/**
 * Corners of the SVC V-I characteristic. Current is positive when inductive (absorbing). The control
 * range is V = Vref + Xs·I; the limits are the fixed-susceptance lines through the origin.
 */
export function svcCharacteristicCorners(input: SvcCharacteristicInput): SvcCharacteristicCorners {
  const slopePercent = finite(input.slopePercent, 'slopePercent');
  if (slopePercent < 0 || slopePercent >= 100) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity: 'slopePercent',
      value: slopePercent,
      allowed: '0 ≤ slopePercent < 100 (typically 1 to 10 %)',
      hint: 'Give the slope in percent on the SVC base, e.g. 3 for 3 %.',
    });
  }
  const referenceVoltagePu = positive(input.referenceVoltagePu, 'referenceVoltagePu', 'e.g. 1.0');
  const capacitive = positive(input.bMaxCapacitivePu, 'bMaxCapacitivePu', 'e.g. 1.0 on the SVC base');
  const inductive = positive(input.bMaxInductivePu, 'bMaxInductivePu', 'e.g. 0.5 on the SVC base');
  const slopeReactancePu = slopePercent / 100;
  if (slopeReactancePu * inductive >= 1) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity: 'slopePercent × bMaxInductivePu / 100',
      value: slopeReactancePu * inductive,
      allowed: 'less than 1, otherwise the slope never meets the inductive limit',
      hint: 'Check that slope and susceptances are on the same (SVC) base.',
    });
  }
  const capacitiveVoltage = referenceVoltagePu / (1 + slopeReactancePu * capacitive);
  const inductiveVoltage = referenceVoltagePu / (1 - slopeReactancePu * inductive);
  return {
    capacitiveCorner: { currentPu: -capacitive * capacitiveVoltage, voltagePu: capacitiveVoltage },
    inductiveCorner: { currentPu: inductive * inductiveVoltage, voltagePu: inductiveVoltage },
  };
}

/** SVC voltage-current characteristic: both susceptance limits, the sloped control range, operating points. */
export function svcCharacteristicChart(input: SvcCharacteristicInput): ChartSpec {
  const { capacitiveCorner, inductiveCorner } = svcCharacteristicCorners(input);
  const operatingPoints = (input.operatingPoints ?? []).map((point, index) => ({
    series: point.label,
    currentPu: finite(point.currentPu, `operatingPoints[${index}].currentPu`),
    voltagePu: finite(point.voltagePu, `operatingPoints[${index}].voltagePu`),
  }));
  const topVoltagePu = 1.1 * Math.max(inductiveCorner.voltagePu, input.referenceVoltagePu, ...operatingPoints.map((point) => point.voltagePu));
  const capacitiveLimitTop = { currentPu: -input.bMaxCapacitivePu * topVoltagePu, voltagePu: topVoltagePu };
  const inductiveLimitTop = { currentPu: input.bMaxInductivePu * topVoltagePu, voltagePu: topVoltagePu };
  const origin = { currentPu: 0, voltagePu: 0 };
  const x = { field: 'currentPu', type: 'quantitative', title: 'SVC current (pu; − capacitive, + inductive)' };
  const y = { field: 'voltagePu', type: 'quantitative', title: 'Bus voltage (pu)' };
  const limitLines = [
    ...[origin, capacitiveLimitTop].map((point, order) => ({ ...point, line: 'capacitive limit', order })),
    ...[origin, inductiveLimitTop].map((point, order) => ({ ...point, line: 'inductive limit', order })),
  ];
  const characteristic = [origin, capacitiveCorner, inductiveCorner, inductiveLimitTop].map((point, order) => ({
    ...point,
    order,
  }));
  const layers: ChartSpec[] = [
    {
      data: { values: limitLines },
      mark: { type: 'line', color: '#8d969c', strokeWidth: 0.9, strokeDash: [5, 3] },
      encoding: { x, y, detail: { field: 'line', type: 'nominal' }, order: { field: 'order', type: 'quantitative' } },
    },
    {
      data: { values: characteristic },
      mark: { type: 'line', color: referenceInk, strokeWidth: 2.2 },
      encoding: { x, y, order: { field: 'order', type: 'quantitative' } },
    },
    textNoteLayer(capacitiveLimitTop, `capacitive limit B = ${formatNumber(input.bMaxCapacitivePu)} pu`, 'left', x, y),
    textNoteLayer(inductiveLimitTop, `inductive limit B = ${formatNumber(input.bMaxInductivePu)} pu`, 'right', x, y),
    textNoteLayer(
      {
        currentPu: (capacitiveCorner.currentPu + inductiveCorner.currentPu) / 2,
        voltagePu: (capacitiveCorner.voltagePu + inductiveCorner.voltagePu) / 2,
      },
      `slope ${formatNumber(input.slopePercent)} %, Vref = ${formatNumber(input.referenceVoltagePu)} pu`,
      'left',
      x,
      y,
    ),
  ];
  if (operatingPoints.length > 0) {
    const labels = seriesLabels(input.operatingPoints ?? [], 'operatingPoints');
    layers.push({
      data: { values: operatingPoints },
      mark: { type: 'point', size: 70, filled: true, strokeWidth: 1.2 },
      encoding: {
        x,
        y,
        color: { field: 'series', type: 'nominal', title: 'Operating point', scale: { domain: labels, range: [...seriesColours] } },
        shape: { field: 'series', type: 'nominal', title: 'Operating point', scale: { domain: labels, range: [...seriesShapes] } },
      },
    });
  }
  return frame(input.title ?? 'SVC voltage-current characteristic', layers);
}

export interface LoadabilityInput {
  points: { lengthKm: number; multipleOfSil: number }[];
  /** Thermal limit expressed in multiples of SIL, drawn as a horizontal line. */
  thermalLimitSil?: number;
  title?: string;
}

/** Line loadability in multiples of surge impedance loading versus line length. */
export function loadabilityChart(input: LoadabilityInput): ChartSpec {
  const values = nonEmpty(input.points, 'points').map((point, order) => ({
    series: 'loadability',
    order,
    lengthKm: finite(point.lengthKm, `points[${order}].lengthKm`),
    multipleOfSil: finite(point.multipleOfSil, `points[${order}].multipleOfSil`),
  }));
  const x = { field: 'lengthKm', type: 'quantitative', title: 'Line length (km)', scale: { zero: true } };
  const y = { field: 'multipleOfSil', type: 'quantitative', title: 'Loadability (multiples of SIL)' };
  const layers: ChartSpec[] = [
    {
      data: { values },
      layer: [
        { mark: { type: 'line', color: seriesColours[0] }, encoding: { x, y, order: { field: 'order', type: 'quantitative' } } },
        { mark: { type: 'point', color: seriesColours[0], shape: seriesShapes[0] }, encoding: { x, y } },
      ],
    },
  ];
  if (input.thermalLimitSil !== undefined) {
    const limit = positive(input.thermalLimitSil, 'thermalLimitSil', 'e.g. 3.0 for a short line');
    layers.push(referenceRuleLayer('y', limit, `thermal limit ${formatNumber(limit)} × SIL`, y.title));
  }
  return frame(input.title ?? 'Line loadability versus length', layers);
}

function frame(title: string, layers: ChartSpec[], subtitle?: string): ChartSpec {
  return {
    title: subtitle === undefined ? title : { text: title, subtitle },
    width: defaultWidthPx,
    height: defaultHeightPx,
    layer: layers,
  };
}

/** Markers on every vertex of a long series would merge into a thick band; about this many per series stay legible. */
const MARKERS_PER_SERIES = 12;

/** Flags the vertices that carry a marker: evenly spaced, always including both ends of each series. */
function withMarkers(values: Record<string, unknown>[]): Record<string, unknown>[] {
  const counts = new Map<unknown, number>();
  for (const value of values) counts.set(value.series, (counts.get(value.series) ?? 0) + 1);
  const seen = new Map<unknown, number>();
  return values.map((value) => {
    const count = counts.get(value.series) ?? 1;
    const index = seen.get(value.series) ?? 0;
    seen.set(value.series, index + 1);
    const step = Math.max(1, Math.ceil(count / MARKERS_PER_SERIES));
    return { ...value, marker: index % step === 0 || index === count - 1 };
  });
}

/** One line plus point layer per series, told apart by colour, dash pattern and point shape. */
function seriesLayer(
  values: Record<string, unknown>[],
  labels: string[],
  x: Record<string, unknown>,
  y: Record<string, unknown>,
  legendTitle: string,
): ChartSpec {
  const color = { field: 'series', type: 'nominal', title: legendTitle, scale: { domain: labels, range: [...seriesColours] } };
  return {
    data: { values: withMarkers(values) },
    layer: [
      {
        mark: { type: 'line' },
        encoding: {
          x,
          y,
          color,
          strokeDash: { field: 'series', type: 'nominal', title: legendTitle, scale: { domain: labels, range: seriesDashes } },
          order: { field: 'order', type: 'quantitative' },
        },
      },
      {
        mark: { type: 'point' },
        transform: [{ filter: { field: 'marker', equal: true } }],
        encoding: {
          x,
          y,
          color,
          shape: { field: 'series', type: 'nominal', title: legendTitle, scale: { domain: labels, range: [...seriesShapes] } },
        },
      },
    ],
  };
}

function horizontalBandLayer(band: { min: number; max: number }, yTitle: string, note: string): ChartSpec {
  return {
    data: { values: [{ min: band.min, max: band.max, note }] },
    layer: [
      {
        mark: { type: 'rect', fill: allowedBandFill },
        encoding: { y: { field: 'min', type: 'quantitative', title: yTitle, scale: { zero: false } }, y2: { field: 'max' } },
      },
      {
        mark: { type: 'text', align: 'right', baseline: 'bottom', dx: -4, dy: -2, fontSize: 9, color: referenceInk, x: 'width' },
        encoding: { y: { field: 'max', type: 'quantitative', title: yTitle }, text: { field: 'note' } },
      },
    ],
  };
}

function referenceRuleLayer(axis: 'y', value: number, note: string, title: string): ChartSpec {
  return {
    data: { values: [{ value, note }] },
    layer: [
      {
        mark: { type: 'rule', color: referenceInk, strokeDash: [4, 3], strokeWidth: 1 },
        encoding: { [axis]: { field: 'value', type: 'quantitative', title } },
      },
      {
        mark: { type: 'text', align: 'right', baseline: 'bottom', dx: -4, dy: -2, fontSize: 9, color: referenceInk, x: 'width' },
        encoding: { [axis]: { field: 'value', type: 'quantitative', title }, text: { field: 'note' } },
      },
    ],
  };
}

function annotatedPointsLayer(
  points: Record<string, unknown>[],
  xField: string,
  yField: string,
  shape: string,
  noteSide: 'left' | 'right',
): ChartSpec {
  const x = { field: xField, type: 'quantitative' };
  const y = { field: yField, type: 'quantitative' };
  return {
    data: { values: points },
    layer: [
      { mark: { type: 'point', shape, size: 90, filled: true, color: referenceInk }, encoding: { x, y } },
      {
        mark: {
          type: 'text',
          align: noteSide === 'right' ? 'left' : 'right',
          baseline: 'top',
          dx: noteSide === 'right' ? 8 : -8,
          dy: 6,
          fontSize: 9,
          color: referenceInk,
        },
        encoding: { x, y, text: { field: 'note' } },
      },
    ],
  };
}

function textNoteLayer(
  at: Record<string, number>,
  note: string,
  align: 'left' | 'right',
  x: Record<string, unknown>,
  y: Record<string, unknown>,
): ChartSpec {
  return {
    data: { values: [{ ...at, note }] },
    mark: { type: 'text', align, baseline: 'bottom', dy: -4, fontSize: 9, color: referenceInk },
    encoding: { x, y, text: { field: 'note' } },
  };
}

function seriesLabels(series: readonly { label: string }[], quantity: string): string[] {
  const labels = nonEmpty(series, quantity).map((item) => item.label);
  const seen = new Set<string>();
  labels.forEach((label, index) => {
    if (seen.has(label)) {
      throw new ChartInputError('chart-input-out-of-range', {
        quantity: `${quantity}[${index}].label`,
        value: label,
        allowed: 'labels that are unique within the chart',
        hint: 'Two series with the same label would be merged into one line; rename one of them.',
      });
    }
    seen.add(label);
  });
  return labels;
}

function nonEmpty<T>(items: readonly T[], quantity: string): readonly T[] {
  if (items.length === 0) {
    throw new ChartInputError('chart-input-empty', {
      quantity: `${quantity}.length`,
      value: 0,
      allowed: 'at least one entry',
      hint: 'A chart needs something to plot; pass at least one series with points.',
    });
  }
  return items;
}

function finite(value: number, quantity: string): number {
  if (!Number.isFinite(value)) {
    throw new ChartInputError('chart-input-not-finite', {
      quantity,
      value,
      allowed: 'a finite number',
      hint: 'NaN or Infinity usually means a division by zero upstream in the calculation.',
    });
  }
  return value;
}

function positive(value: number, quantity: string, example: string): number {
  if (finite(value, quantity) <= 0) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity,
      value,
      allowed: `greater than 0 (${example})`,
      hint: 'Give the magnitude as a positive number.',
    });
  }
  return value;
}

function orderedRange(min: number, max: number, quantity: string): { min: number; max: number } {
  if (finite(min, `${quantity}.min`) >= finite(max, `${quantity}.max`)) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity: `${quantity}.min`,
      value: min,
      allowed: `less than ${quantity}.max = ${max}`,
      hint: 'Give the band as { min, max } with min below max, e.g. { min: 0.95, max: 1.05 }.',
    });
  }
  return { min, max };
}

/** Numbers in annotations: up to 3 significant decimals, no trailing zeros, locale-independent. */
function formatNumber(value: number): string {
  return String(Number(value.toPrecision(4)));
}
