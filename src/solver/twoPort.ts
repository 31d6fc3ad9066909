// Two-port (ABCD) algebra: the plain-data two-port types, cascading, and the reciprocity check AD - BC = 1.
import { Complex, toPlain, requireComplex, type ComplexValue } from './complex.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireObject } from './errors.ts';

export type LineModelName = 'distributed' | 'nominal-pi' | 'short';

/** Per-km constants of a line in practitioner units, as stored on a line section. */
export interface PerKmConstants {
  seriesResistanceOhmPerKm: number;
  seriesReactanceOhmPerKm: number;
  shuntConductanceUsPerKm: number;
  shuntSusceptanceUsPerKm: number;
}

interface TwoPortCore {
  label: string;
  /** Dimensionless. */
  A: ComplexValue;
  /** Ohm. */
  B: ComplexValue;
  /** Siemens. */
  C: ComplexValue;
  /** Dimensionless. */
  D: ComplexValue;
}

export interface LineSectionTwoPort extends TwoPortCore {
  kind: 'line-section';
  model: LineModelName;
  lengthKm: number;
  frequencyHz: number;
  /** Per-km constants as used (susceptance net of any uniformly distributed shunt compensation). */
  perKm: PerKmConstants;
  /** Share of the line's own charging susceptance cancelled by distributed shunt reactors (0 for a plain line). */
  distributedShuntCompensationDegree: number;
  /** Doubts about the line data (e.g. waves faster than light), as sentences a study can pass to caution(). */
  warnings: string[];
}

export interface SeriesElementTwoPort extends TwoPortCore {
  kind: 'series-capacitor' | 'series-reactor';
  /** Magnitude of the element's reactance per phase. */
  reactanceOhm: number;
  /** Share of a line's series reactance this capacitor cancels, when it was sized that way. */
  degreeOfCompensation: number | null;
}

export interface ShuntElementTwoPort extends TwoPortCore {
  kind: 'shunt-reactor' | 'shunt-capacitor';
  admittanceS: ComplexValue;
  /** Three-phase reactive power at rated voltage (positive magnitude), or null when given as an admittance only. */
  qMvarAtRatedVoltage: number | null;
  ratedVoltageKv: number | null;
}

export interface SourceEquivalentTwoPort extends TwoPortCore {
  kind: 'source-equivalent';
  end: 'sending' | 'receiving';
  impedanceOhm: ComplexValue;
  shortCircuitMva: number;
  xOverR: number;
  nominalVoltageKv: number;
}

/** A lumped element built from totals: a series impedance R + jX, a symmetrical pi, or ABCD values given directly (checked). */
export interface LumpedTwoPort extends TwoPortCore {
  kind: 'series-impedance' | 'pi-section' | 'given-two-port';
}

export type ElementTwoPort = LineSectionTwoPort | SeriesElementTwoPort | ShuntElementTwoPort | SourceEquivalentTwoPort | LumpedTwoPort;

export interface CascadeTwoPort extends TwoPortCore {
  kind: 'cascade';
  /** The elementary two-ports from the sending end to the receiving end (nested cascades are flattened). */
  elements: ElementTwoPort[];
}

export type TwoPort = ElementTwoPort | CascadeTwoPort;

/** ABCD held as complex.js values for arithmetic. */
export interface AbcdMatrix {
  A: Complex;
  B: Complex;
  C: Complex;
  D: Complex;
}

const TWO_PORT_HINT = 'Pass a two-port built by the solver (lineModel, seriesCapacitor, shuntReactor, sourceEquivalent, cascade, ...).';

export function abcdOf(twoPort: TwoPortCore): AbcdMatrix {
  return {
    A: new Complex(twoPort.A.re, twoPort.A.im),
    B: new Complex(twoPort.B.re, twoPort.B.im),
    C: new Complex(twoPort.C.re, twoPort.C.im),
    D: new Complex(twoPort.D.re, twoPort.D.im),
  };
}

export function abcdToPlain(matrix: AbcdMatrix): Pick<TwoPortCore, 'A' | 'B' | 'C' | 'D'> {
  return { A: toPlain(matrix.A), B: toPlain(matrix.B), C: toPlain(matrix.C), D: toPlain(matrix.D) };
}

