// Ready-made Vega-Lite specs for the charts a reactive-compensation study usually needs: they shape data, the solver computes.
import { ChartInputError } from './chartInputError.ts';
import { stabilityMarginPercent } from '../solver/curves.ts';
import { type SvcCharacteristicOptions, svcCharacteristicCorners } from '../solver/sizing.ts';
import { allowedBandFill, referenceInk, seriesColours, seriesDashes, seriesShapes } from './chartStyle.ts';
import { columnFormat } from './format.ts';

// Blocks have always found these two beside the charts that draw them.
export { stabilityMarginPercent, svcCharacteristicCorners };
export type { SvcCharacteristicCorners } from '../solver/sizing.ts';

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

/**
 * Receiving-end P-V curves, noses marked. Along a P-V curve the voltage only falls (from no load up the upper branch to the
 * nose, then down the lower branch), so each curve is drawn in the order of falling voltage: both branches show, in order,
 * whatever order the points come in.
 */
export function pvCurveChart(input: PvCurveInput): ChartSpec {
  const labels = seriesLabels(input.curves, 'curves');
  const values = input.curves.flatMap((curve, curveIndex) =>
    nonEmpty(curve.points, `curves[${curveIndex}].points`)
      .map((point, index) => ({
        series: curve.label,
        pMw: finite(point.pMw, `curves[${curveIndex}].points[${index}].pMw`),
        voltagePu: finite(point.voltagePu, `curves[${curveIndex}].points[${index}].voltagePu`),
      }))
      .sort((a, b) => b.voltagePu - a.voltagePu)
      .map((point, order) => ({ ...point, order })),
  );
  const x = { field: 'pMw', type: 'quantitative', title: 'Receiving-end active power P (MW)' };
  const y = { field: 'voltagePu', type: 'quantitative', title: 'Receiving-end voltage (pu)', scale: { zero: false } };
  const marked = input.curves.flatMap((curve, curveIndex) =>
    curve.nose
      ? [
          {
            label: curve.label,
            pMw: finite(curve.nose.pMw, `curves[${curveIndex}].nose.pMw`),
            voltagePu: finite(curve.nose.voltagePu, `curves[${curveIndex}].nose.voltagePu`),
          },
        ]
      : [],
  );
  // One format for all the noses of a chart, as for a table column, so that "0.6850 pu" stands beside "0.6717 pu".
  const formatMw = columnFormat(marked.map((nose) => nose.pMw));
  const formatPu = columnFormat(marked.map((nose) => nose.voltagePu));
  const noses = marked.map((nose) => ({
    pMw: nose.pMw,
    voltagePu: nose.voltagePu,
    note: `${input.curves.length > 1 ? `${nose.label}: ` : ''}nose ${formatMw(nose.pMw)} MW, ${formatPu(nose.voltagePu)} pu`,
  }));
  const layers: ChartSpec[] = [seriesLayer(values, labels, x, y, 'Curve')];
  if (noses.length > 0) layers.push(noseLayer(noses, values, x, y));
  return frame(input.title ?? 'P-V curves at the receiving end', layers);
}

/** Text height, in pixels, that keeps two nose notes apart. */
const NOSE_NOTE_SPACING_PX = 12;

/**
 * The noses marked where they are, and their notes in a column to the right of every curve: a nose is the rightmost
 * point of its own curve only, so a note beside it could cross an outer curve. Notes keep their noses' voltage order,
 * spaced so that two noses at the same voltage (curves of one power factor) stay readable.
 */
function noseLayer(
  noses: { pMw: number; voltagePu: number; note: string }[],
  values: { pMw: number; voltagePu: number }[],
  x: Record<string, unknown>,
  y: Record<string, unknown>,
): ChartSpec {
  const rightmostMw = Math.max(...values.map((value) => value.pMw), ...noses.map((nose) => nose.pMw));
  const voltages = [...values, ...noses].map((value) => value.voltagePu);
  const puPerPx = (Math.max(...voltages) - Math.min(...voltages) || 1) / defaultHeightPx;
  let below = Number.POSITIVE_INFINITY;
  const notes = [...noses]
    .sort((a, b) => b.voltagePu - a.voltagePu)
    .map((nose) => {
      const voltagePu = Math.min(nose.voltagePu, below - NOSE_NOTE_SPACING_PX * puPerPx);
      below = voltagePu;
      return { pMw: rightmostMw, voltagePu, note: nose.note };
    });
  return {
    layer: [
      { data: { values: noses }, mark: { type: 'point', shape: 'triangle-down', size: 90, filled: true, color: referenceInk }, encoding: { x, y } },
      {
        data: { values: notes },
        mark: { type: 'text', align: 'left', baseline: 'middle', dx: 10, fontSize: 9, color: referenceInk },
        encoding: { x, y, text: { field: 'note' } },
      },
    ],
  };
}

