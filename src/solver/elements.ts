// Lumped compensation and system elements as two-ports: series capacitor/reactor, shunt reactor/capacitor, source equivalents.
import { Complex, requireComplex, toPlain } from './complex.ts';
import { SolverDomainError, assertFiniteResult, forMessage, requireChoice, requireNumber, requireObject } from './errors.ts';
import { VOLTAGE_RANGE_KV } from './lineModels.ts';
import {
  abcdOf,
  abcdToPlain,
  cascade,
  checkReciprocity,
  elementsOf,
  labelOf,
  readTwoPort,
  seriesImpedanceAbcd,
  shuntAdmittanceAbcd,
  type CascadeTwoPort,
  type ElementTwoPort,
  type LumpedTwoPort,
  type SeriesElementTwoPort,
  type ShuntElementTwoPort,
  type SourceEquivalentTwoPort,
  type TwoPort,
} from './twoPort.ts';
import { kvToV } from './units.ts';

const REACTANCE_RANGE_OHM = { min: 0, max: 1e5, minInclusive: false, unit: 'ohm' } as const;
export const MVAR_RANGE = { min: 0, max: 1e5, minInclusive: false, unit: 'Mvar' } as const;

function labelFrom(record: Record<string, unknown>, fallback: string): string {
  return typeof record.label === 'string' && record.label !== '' ? record.label : fallback;
}

/** Total series reactance (ohm) of the line sections in a network, at their own frequency. */
export function lineSeriesReactanceOhm(network: TwoPort): number {
  return elementsOf(network)
    .filter((element) => element.kind === 'line-section')
    .reduce((sum, section) => sum + (section.kind === 'line-section' ? section.perKm.seriesReactanceOhmPerKm * section.lengthKm : 0), 0);
}

/** Total shunt susceptance (S) of the line sections in a network. */
export function lineShuntSusceptanceS(network: TwoPort): number {
  return elementsOf(network)
    .filter((element) => element.kind === 'line-section')
    .reduce((sum, section) => sum + (section.kind === 'line-section' ? section.perKm.shuntSusceptanceUsPerKm * 1e-6 * section.lengthKm : 0), 0);
}

/** Series capacitors of a network against the inductive reactance of its path (line sections and series reactors). */
function seriesPathReactances(network: TwoPort): { inductiveOhm: number; capacitiveOhm: number } {
  let inductiveOhm = lineSeriesReactanceOhm(network);
  let capacitiveOhm = 0;
  for (const element of elementsOf(network)) {
    if (element.kind === 'series-reactor') inductiveOhm += element.reactanceOhm;
    if (element.kind === 'series-capacitor') capacitiveOhm += element.reactanceOhm;
    if (element.kind === 'series-impedance') {
      if (element.B.im >= 0) inductiveOhm += element.B.im;
      else capacitiveOhm -= element.B.im;
    }
  }
  return { inductiveOhm, capacitiveOhm };
}

/**
 * A bank that cancels or reverses the path reactance (degree >= 1) makes the path net capacitive: the transfer-angle relations no
 * longer describe a compensated line. Refused the same way whether the bank was sized as a degree or given in ohms.
 */
export function requireInductiveSeriesPath(network: TwoPort): void {
  const { inductiveOhm, capacitiveOhm } = seriesPathReactances(network);
  if (capacitiveOhm > 0 && !(capacitiveOhm < inductiveOhm)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: `series capacitor reactance of '${labelOf(network)}' (ohm)`,
      value: capacitiveOhm,
      allowedRange: `(0, ${forMessage(inductiveOhm)}) ohm, below the series reactance of the path's line sections and series reactors`,
      hint: DEGREE_HINT,
    });
  }
}

const DEGREE_OF_COMPENSATION_RANGE = { min: 0, max: 1, minInclusive: false, maxInclusive: false } as const;
const DEGREE_HINT =
  "A degree of 1 or more would cancel or reverse the line's series reactance (series resonance at power frequency); practical banks are well below 1.";

export interface SeriesCapacitorOptions {
  label?: string;
  /** Capacitive reactance per phase. Give this, or degreeOfCompensation with compensatedLine. */
  reactanceOhm?: number;
  degreeOfCompensation?: number;
  /** The line (section or cascade) whose series reactance the degree refers to. */
  compensatedLine?: TwoPort;
}