export const IDENTITY_ABCD: AbcdMatrix = {
  A: new Complex(1, 0),
  B: new Complex(0, 0),
  C: new Complex(0, 0),
  D: new Complex(1, 0),
};

/** Product first * second: the network "first, then second" seen from the sending end. */
export function multiplyAbcd(first: AbcdMatrix, second: AbcdMatrix): AbcdMatrix {
  return {
    A: first.A.mul(second.A).add(first.B.mul(second.C)),
    B: first.A.mul(second.B).add(first.B.mul(second.D)),
    C: first.C.mul(second.A).add(first.D.mul(second.C)),
    D: first.C.mul(second.B).add(first.D.mul(second.D)),
  };
}

/** Voltage and current at the far side of a two-port from its sending side: V' = D V - B I, I' = A I - C V (valid as AD - BC = 1). */
export function throughTwoPort(abcd: AbcdMatrix, voltage: Complex, current: Complex): { voltage: Complex; current: Complex } {
  return { voltage: abcd.D.mul(voltage).sub(abcd.B.mul(current)), current: abcd.A.mul(current).sub(abcd.C.mul(voltage)) };
}

export function seriesImpedanceAbcd(impedanceOhm: Complex): AbcdMatrix {
  return { A: new Complex(1, 0), B: impedanceOhm, C: new Complex(0, 0), D: new Complex(1, 0) };
}

export function shuntAdmittanceAbcd(admittanceS: Complex): AbcdMatrix {
  return { A: new Complex(1, 0), B: new Complex(0, 0), C: admittanceS, D: new Complex(1, 0) };
}

const ELEMENT_KINDS = new Set([
  'line-section',
  'series-capacitor',
  'series-reactor',
  'shunt-reactor',
  'shunt-capacitor',
  'source-equivalent',
  'series-impedance',
  'pi-section',
  'given-two-port',
  'cascade',
]);

/** Validates a two-port handed in by a study block (it may have travelled through JSON). */
export function readTwoPort(quantity: string, value: unknown): TwoPort {
  const record = requireObject(quantity, value, TWO_PORT_HINT);
  if (typeof record.kind !== 'string' || !ELEMENT_KINDS.has(record.kind)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: `${quantity}.kind`,
      value: record.kind === undefined ? null : String(record.kind),
      allowedRange: [...ELEMENT_KINDS].map((kind) => `'${kind}'`).join(', '),
      hint: TWO_PORT_HINT,
    });
  }
  for (const key of ['A', 'B', 'C', 'D'] as const) requireComplex(`${quantity}.${key}`, record[key], TWO_PORT_HINT);
  if (record.kind === 'cascade') {
    requireArray(`${quantity}.elements`, record.elements, 1, TWO_PORT_HINT).forEach((element, index) =>
      readTwoPort(`${quantity}.elements[${index}]`, element),
    );
  }
  return record as unknown as TwoPort;
}

/** The elementary two-ports of a network in order from the sending end. */
export function elementsOf(network: TwoPort): ElementTwoPort[] {
  return network.kind === 'cascade' ? network.elements : [network];
}

export function labelOf(network: TwoPort): string {
  return typeof network.label === 'string' && network.label !== '' ? network.label : network.kind;
}

/** Cascade any sequence of two-ports, sending end first, into one two-port. */
export function cascade(options: { elements: TwoPort[]; label?: string }): CascadeTwoPort {
  const record = requireObject('options', options, 'Pass { elements: [twoPort, ...], label? }.');
  const elementsInput = requireArray('elements', record.elements, 1, 'List the two-ports from the sending end to the receiving end.');
  const elements = elementsInput.flatMap((element, index) => elementsOf(readTwoPort(`elements[${index}]`, element)));
  const product = elements.reduce((accumulated, element) => multiplyAbcd(accumulated, abcdOf(element)), IDENTITY_ABCD);
  const label = typeof record.label === 'string' && record.label !== '' ? record.label : elements.map(labelOf).join(' + ');
  return assertFiniteResult('cascade', { kind: 'cascade', label, ...abcdToPlain(product), elements });
}

