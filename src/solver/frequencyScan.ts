// Subsynchronous frequency scan: driving-point impedance of a radial chain seen from the generator internal node, its resonances and their torsional complements.
import { Complex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireChoice, requireNumber, requireObject } from './errors.ts';
import { FREQUENCY_RANGE_HZ, LENGTH_RANGE_KM, VOLTAGE_RANGE_KV, lineAbcd, resolveLineConstants } from './lineModels.ts';
import { ssrScreening, type SsrScreening } from './ssr.ts';
import { IDENTITY_ABCD, multiplyAbcd, seriesImpedanceAbcd, shuntAdmittanceAbcd, type AbcdMatrix } from './twoPort.ts';
import { angularFrequency, kmToM, kvToV } from './units.ts';

/** One element of the chain, from the generator internal node outwards; all impedances referred to one voltage level, at power frequency. */
export type ScanElement =
  | { kind: 'generator'; subtransientReactanceOhm: number; resistanceOhm?: number }
  | { kind: 'transformer'; reactanceOhm: number; resistanceOhm?: number }
  /** A lumped series R + jX, e.g. a line or an equivalent given only by its power-frequency impedance. */
  | { kind: 'series-impedance'; reactanceOhm: number; resistanceOhm?: number }
  | {
      kind: 'line-section';
      lengthKm: number;
      seriesResistanceOhmPerKm: number;
      seriesReactanceOhmPerKm?: number;
      seriesInductanceMhPerKm?: number;
      shuntSusceptanceUsPerKm?: number;
      shuntCapacitanceNfPerKm?: number;
      shuntConductanceUsPerKm?: number;
    }
  | { kind: 'series-capacitor'; reactanceOhm: number }
  | { kind: 'shunt-reactor'; reactanceOhm?: number; qMvar?: number; ratedVoltageKv?: number }
  /** A shunt capacitor bank to ground: its admittance rises with frequency. */
  | { kind: 'shunt-capacitor'; reactanceOhm?: number; qMvar?: number; ratedVoltageKv?: number }
  | { kind: 'system'; reactanceOhm: number; resistanceOhm?: number };

export interface FrequencyScanOptions {
  /** Power frequency f0, at which every element's data is given. */
  frequencyHz: number;
  elements: ScanElement[];
  startHz?: number;
  /** Defaults to 0.98 f0: just below power frequency. */
  stopHz?: number;
  stepHz?: number;
  torsionalModesHz?: number[];
  marginHz?: number;
}

export interface TorsionalProximity {
  modeHz: number;
  separationHz: number;
  withinMargin: boolean;
}

export interface SeriesResonance {
  /** Where the driving-point reactance rises through zero (a current resonance of the network). */
  frequencyHz: number;
  /** Network resistance at the resonance: the electrical damping the rotor sees there. */
  resistanceOhm: number;
  /** f0 - f_er: the rotor-side frequency this resonance excites. */
  complementHz: number;
  modes: TorsionalProximity[];
}

export interface FrequencyScan {
  frequencyHz: number;
  startHz: number;
  stopHz: number;
  stepHz: number;
  marginHz: number;
  /** Columns for a chart: the driving-point impedance at each scanned frequency. */
  points: { frequencyHz: number[]; resistanceOhm: number[]; reactanceOhm: number[]; magnitudeOhm: number[] };
  seriesResonances: SeriesResonance[];
  /** Where the reactance falls through a pole (a voltage resonance); listed for completeness, not an SSR finding by itself. */
  parallelResonancesHz: number[];
  /** The one-line f0 sqrt(Xc / X) screen on the same data (series reactances at f0, shunt branches neglected), or null without a capacitor. */
  handCheck: SsrScreening | null;
  lineModels: string[];
  warnings: string[];
}

const HINT =
  "Pass { frequencyHz, elements: [{ kind: 'generator', subtransientReactanceOhm }, { kind: 'transformer' | 'series-impedance', reactanceOhm, resistanceOhm? }, { kind: 'line-section', lengthKm, per-km constants at f0 }, { kind: 'series-capacitor', reactanceOhm }, { kind: 'shunt-reactor' | 'shunt-capacitor', reactanceOhm | qMvar + ratedVoltageKv }, { kind: 'system', reactanceOhm, resistanceOhm? }], torsionalModesHz?, marginHz? }, every impedance referred to one voltage level.";