/** Series capacitor bank: B = -jXc. Sized in ohms or as a degree of a line's series reactance. */
export function seriesCapacitor(options: SeriesCapacitorOptions): SeriesElementTwoPort {
  const hint = 'Pass { reactanceOhm } or { degreeOfCompensation, compensatedLine }.';
  const record = requireObject('options', options, hint);
  let reactanceOhm: number;
  let degreeOfCompensation: number | null = null;
  if (record.reactanceOhm !== undefined) {
    reactanceOhm = requireNumber('reactanceOhm', record.reactanceOhm, REACTANCE_RANGE_OHM, hint);
  } else {
    degreeOfCompensation = requireNumber('degreeOfCompensation', record.degreeOfCompensation, DEGREE_OF_COMPENSATION_RANGE, DEGREE_HINT);
    const line = readTwoPort('compensatedLine', record.compensatedLine);
    const lineReactance = lineSeriesReactanceOhm(line);
    if (!(lineReactance > 0)) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: 'compensatedLine',
        value: line.kind,
        allowedRange: 'a line section or a cascade containing line sections',
        hint: 'The degree of compensation refers to the series reactance of line sections built with lineModel.',
      });
    }
    reactanceOhm = degreeOfCompensation * lineReactance;
  }
  return assertFiniteResult('seriesCapacitor', {
    kind: 'series-capacitor' as const,
    label: labelFrom(record, `series capacitor ${reactanceOhm.toPrecision(4)} ohm`),
    reactanceOhm,
    degreeOfCompensation,
    ...abcdToPlain(seriesImpedanceAbcd(new Complex(0, -reactanceOhm))),
  });
}

/** Series reactor: B = +jX. */
export function seriesReactor(options: { reactanceOhm: number; label?: string }): SeriesElementTwoPort {
  const hint = 'Pass { reactanceOhm }.';
  const record = requireObject('options', options, hint);
  const reactanceOhm = requireNumber('reactanceOhm', record.reactanceOhm, REACTANCE_RANGE_OHM, hint);
  return assertFiniteResult('seriesReactor', {
    kind: 'series-reactor' as const,
    label: labelFrom(record, `series reactor ${reactanceOhm.toPrecision(4)} ohm`),
    reactanceOhm,
    degreeOfCompensation: null,
    ...abcdToPlain(seriesImpedanceAbcd(new Complex(0, reactanceOhm))),
  });
}

export interface ShuntElementOptions {
  label?: string;
  /** Three-phase rating at ratedVoltageKv (a positive magnitude). Give this, or admittanceS. */
  qMvar?: number;
  ratedVoltageKv?: number;
  /** Per-phase admittance; a reactor's imaginary part is negative, a capacitor's positive. */
  admittanceS?: { re: number; im: number };
}

function shuntElement(kind: 'shunt-reactor' | 'shunt-capacitor', options: ShuntElementOptions): ShuntElementTwoPort {
  const hint = 'Pass { qMvar, ratedVoltageKv } (three-phase Mvar at rated line-to-line kV) or { admittanceS: { re, im } }.';
  const record = requireObject('options', options, hint);
  const sign = kind === 'shunt-reactor' ? -1 : 1;
  let admittance: Complex;
  let qMvarAtRatedVoltage: number | null = null;
  let ratedVoltageKv: number | null = null;
  if (record.admittanceS !== undefined) {
    admittance = requireComplex('admittanceS', record.admittanceS, hint);
    if (!(admittance.im * sign > 0) || admittance.re < 0) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: 'admittanceS.im',
        value: admittance.im,
        allowedRange: kind === 'shunt-reactor' ? '(-∞, 0) S (inductive) with re >= 0' : '(0, ∞) S (capacitive) with re >= 0',
        hint: 'A reactor absorbs reactive power (negative susceptance); a capacitor supplies it (positive susceptance).',
      });
    }
  } else {
    qMvarAtRatedVoltage = requireNumber('qMvar', record.qMvar, MVAR_RANGE, hint);
    ratedVoltageKv = requireNumber('ratedVoltageKv', record.ratedVoltageKv, VOLTAGE_RANGE_KV, hint);
    const ratedVoltageV = kvToV(ratedVoltageKv);
    admittance = new Complex(0, (sign * qMvarAtRatedVoltage * 1e6) / (ratedVoltageV * ratedVoltageV));
  }
  const noun = kind === 'shunt-reactor' ? 'shunt reactor' : 'shunt capacitor';
  const fallbackLabel = qMvarAtRatedVoltage === null ? noun : `${noun} ${qMvarAtRatedVoltage} Mvar`;
  return assertFiniteResult(kind === 'shunt-reactor' ? 'shuntReactor' : 'shuntCapacitor', {
    kind,
    label: labelFrom(record, fallbackLabel),
    admittanceS: toPlain(admittance),
    qMvarAtRatedVoltage,
    ratedVoltageKv,
    ...abcdToPlain(shuntAdmittanceAbcd(admittance)),
  });
}