export interface PowerAngleInput {
  curves: { label: string; points: { angleDeg: number; pMw: number }[] }[];
  operatingPoint?: { angleDeg: number; pMw: number };
  /** Maximum transferable power; when absent, the largest P of the first curve. */
  maxPowerMw?: number;
  title?: string;
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
  const x = { field: 'angleDeg', type: 'quantitative', title: 'Power angle δ (°)' };
  const y = { field: 'pMw', type: 'quantitative', title: 'Active power P (MW)' };
  const layers: ChartSpec[] = [seriesLayer(values, labels, x, y, 'Curve')];
  const operatingPoint = input.operatingPoint;
  if (operatingPoint) {
    const firstCurvePeak = Math.max(...values.filter((value) => value.series === labels[0]).map((value) => value.pMw));
    const maxPowerMw = input.maxPowerMw ?? firstCurvePeak;
    const marginPercent = stabilityMarginPercent(maxPowerMw, finite(operatingPoint.pMw, 'operatingPoint.pMw'));
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

export interface SvcCharacteristicInput extends SvcCharacteristicOptions {
  operatingPoints?: { label: string; currentPu: number; voltagePu: number }[];
  title?: string;
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

export interface CorridorProfileInput {
  /** The cases of solveCorridorCases (or some of them); unsolved cases are left out of the chart. */
  cases: readonly {
    label: string;
    solved: boolean;
    sections?: readonly { profile: { corridorKm: readonly number[]; voltagePu: readonly number[] } }[];
  }[];
  bandPu?: { min: number; max: number };
  title?: string;
}

/** The voltage along the whole corridor in each solved case, from the sections' sampled profiles (a series segment shows as a step). */
export function corridorProfileChart(input: CorridorProfileInput): ChartSpec {
  const solved = nonEmpty(input.cases, 'cases').filter((solution) => solution.solved && solution.sections);
  return voltageProfileChart({
    cases: nonEmpty(solved, 'cases (solved)').map((solution) => ({
      label: solution.label,
      points: solution.sections!.flatMap((section) =>
        section.profile.corridorKm.map((distanceKm, index) => ({ distanceKm, voltagePu: section.profile.voltagePu[index]! })),
      ),
    })),
    ...(input.bandPu ? { bandPu: input.bandPu } : {}),
    title: input.title ?? 'Voltage along the corridor by case',
  });
}

export interface BusVoltagesInput {
  cases: readonly { label: string; solved: boolean; buses?: readonly { name: string; voltagePu: number }[] }[];
  bandPu?: { min: number; max: number };
  title?: string;
}

/** Each bus's voltage in each solved case: buses in corridor order along the axis, one styled series per case. */
export function busVoltagesChart(input: BusVoltagesInput): ChartSpec {
  const solved = nonEmpty(input.cases, 'cases').filter((solution) => solution.solved && solution.buses);
  const labels = seriesLabels(nonEmpty(solved, 'cases (solved)'), 'cases');
  const busOrder = solved[0]!.buses!.map((bus) => bus.name);
  const values = solved.flatMap((solution, caseIndex) =>
    solution.buses!.map((bus, order) => ({
      series: solution.label,
      order,
      bus: bus.name,
      voltagePu: finite(bus.voltagePu, `cases[${caseIndex}].buses[${order}].voltagePu`),
    })),
  );
  const x = { field: 'bus', type: 'ordinal', title: 'Bus', sort: busOrder, axis: { labelAngle: 0 } };
  const y = { field: 'voltagePu', type: 'quantitative', title: 'Voltage (pu)', scale: { zero: false } };
  const layers: ChartSpec[] = [];
  if (input.bandPu) {
    const band = orderedRange(input.bandPu.min, input.bandPu.max, 'bandPu');
    layers.push(horizontalBandLayer(band, 'Voltage (pu)', `allowed ${band.min}–${band.max} pu`));
  }
  layers.push(seriesLayer(values, labels, x, y, 'Case'));
  return frame(input.title ?? 'Bus voltages by case', layers);
}

export interface FrequencyScanChartInput {
  /** The result of frequencyScan or corridorFrequencyScan. */
  scan: {
    frequencyHz: number;
    points: { frequencyHz: readonly number[]; reactanceOhm: readonly number[]; resistanceOhm: readonly number[] };
    seriesResonances: readonly { frequencyHz: number }[];
  };
  torsionalModesHz?: readonly number[];
  /** The reactance axis is cut at plus and minus this; by default at twice the largest reactance away from the poles. */
  reactanceLimitOhm?: number;
  title?: string;
}

/**
 * Driving-point reactance and resistance against frequency, the series resonances marked, and at f0 - f_m for each torsional mode
 * f_m a dashed rule: an electrical resonance near a rule would excite that mode.
 */
export function frequencyScanChart(input: FrequencyScanChartInput): ChartSpec {
  const { points } = input.scan;
  const f0 = positive(input.scan.frequencyHz, 'scan.frequencyHz', 'the power frequency, 50 or 60 Hz');
  const count = nonEmpty(points.frequencyHz, 'scan.points.frequencyHz').length;
  const reactances = points.reactanceOhm.map((value, index) => finite(value, `scan.points.reactanceOhm[${index}]`));
  // Near a pole the reactance runs off to infinity; the middle of the sorted magnitudes tells the scale of the rest.
  const sorted = reactances.map(Math.abs).sort((a, b) => a - b);
  const limit =
    input.reactanceLimitOhm !== undefined
      ? positive(input.reactanceLimitOhm, 'reactanceLimitOhm', 'the reactance axis runs from minus to plus this')
      : Math.max(4 * (sorted[Math.floor(sorted.length / 2)] ?? 1), 1);
  const values = Array.from({ length: count }, (_, order) => [
    { series: 'reactance', order, frequencyHz: points.frequencyHz[order]!, ohm: Math.max(-limit, Math.min(limit, reactances[order]!)) },
    {
      series: 'resistance',
      order,
      frequencyHz: points.frequencyHz[order]!,
      ohm: Math.max(-limit, Math.min(limit, finite(points.resistanceOhm[order]!, `scan.points.resistanceOhm[${order}]`))),
    },
  ]).flat();
  const x = { field: 'frequencyHz', type: 'quantitative', title: 'Frequency (Hz)' };
  const y = { field: 'ohm', type: 'quantitative', title: 'Driving-point impedance (Ω)', scale: { domain: [-limit, limit] } };
  const layers: ChartSpec[] = [seriesLayer(values, ['reactance', 'resistance'], x, y, 'Part')];
  const resonances = input.scan.seriesResonances.map((resonance, index) => ({
    frequencyHz: finite(resonance.frequencyHz, `scan.seriesResonances[${index}].frequencyHz`),
    ohm: 0,
    note: `${formatNumber(resonance.frequencyHz)} Hz`,
  }));
  if (resonances.length > 0) layers.push(annotatedPointsLayer(resonances, 'frequencyHz', 'ohm', 'diamond', 'right'));
  for (const [index, modeHz] of (input.torsionalModesHz ?? []).entries()) {
    const complement = f0 - finite(modeHz, `torsionalModesHz[${index}]`);
    layers.push(verticalRuleLayer(complement, `f0 - ${formatNumber(modeHz)} Hz`, x.title));
  }
  return frame(input.title ?? 'Frequency scan: impedance seen from the generator', layers);
}

export interface CostComparisonInput {
  /** The result of capitalisedCostComparison. */
  comparison: {
    costUnit: string;
    options: readonly { label: string; equipmentCost: number; presentValueOfLosses: number; presentValueOfMaintenance: number }[];
  };
  /** What the study calls the items compared ("alternative", "scheme"), for the title and the axis; left out, neither names them. */
  itemName?: string;
  title?: string;
}

/** Capitalised cost of each item compared as stacked bars: equipment, present value of losses, present value of maintenance. */
export function costComparisonChart(input: CostComparisonInput): ChartSpec {
  const parts = ['equipment', 'losses (present value)', 'maintenance (present value)'];
  const options = nonEmpty(input.comparison.options, 'comparison.options');
  const values = options.flatMap((option, index) => [
    { option: option.label, part: parts[0], cost: finite(option.equipmentCost, `comparison.options[${index}].equipmentCost`), stackOrder: 0 },
    {
      option: option.label,
      part: parts[1],
      cost: finite(option.presentValueOfLosses, `comparison.options[${index}].presentValueOfLosses`),
      stackOrder: 1,
    },
    {
      option: option.label,
      part: parts[2],
      cost: finite(option.presentValueOfMaintenance, `comparison.options[${index}].presentValueOfMaintenance`),
      stackOrder: 2,
    },
  ]);
  const itemName = input.itemName === undefined ? undefined : readItemName(input.itemName);
  return frame(input.title ?? (itemName ? `Capitalised cost of each ${itemName}` : 'Capitalised cost compared'), [
    {
      data: { values },
      mark: { type: 'bar' },
      encoding: {
        y: {
          field: 'option',
          type: 'nominal',
          title: itemName ? capitalised(itemName) : null,
          sort: options.map((option) => option.label),
          axis: { labelLimit: 240 },
        },
        x: { field: 'cost', type: 'quantitative', title: `Capitalised cost (${input.comparison.costUnit})`, stack: 'zero' },
        color: { field: 'part', type: 'nominal', title: 'Part', scale: { domain: parts, range: [...seriesColours.slice(0, 3)] } },
        order: { field: 'stackOrder', type: 'quantitative' },
      },
    },
  ]);
}

export interface TransferComparisonInput {
  /** Per alternative (compareCompensationAlternatives gives both): the steady-state limit and the transfer within the angle limit. */
  alternatives: readonly { label: string; maximumTransferMw: number; loadabilityMw: number }[];
  /** The transfer the corridor must carry, drawn as a vertical line. */
  targetTransferMw?: number;
  /** What the study calls the items compared, for the title and the axis; "alternative" when left out. */
  itemName?: string;
  title?: string;
}

/** Maximum transfer and loadability of each alternative as overlaid horizontal bars, with the target transfer marked. */
export function transferComparisonChart(input: TransferComparisonInput): ChartSpec {
  const labels = seriesLabels(input.alternatives, 'alternatives');
  const itemName = readItemName(input.itemName ?? 'alternative');
  const parts = ['steady-state limit', 'within the angle limit'];
  const values = input.alternatives.flatMap((alternative, index) => [
    {
      alternative: alternative.label,
      part: parts[0],
      pMw: positive(alternative.maximumTransferMw, `alternatives[${index}].maximumTransferMw`, 'e.g. 1500 MW'),
    },
    { alternative: alternative.label, part: parts[1], pMw: finite(alternative.loadabilityMw, `alternatives[${index}].loadabilityMw`) },
  ]);
  const x = { field: 'pMw', type: 'quantitative', title: 'Transfer (MW)', scale: { zero: true } };
  const layers: ChartSpec[] = [
    {
      data: { values },
      mark: { type: 'bar' },
      encoding: {
        // Alternatives are named in words; the default label limit would cut most of them.
        y: { field: 'alternative', type: 'nominal', title: capitalised(itemName), sort: labels, axis: { labelLimit: 240 } },
        x: { ...x, stack: null },
        color: { field: 'part', type: 'nominal', title: 'Transfer', scale: { domain: parts, range: [seriesColours[1], seriesColours[0]] } },
      },
    },
  ];
  if (input.targetTransferMw !== undefined) {
    const target = positive(input.targetTransferMw, 'targetTransferMw', 'e.g. 1100 MW');
    layers.push(verticalRuleLayer(target, `target ${formatNumber(target)} MW`, x.title));
  }
  return frame(input.title ?? `Transfer limits of each ${itemName}`, layers);
}

/** The word a study uses for the items a chart compares: one short line of text. */
function readItemName(word: string): string {
  const trimmed = typeof word === 'string' ? word.trim() : '';
  if (trimmed === '' || trimmed.length > 40 || /[\r\n]/.test(trimmed)) {
    throw new ChartInputError('chart-input-out-of-range', {
      quantity: 'itemName',
      value: String(word),
      allowed: 'a word or two of up to 40 characters on one line',
      hint: 'Name the items compared as the study does, e.g. itemName: "alternative".',
    });
  }
  return trimmed;
}

function capitalised(word: string): string {
  return word.charAt(0).toUpperCase() + word.slice(1);
}

export interface TornadoInput {
  /** The figure whose sensitivity is drawn, with its unit, e.g. "Open-end voltage" in "pu". */
  figure: string;
  unit: string;
  /** Its value as run: where every bar starts. */
  asRun: number;
  /** One bar per uncertain input, in the order to draw them from the top (largest effect first). */
  bars: { label: string; low: number; high: number }[];
  title?: string;
}

const TORNADO_ENDS = ['input at its low end', 'input at its high end'] as const;

/** A tornado chart: for each input, the figure at the low and the high end of the input's range, as bars from the value as run. */
export function tornadoChart(input: TornadoInput): ChartSpec {
  const labels = seriesLabels(input.bars, 'bars');
  const asRun = finite(input.asRun, 'asRun');
  const values = input.bars.flatMap((bar, index) => [
    { input: bar.label, end: TORNADO_ENDS[0], from: asRun, to: finite(bar.low, `bars[${index}].low`) },
    { input: bar.label, end: TORNADO_ENDS[1], from: asRun, to: finite(bar.high, `bars[${index}].high`) },
  ]);
  const xTitle = input.unit ? `${input.figure} (${input.unit})` : input.figure;
  return frame(input.title ?? `Sensitivity of ${input.figure}`, [
    {
      data: { values },
      mark: { type: 'bar', opacity: 0.85 },
      encoding: {
        y: { field: 'input', type: 'nominal', title: 'Input', sort: labels },
        x: { field: 'to', type: 'quantitative', title: xTitle, scale: { zero: false } },
        x2: { field: 'from' },
        color: {
          field: 'end',
          type: 'nominal',
          title: 'Value with the',
          scale: { domain: [...TORNADO_ENDS], range: [...seriesColours.slice(0, 2)] },
        },
      },
    },
    verticalRuleLayer(asRun, 'as run', xTitle),
  ]);
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

/**
 * Vega lays a legend out by its own estimate of a label's width, 0.8 em a character when it has no canvas (as in a report), at the
 * theme's 10 px labels; a symbol and the gaps beside it take about 30 px more.
 */
const LEGEND_CHARACTER_PX = 8;
const LEGEND_ENTRY_EXTRA_PX = 30;
const LEGEND_MAX_COLUMNS = 3;

/** A legend that shows every label whole: as wide as the longest label, in as many columns (up to three) as fit the chart's width. */
function seriesLegend(labels: readonly string[]): { labelLimit: number; columns: number } {
  const labelLimit = Math.max(...labels.map((label) => label.length)) * LEGEND_CHARACTER_PX + LEGEND_CHARACTER_PX;
  const columns = Math.max(1, Math.min(LEGEND_MAX_COLUMNS, Math.floor(defaultWidthPx / (labelLimit + LEGEND_ENTRY_EXTRA_PX))));
  return { labelLimit, columns };
}

/** One line plus point layer per series, told apart by colour, dash pattern and point shape. */
function seriesLayer(
  values: Record<string, unknown>[],
  labels: string[],
  x: Record<string, unknown>,
  y: Record<string, unknown>,
  legendTitle: string,
): ChartSpec {
  const legend = seriesLegend(labels);
  const color = { field: 'series', type: 'nominal', title: legendTitle, legend, scale: { domain: labels, range: [...seriesColours] } };
  return {
    data: { values: withMarkers(values) },
    layer: [
      {
        mark: { type: 'line' },
        encoding: {
          x,
          y,
          color,
          strokeDash: { field: 'series', type: 'nominal', title: legendTitle, legend, scale: { domain: labels, range: seriesDashes } },
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
          shape: { field: 'series', type: 'nominal', title: legendTitle, legend, scale: { domain: labels, range: [...seriesShapes] } },
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

function verticalRuleLayer(value: number, note: string, title: string): ChartSpec {
  return {
    data: { values: [{ value, note }] },
    layer: [
      {
        mark: { type: 'rule', color: referenceInk, strokeDash: [4, 3], strokeWidth: 1 },
        encoding: { x: { field: 'value', type: 'quantitative', title } },
      },
      {
        mark: { type: 'text', angle: 270, align: 'right', baseline: 'bottom', dx: -4, dy: -2, fontSize: 9, color: referenceInk, y: 0 },
        encoding: { x: { field: 'value', type: 'quantitative', title }, text: { field: 'note' } },
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