const KINDS = [
  'generator',
  'transformer',
  'series-impedance',
  'line-section',
  'series-capacitor',
  'shunt-reactor',
  'shunt-capacitor',
  'system',
] as const;
const OHM_RANGE = { min: 0, max: 1e6, minInclusive: false, unit: 'ohm' } as const;
const RESISTANCE_RANGE = { min: 0, max: 1e6, unit: 'ohm' } as const;

/** An element reduced to what the scan needs: its ABCD at any frequency, and its contribution to the hand check. */
interface ScanBranch {
  kind: ScanElement['kind'];
  abcdAt(frequencyHz: number): AbcdMatrix;
  seriesInductiveOhmAtF0: number;
  seriesCapacitiveOhmAtF0: number;
}

function readElement(value: unknown, index: number, frequencyHz: number): ScanBranch {
  const where = `elements[${index}]`;
  const record = requireObject(where, value, HINT);
  const kind = requireChoice(`${where}.kind`, record.kind, KINDS, HINT);
  const ratio = (f: number) => f / frequencyHz;
  // Resistances are held at their power-frequency values: skin effect makes them smaller below f0, so the scan's damping is slightly optimistic.
  const resistance = (name: string) => optionalNumber(`${where}.${name}`, record[name], 0, RESISTANCE_RANGE, HINT);
  switch (kind) {
    case 'generator':
    case 'transformer':
    case 'series-impedance': {
      const reactanceName = kind === 'generator' ? 'subtransientReactanceOhm' : 'reactanceOhm';
      const reactanceOhm = requireNumber(`${where}.${reactanceName}`, record[reactanceName], OHM_RANGE, HINT);
      const resistanceOhm = resistance('resistanceOhm');
      return {
        kind,
        abcdAt: (f) => seriesImpedanceAbcd(new Complex(resistanceOhm, reactanceOhm * ratio(f))),
        seriesInductiveOhmAtF0: reactanceOhm,
        seriesCapacitiveOhmAtF0: 0,
      };
    }
    case 'series-capacitor': {
      const reactanceOhm = requireNumber(
        `${where}.reactanceOhm`,
        record.reactanceOhm,
        OHM_RANGE,
        'Capacitive reactance of the bank at power frequency, as a positive number.',
      );
      return {
        kind,
        abcdAt: (f) => seriesImpedanceAbcd(new Complex(0, -reactanceOhm / ratio(f))),
        seriesInductiveOhmAtF0: 0,
        seriesCapacitiveOhmAtF0: reactanceOhm,
      };
    }
    case 'shunt-reactor':
    case 'shunt-capacitor': {
      const reactanceOhm =
        record.reactanceOhm !== undefined
          ? requireNumber(`${where}.reactanceOhm`, record.reactanceOhm, OHM_RANGE, HINT)
          : kvToV(requireNumber(`${where}.ratedVoltageKv`, record.ratedVoltageKv, VOLTAGE_RANGE_KV, HINT)) ** 2 /
            (requireNumber(`${where}.qMvar`, record.qMvar, { min: 0, max: 1e5, minInclusive: false, unit: 'Mvar' }, HINT) * 1e6);
      const admittanceAt = (f: number) =>
        kind === 'shunt-reactor' ? new Complex(0, -1 / (reactanceOhm * ratio(f))) : new Complex(0, ratio(f) / reactanceOhm);
      return { kind, abcdAt: (f) => shuntAdmittanceAbcd(admittanceAt(f)), seriesInductiveOhmAtF0: 0, seriesCapacitiveOhmAtF0: 0 };
    }
    case 'system': {
      // A system is a branch to ground: its Thevenin impedance with the EMF short-circuited (the EMF has no subsynchronous component).
      const reactanceOhm = requireNumber(`${where}.reactanceOhm`, record.reactanceOhm, OHM_RANGE, HINT);
      const resistanceOhm = resistance('resistanceOhm');
      return {
        kind,
        abcdAt: (f) => shuntAdmittanceAbcd(new Complex(1, 0).div(new Complex(resistanceOhm, reactanceOhm * ratio(f)))),
        seriesInductiveOhmAtF0: reactanceOhm,
        seriesCapacitiveOhmAtF0: 0,
      };
    }
    case 'line-section': {
      const constants = resolveLineConstants({ ...record, frequencyHz });
      const lengthKm = requireNumber(`${where}.lengthKm`, record.lengthKm, LENGTH_RANGE_KM, HINT);
      if (!(constants.perKm.shuntSusceptanceUsPerKm > 0)) {
        throw new SolverDomainError({
          code: 'out-of-range',
          quantity: `${where}.shuntSusceptanceUsPerKm`,
          value: constants.perKm.shuntSusceptanceUsPerKm,
          allowedRange: '(0, 1000] uS/km',
          hint: 'The scan uses the distributed line; give the shunt susceptance or capacitance.',
        });
      }
      const omega0 = angularFrequency(frequencyHz);
      const resistanceOhmPerM = constants.seriesImpedanceOhmPerM.re;
      const inductanceHPerM = constants.seriesImpedanceOhmPerM.im / omega0;
      const conductanceSPerM = constants.shuntAdmittanceSPerM.re;
      const capacitanceFPerM = constants.shuntAdmittanceSPerM.im / omega0;
      return {
        kind,
        abcdAt: (f) => {
          const omega = angularFrequency(f);
          return lineAbcd(
            'distributed',
            new Complex(resistanceOhmPerM, omega * inductanceHPerM),
            new Complex(conductanceSPerM, omega * capacitanceFPerM),
            kmToM(lengthKm),
          );
        },
        seriesInductiveOhmAtF0: constants.perKm.seriesReactanceOhmPerKm * lengthKm,
        seriesCapacitiveOhmAtF0: 0,
      };
    }
  }
}