export interface ReciprocityCheck {
  label: string;
  determinant: ComplexValue;
  deviation: number;
  tolerance: number;
  elementsChecked: number;
  ok: true;
}

function determinantDeviation(matrix: AbcdMatrix): { determinant: Complex; deviation: number } {
  const determinant = matrix.A.mul(matrix.D).sub(matrix.B.mul(matrix.C));
  return { determinant, deviation: determinant.sub(1).abs() };
}

/** A cascade's ABCD must be the product of its elements' ABCD; a hand-edited total can keep AD - BC = 1 and still be wrong. */
function requireProductOfElements(network: CascadeTwoPort, tolerance: number): void {
  const product = network.elements.reduce((accumulated, element) => multiplyAbcd(accumulated, abcdOf(element)), IDENTITY_ABCD);
  const stored = abcdOf(network);
  for (const key of ['A', 'B', 'C', 'D'] as const) {
    const deviation = stored[key].sub(product[key]).abs();
    if (!(deviation <= tolerance * Math.max(product[key].abs(), stored[key].abs(), key === 'A' || key === 'D' ? 1 : 0) + Number.MIN_VALUE)) {
      throw new SolverDomainError({
        code: 'reciprocity-violated',
        quantity: `${key} of the cascade '${labelOf(network)}'`,
        value: `${stored[key].re} + j${stored[key].im}`,
        allowedRange: `${product[key].re} + j${product[key].im} ± ${tolerance} relative`,
        hint: 'The stored total of a cascade must equal the product of its elements; rebuild it with cascade() instead of editing its ABCD values.',
        message: `${key} of the cascade '${labelOf(network)}' = ${stored[key].re} + j${stored[key].im} differs from the product of its ${network.elements.length} element(s), ${product[key].re} + j${product[key].im}`,
      });
    }
  }
}

/**
 * Passive, reciprocal networks keep AD - BC = 1; a violation means corrupted or hand-edited data.
 * Checks every element, that a cascade's total is the product of its elements, then the whole network, and names the first offender.
 */
export function checkReciprocity(options: { network: TwoPort; tolerance?: number }): ReciprocityCheck {
  const record = requireObject('options', options, 'Pass { network, tolerance? }.');
  const network = readTwoPort('network', record.network);
  const tolerance = optionalNumber(
    'tolerance',
    record.tolerance,
    1e-9,
    { min: 0, max: 0.1, minInclusive: false },
    'A small positive number such as 1e-9.',
  );
  const elements = elementsOf(network);
  const candidates: Array<{ where: string; twoPort: TwoPortCore }> = elements.map((element, index) => ({
    where: `element ${index} ('${labelOf(element)}', ${element.kind})`,
    twoPort: element,
  }));
  if (network.kind === 'cascade') {
    candidates.push({ where: `the cascade '${labelOf(network)}' as a whole`, twoPort: network });
  }
  for (const candidate of candidates) {
    const { deviation, determinant } = determinantDeviation(abcdOf(candidate.twoPort));
    if (!(deviation <= tolerance)) {
      throw new SolverDomainError({
        code: 'reciprocity-violated',
        quantity: `AD - BC of ${candidate.where}`,
        value: `${determinant.re} + j${determinant.im}`,
        allowedRange: `1 ± ${tolerance}`,
        hint: 'A passive two-port must satisfy AD - BC = 1; rebuild this element with the solver instead of editing its ABCD values.',
        message: `AD - BC of ${candidate.where} = ${determinant.re} + j${determinant.im} deviates from 1 by ${deviation}, more than the tolerance ${tolerance}`,
      });
    }
  }
  if (network.kind === 'cascade') requireProductOfElements(network, tolerance);
  const whole = determinantDeviation(abcdOf(network));
  return assertFiniteResult('checkReciprocity', {
    label: labelOf(network),
    determinant: toPlain(whole.determinant),
    deviation: whole.deviation,
    tolerance,
    elementsChecked: elements.length,
    ok: true as const,
  });
}