/** Shunt reactor: C = Y with an inductive (negative) susceptance. */
export function shuntReactor(options: ShuntElementOptions): ShuntElementTwoPort {
  return shuntElement('shunt-reactor', options);
}

/** Shunt capacitor bank: C = Y with a capacitive (positive) susceptance. */
export function shuntCapacitor(options: ShuntElementOptions): ShuntElementTwoPort {
  return shuntElement('shunt-capacitor', options);
}

export interface SourceEquivalentOptions {
  label?: string;
  end: 'sending' | 'receiving';
  shortCircuitMva: number;
  xOverR: number;
  nominalVoltageKv: number;
}

/**
 * Thevenin impedance of a system behind a line end, |Z| = V^2 / S_sc at angle atan(X/R).
 * Placed first (sending system) or last (receiving system) in a cascade; its far terminal is the system EMF.
 */
export function sourceEquivalent(options: SourceEquivalentOptions): SourceEquivalentTwoPort {
  const hint = 'Pass { end, shortCircuitMva, xOverR, nominalVoltageKv }.';
  const record = requireObject('options', options, hint);
  const end = requireChoice('end', record.end, ['sending', 'receiving'] as const, hint);
  const shortCircuitMva = requireNumber('shortCircuitMva', record.shortCircuitMva, { min: 0, max: 1e6, minInclusive: false, unit: 'MVA' }, hint);
  const xOverR = requireNumber(
    'xOverR',
    record.xOverR,
    { min: 0, max: 1e4, minInclusive: false },
    'Ratio of Thevenin reactance to resistance; transmission systems are typically 10 to 30.',
  );
  const nominalVoltageKv = requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, hint);
  const voltageV = kvToV(nominalVoltageKv);
  const magnitudeOhm = (voltageV * voltageV) / (shortCircuitMva * 1e6);
  const angleRad = Math.atan(xOverR);
  const impedance = new Complex(magnitudeOhm * Math.cos(angleRad), magnitudeOhm * Math.sin(angleRad));
  return assertFiniteResult('sourceEquivalent', {
    kind: 'source-equivalent' as const,
    label: labelFrom(record, `${end} system ${shortCircuitMva} MVA`),
    end,
    impedanceOhm: toPlain(impedance),
    shortCircuitMva,
    xOverR,
    nominalVoltageKv,
    ...abcdToPlain(seriesImpedanceAbcd(impedance)),
  });
}

/** Series impedance R + jX (either sign of X) as a two-port: B = Z. */
export function seriesImpedance(options: { resistanceOhm: number; reactanceOhm: number; label?: string }): LumpedTwoPort {
  const hint = 'Pass { resistanceOhm, reactanceOhm, label? } per phase (reactance negative for a capacitive element).';
  const record = requireObject('options', options, hint);
  const resistanceOhm = requireNumber('resistanceOhm', record.resistanceOhm, { min: 0, max: 1e5, unit: 'ohm' }, hint);
  const reactanceOhm = requireNumber('reactanceOhm', record.reactanceOhm, { min: -1e5, max: 1e5, unit: 'ohm' }, hint);
  return assertFiniteResult('seriesImpedance', {
    kind: 'series-impedance' as const,
    label: labelFrom(record, `series impedance ${resistanceOhm} + j${reactanceOhm} ohm`),
    ...abcdToPlain(seriesImpedanceAbcd(new Complex(resistanceOhm, reactanceOhm))),
  });
}