/** Driving-point impedance of the chain with its far end open: Z = A / C of the whole cascade. */
function drivingPointImpedance(branches: ScanBranch[], frequencyHz: number): Complex {
  const abcd = branches.reduce((product, branch) => multiplyAbcd(product, branch.abcdAt(frequencyHz)), IDENTITY_ABCD);
  if (abcd.C.abs() <= 1e-300) {
    throw new SolverDomainError({
      code: 'degenerate-network',
      quantity: 'elements',
      value: `C = ${abcd.C.abs()} S at ${frequencyHz} Hz`,
      allowedRange: 'a chain with a path to ground (a system, a shunt reactor or a line section)',
      hint: 'The generator sees an open circuit; end the chain with a system.',
    });
  }
  return abcd.A.div(abcd.C);
}

/** Bisects the sign change of the reactance between two scan points to about 1e-9 Hz. */
function bisectReactanceZero(branches: ScanBranch[], lowHz: number, highHz: number): number {
  let low = lowHz;
  let high = highHz;
  const lowSign = Math.sign(drivingPointImpedance(branches, low).im);
  for (let iteration = 0; iteration < 200 && high - low > 1e-9; iteration += 1) {
    const middle = (low + high) / 2;
    if (Math.sign(drivingPointImpedance(branches, middle).im) === lowSign) low = middle;
    else high = middle;
  }
  return (low + high) / 2;
}

/**
 * Scans the driving-point impedance from the generator internal node between startHz and stopHz: the reactance rising through
 * zero marks a series (current) resonance f_er, whose complement f0 - f_er is compared with the torsional modes; a fall through a
 * pole marks a parallel resonance. Sign changes are found on the grid and refined by bisection.
 */
export function frequencyScan(options: FrequencyScanOptions): FrequencyScan {
  const record = requireObject('options', options, HINT);
  const frequencyHz = requireNumber('frequencyHz', record.frequencyHz, FREQUENCY_RANGE_HZ, HINT);
  const branches = requireArray('elements', record.elements, 1, HINT).map((element, index) => readElement(element, index, frequencyHz));
  const startHz = optionalNumber(
    'startHz',
    record.startHz,
    1,
    { min: 0, max: frequencyHz, minInclusive: false, maxInclusive: false, unit: 'Hz' },
    HINT,
  );
  const stopHz = optionalNumber(
    'stopHz',
    record.stopHz,
    0.98 * frequencyHz,
    { min: startHz, max: frequencyHz, minInclusive: false, maxInclusive: false, unit: 'Hz' },
    'The scan covers the subsynchronous range, below power frequency.',
  );
  const stepHz = optionalNumber(
    'stepHz',
    record.stepHz,
    0.05,
    { min: 1e-3, max: stopHz - startHz, unit: 'Hz' },
    'A step small enough that no two resonances fall between neighbouring points (0.05 Hz default).',
  );
  const marginHz = optionalNumber('marginHz', record.marginHz, 1, { min: 0, max: frequencyHz, unit: 'Hz' }, HINT);
  const modesHz =
    record.torsionalModesHz === undefined
      ? []
      : requireArray('torsionalModesHz', record.torsionalModesHz, 0, HINT).map((mode, index) =>
          requireNumber(
            `torsionalModesHz[${index}]`,
            mode,
            { min: 0, max: frequencyHz, minInclusive: false, maxInclusive: false, unit: 'Hz' },
            'Torsional modes lie below power frequency.',
          ),
        );

  const count = Math.floor((stopHz - startHz) / stepHz + 1e-9);
  const frequencies = Array.from({ length: count + 1 }, (_, index) => startHz + index * stepHz);
  if (frequencies[count]! < stopHz) frequencies.push(stopHz);
  const points = { frequencyHz: frequencies, resistanceOhm: [] as number[], reactanceOhm: [] as number[], magnitudeOhm: [] as number[] };
  for (const f of frequencies) {
    const impedance = drivingPointImpedance(branches, f);
    points.resistanceOhm.push(impedance.re);
    points.reactanceOhm.push(impedance.im);
    points.magnitudeOhm.push(impedance.abs());
  }

  const seriesResonances: SeriesResonance[] = [];
  const parallelResonancesHz: number[] = [];
  for (let index = 0; index + 1 < points.frequencyHz.length; index += 1) {
    const before = points.reactanceOhm[index]!;
    const after = points.reactanceOhm[index + 1]!;
    const rising = before < 0 && after >= 0;
    const falling = before > 0 && after <= 0;
    if (!rising && !falling) continue;
    const resonanceHz = bisectReactanceZero(branches, points.frequencyHz[index]!, points.frequencyHz[index + 1]!);
    if (falling) {
      parallelResonancesHz.push(resonanceHz);
      continue;
    }
    const complementHz = frequencyHz - resonanceHz;
    seriesResonances.push({
      frequencyHz: resonanceHz,
      resistanceOhm: drivingPointImpedance(branches, resonanceHz).re,
      complementHz,
      modes: modesHz.map((modeHz) => {
        const separationHz = Math.abs(modeHz - complementHz);
        return { modeHz, separationHz, withinMargin: separationHz <= marginHz };
      }),
    });
  }

  const totalInductiveOhm = branches.reduce((sum, branch) => sum + branch.seriesInductiveOhmAtF0, 0);
  const totalCapacitiveOhm = branches.reduce((sum, branch) => sum + branch.seriesCapacitiveOhmAtF0, 0);
  const handCheck =
    totalCapacitiveOhm > 0 && totalCapacitiveOhm < totalInductiveOhm
      ? ssrScreening({
          frequencyHz,
          capacitorReactanceOhm: totalCapacitiveOhm,
          totalReactanceOhm: totalInductiveOhm,
          torsionalModesHz: modesHz,
          marginHz,
        })
      : null;

  const warnings = seriesResonances.flatMap((resonance) =>
    resonance.modes
      .filter((mode) => mode.withinMargin)
      .map(
        (mode) =>
          `Scan resonance ${resonance.frequencyHz.toFixed(2)} Hz has complement ${resonance.complementHz.toFixed(2)} Hz, ${mode.separationHz.toFixed(2)} Hz from the torsional mode ${mode.modeHz.toFixed(2)} Hz (margin ${marginHz} Hz): a detailed subsynchronous resonance study (eigenvalues or time domain, with the shaft model) is needed.`,
      ),
  );
  if (totalCapacitiveOhm > 0 && seriesResonances.length === 0) {
    warnings.push(`No series resonance between ${startHz} Hz and ${stopHz} Hz; check the scan range if the hand check places one outside it.`);
  }
  return assertFiniteResult('frequencyScan', {
    frequencyHz,
    startHz,
    stopHz,
    stepHz,
    marginHz,
    points,
    seriesResonances,
    parallelResonancesHz,
    handCheck,
    lineModels: branches.some((branch) => branch.kind === 'line-section') ? ['distributed'] : [],
    warnings,
  });
}