/** Symmetrical pi from the total series impedance Z and total shunt admittance Y (Y/2 at each end): A = D = 1 + ZY/2, C = Y (1 + ZY/4). */
export function symmetricalPi(options: {
  seriesImpedanceOhm: { re: number; im: number };
  shuntAdmittanceS: { re: number; im: number };
  label?: string;
}): LumpedTwoPort {
  const hint = 'Pass { seriesImpedanceOhm: { re, im }, shuntAdmittanceS: { re, im } (the total, split half to each end), label? }.';
  const record = requireObject('options', options, hint);
  const impedance = requireComplex('seriesImpedanceOhm', record.seriesImpedanceOhm, hint);
  const admittance = requireComplex('shuntAdmittanceS', record.shuntAdmittanceS, hint);
  const halfShunt = shuntAdmittanceAbcd(admittance.div(2));
  const matrix = [halfShunt, seriesImpedanceAbcd(impedance), halfShunt].reduce((product, part) => ({
    A: product.A.mul(part.A).add(product.B.mul(part.C)),
    B: product.A.mul(part.B).add(product.B.mul(part.D)),
    C: product.C.mul(part.A).add(product.D.mul(part.C)),
    D: product.C.mul(part.B).add(product.D.mul(part.D)),
  }));
  return assertFiniteResult('symmetricalPi', { kind: 'pi-section' as const, label: labelFrom(record, 'pi section'), ...abcdToPlain(matrix) });
}

/**
 * A two-port from given A, B, C, D (B in ohm, C in S), e.g. printed in a data sheet. A passive reciprocal network has AD - BC = 1;
 * printed values hold it only to their rounding, so the tolerance is the caller's statement of that rounding.
 */
export function twoPortFromAbcd(options: {
  A: { re: number; im: number };
  B: { re: number; im: number };
  C: { re: number; im: number };
  D: { re: number; im: number };
  tolerance?: number;
  label?: string;
}): LumpedTwoPort {
  const hint =
    'Pass { A, B, C, D } as { re, im } (B in ohm, C in S), tolerance? (AD - BC = 1 within it; 1e-6 by default, about 1e-3 for values rounded to 3-4 digits), label? }.';
  const record = requireObject('options', options, hint);
  const values = Object.fromEntries((['A', 'B', 'C', 'D'] as const).map((key) => [key, requireComplex(key, record[key], hint)])) as Record<
    'A' | 'B' | 'C' | 'D',
    Complex
  >;
  const tolerance = requireNumber('tolerance', record.tolerance ?? 1e-6, { min: 0, max: 0.05, minInclusive: false }, hint);
  const element = {
    kind: 'given-two-port' as const,
    label: labelFrom(record, 'given two-port'),
    ...abcdToPlain({ A: values.A, B: values.B, C: values.C, D: values.D }),
  };
  checkReciprocity({ network: element, tolerance });
  return assertFiniteResult('twoPortFromAbcd', element);
}

function reversedElement(element: ElementTwoPort): ElementTwoPort {
  const { A, B, C, D } = abcdOf(element);
  const swapped = { ...element, ...abcdToPlain({ A: D, B, C, D: A }) };
  return element.kind === 'source-equivalent'
    ? ({ ...swapped, end: element.end === 'sending' ? 'receiving' : 'sending' } as ElementTwoPort)
    : (swapped as ElementTwoPort);
}

/** The same network energised from the other end: elements in reverse order, each with A and D swapped ([A B; C D] becomes [D B; C A]). */
export function reverseTwoPort(options: { network: TwoPort; label?: string }): CascadeTwoPort {
  const hint = 'Pass { network, label? }.';
  const record = requireObject('options', options, hint);
  const network = readTwoPort('network', record.network);
  const elements = elementsOf(network).map(reversedElement).reverse();
  return cascade({ elements, label: labelFrom(record, `${network.label} (from the other end)`) });
}
