// The corridor as validated data: end systems, ordered buses, line sections with their circuits and series segments, compensation at buses.
import { fromPlain, type Complex } from './complex.ts';
import { SolverDomainError, optionalNumber, requireArray, requireChoice, requireNumber, requireObject } from './errors.ts';
import { MVAR_RANGE, sourceEquivalent } from './elements.ts';
import { FREQUENCY_RANGE_HZ, LENGTH_RANGE_KM, VOLTAGE_RANGE_KV, resolveLineConstants, type LinePerKmInput } from './lineModels.ts';
import type { PerKmConstants } from './twoPort.ts';
import { kvToV } from './units.ts';

/** A Thevenin system behind one end of the corridor: its strength, and either an EMF behind the impedance or a held bus voltage. */
export interface CorridorSystemInput {
  label?: string;
  shortCircuitMva: number;
  xOverR: number;
  /** Line-to-line EMF behind the Thevenin impedance. Give this or heldVoltageKv. */
  emfKv?: number;
  /** Line-to-line voltage held at the corridor's end bus (the system absorbs whatever vars that takes). */
  heldVoltageKv?: number;
}

/** One switchable unit of a shunt reactor or shunt capacitor bank (three-phase Mvar at its rated voltage). */
export interface ShuntUnitInput {
  name: string;
  qMvar: number;
  ratedVoltageKv: number;
  /** Whether the unit is in service unless a case says otherwise (default true). */
  inService?: boolean;
}

/** Static var compensator: output range at nominal voltage, V = Vref - slope x I_capacitive (slope in % on slopeBaseMva). */
export interface SvcInput {
  name: string;
  capacitiveMvar: number;
  inductiveMvar: number;
  slopePercent: number;
  /** Defaults to capacitiveMvar. */
  slopeBaseMva?: number;
  referenceVoltageKv: number;
  inService?: boolean;
}

/** A constant-power load at a bus (Q > 0 absorbs vars). */
export interface FixedLoadInput {
  name: string;
  pMw: number;
  qMvar: number;
  inService?: boolean;
}

export interface CorridorBusInput {
  name: string;
  reactors?: ShuntUnitInput[];
  capacitors?: ShuntUnitInput[];
  svc?: SvcInput;
  loads?: FixedLoadInput[];
}

export type SegmentPosition = 'sending-end' | 'mid-section' | 'receiving-end';

/** A series capacitor segment on a section (one per circuit; the reactance and ratings are per circuit, per phase). */
export interface SeriesSegmentInput {
  name: string;
  position: SegmentPosition;
  reactanceOhm: number;
  ratedCurrentA: number;
  emergencyCurrentA?: number;
  /** Whether the segment is bypassed unless a case says otherwise (default false). */
  bypassed?: boolean;
}

/** A line section between two consecutive buses; per-km constants are per circuit, positive sequence. */
export interface CorridorSectionInput extends Omit<LinePerKmInput, 'frequencyHz'> {
  name?: string;
  from: string;
  to: string;
  lengthKm: number;
  /** Identical parallel circuits (default 1); N-1 can take one of two out. */
  circuits?: 1 | 2;
  seriesCapacitors?: SeriesSegmentInput[];
}

export interface CorridorInput {
  label?: string;
  frequencyHz: number;
  nominalVoltageKv: number;
  sendingSystem: CorridorSystemInput;
  receivingSystem: CorridorSystemInput;
  /** From the sending end to the receiving end; at least two. */
  buses: CorridorBusInput[];
  /** One per pair of consecutive buses, in the same order. */
  sections: CorridorSectionInput[];
}

export interface CorridorSystem {
  label: string;
  shortCircuitMva: number;
  xOverR: number;
  /** Thevenin impedance at nominal voltage, |Z| = V^2 / S_sc at atan(X/R). */
  impedanceOhm: Complex;
  emfKv: number | null;
  heldVoltageKv: number | null;
}

export interface ShuntUnit {
  name: string;
  kind: 'shunt-reactor' | 'shunt-capacitor';
  busIndex: number;
  qMvar: number;
  ratedVoltageKv: number;
  /** Signed susceptance per phase (negative for a reactor). */
  susceptanceS: number;
  inService: boolean;
  path: string;
}

export interface Svc {
  name: string;
  busIndex: number;
  capacitiveMvar: number;
  inductiveMvar: number;
  slopePercent: number;
  slopeBaseMva: number;
  referenceVoltageKv: number;
  inService: boolean;
  path: string;
}

export interface FixedLoad {
  name: string;
  busIndex: number;
  pMw: number;
  qMvar: number;
  inService: boolean;
  path: string;
}

export interface SeriesSegment {
  name: string;
  sectionIndex: number;
  position: SegmentPosition;
  reactanceOhm: number;
  ratedCurrentA: number;
  emergencyCurrentA: number | null;
  bypassed: boolean;
  path: string;
}

export interface CorridorSection {
  name: string;
  index: number;
  fromIndex: number;
  toIndex: number;
  lengthKm: number;
  perKm: PerKmConstants;
  circuits: 1 | 2;
  seriesCapacitors: SeriesSegment[];
}

export interface CorridorBus {
  name: string;
  index: number;
  reactors: ShuntUnit[];
  capacitors: ShuntUnit[];
  svc: Svc | null;
  loads: FixedLoad[];
}

/** The validated corridor in SI-ready form; the one source for the case solver (and later for scans and fault currents). */
export interface Corridor {
  label: string;
  frequencyHz: number;
  nominalVoltageKv: number;
  sendingSystem: CorridorSystem;
  receivingSystem: CorridorSystem;
  buses: CorridorBus[];
  sections: CorridorSection[];
  /** Every switchable item by its name: shunt units, SVCs, loads and series segments. */
  unitsByName: Map<string, ShuntUnit | Svc | FixedLoad | SeriesSegment>;
}

const CORRIDOR_HINT =
  'A corridor is { frequencyHz, nominalVoltageKv, sendingSystem, receivingSystem, buses: [{ name, reactors?, capacitors?, svc?, loads? }], sections: [{ from, to, lengthKm, per-km constants, circuits?, seriesCapacitors? }] }.';

/** Runs a reader whose errors name bare fields (e.g. resolveLineConstants) and puts the field's path in front of the quantity. */
function atPath<T>(path: string, read: () => T): T {
  try {
    return read();
  } catch (error) {
    if (!(error instanceof SolverDomainError)) throw error;
    throw new SolverDomainError({
      code: error.code,
      quantity: `${path}.${error.quantity}`,
      value: error.value,
      allowedRange: error.allowedRange,
      hint: error.hint,
    });
  }
}

function requireName(path: string, value: unknown, hint: string): string {
  if (typeof value !== 'string' || value.trim() === '') {
    throw new SolverDomainError({
      code: value === undefined || value === null ? 'missing-quantity' : 'out-of-range',
      quantity: path,
      value: value === undefined || value === null ? null : String(value),
      allowedRange: 'a non-empty name',
      hint,
    });
  }
  return value;
}

function optionalBoolean(path: string, value: unknown, fallback: boolean, hint: string): boolean {
  if (value === undefined) return fallback;
  if (typeof value !== 'boolean') {
    throw new SolverDomainError({ code: 'out-of-range', quantity: path, value: String(value), allowedRange: 'true or false', hint });
  }
  return value;
}

function optionalList(path: string, value: unknown, hint: string): unknown[] {
  return value === undefined ? [] : requireArray(path, value, 0, hint);
}

function readSystem(path: string, value: unknown, nominalVoltageKv: number, fallbackLabel: string): CorridorSystem {
  const hint = 'A system is { shortCircuitMva, xOverR, emfKv } or { shortCircuitMva, xOverR, heldVoltageKv }.';
  const record = requireObject(path, value, hint);
  const shortCircuitMva = requireNumber(
    `${path}.shortCircuitMva`,
    record.shortCircuitMva,
    { min: 0, max: 1e6, minInclusive: false, unit: 'MVA' },
    hint,
  );
  const xOverR = requireNumber(
    `${path}.xOverR`,
    record.xOverR,
    { min: 0, max: 1e4, minInclusive: false },
    'Ratio of Thevenin reactance to resistance; transmission systems are typically 10 to 30.',
  );
  if ((record.emfKv === undefined) === (record.heldVoltageKv === undefined)) {
    throw new SolverDomainError({
      code: record.emfKv === undefined ? 'missing-quantity' : 'inconsistent-quantities',
      quantity: `${path}.emfKv (or ${path}.heldVoltageKv)`,
      value: record.emfKv === undefined ? null : 'both given',
      allowedRange: 'exactly one of emfKv and heldVoltageKv',
      hint: 'Give the EMF behind the Thevenin impedance, or the voltage the system holds at the corridor end bus.',
    });
  }
  const emfKv = record.emfKv === undefined ? null : requireNumber(`${path}.emfKv`, record.emfKv, VOLTAGE_RANGE_KV, hint);
  const heldVoltageKv =
    record.heldVoltageKv === undefined ? null : requireNumber(`${path}.heldVoltageKv`, record.heldVoltageKv, VOLTAGE_RANGE_KV, hint);
  return {
    label: typeof record.label === 'string' && record.label !== '' ? record.label : fallbackLabel,
    shortCircuitMva,
    xOverR,
    impedanceOhm: systemImpedanceOhm(nominalVoltageKv, shortCircuitMva, xOverR),
    emfKv,
    heldVoltageKv,
  };
}

/** Thevenin impedance of a system of the given strength at nominal voltage, as sourceEquivalent gives it. */
export function systemImpedanceOhm(nominalVoltageKv: number, shortCircuitMva: number, xOverR: number): Complex {
  return fromPlain(sourceEquivalent({ end: 'sending', shortCircuitMva, xOverR, nominalVoltageKv }).impedanceOhm);
}

function readShuntUnit(path: string, value: unknown, kind: ShuntUnit['kind'], busIndex: number): ShuntUnit {
  const hint = 'A shunt unit is { name, qMvar, ratedVoltageKv, inService? } with qMvar the three-phase rating at ratedVoltageKv.';
  const record = requireObject(path, value, hint);
  const name = requireName(`${path}.name`, record.name, hint);
  const qMvar = requireNumber(`${path}.qMvar`, record.qMvar, MVAR_RANGE, hint);
  const ratedVoltageKv = requireNumber(`${path}.ratedVoltageKv`, record.ratedVoltageKv, VOLTAGE_RANGE_KV, hint);
  const ratedV = kvToV(ratedVoltageKv);
  const magnitudeS = (qMvar * 1e6) / (ratedV * ratedV);
  return {
    name,
    kind,
    busIndex,
    qMvar,
    ratedVoltageKv,
    susceptanceS: kind === 'shunt-reactor' ? -magnitudeS : magnitudeS,
    inService: optionalBoolean(`${path}.inService`, record.inService, true, hint),
    path,
  };
}

function readSvc(path: string, value: unknown, busIndex: number): Svc {
  const hint =
    'An SVC is { name, capacitiveMvar, inductiveMvar, slopePercent, slopeBaseMva?, referenceVoltageKv, inService? }, ratings at nominal voltage.';
  const record = requireObject(path, value, hint);
  const capacitiveMvar = requireNumber(`${path}.capacitiveMvar`, record.capacitiveMvar, { min: 0, max: 1e5, unit: 'Mvar' }, hint);
  const inductiveMvar = requireNumber(`${path}.inductiveMvar`, record.inductiveMvar, { min: 0, max: 1e5, unit: 'Mvar' }, hint);
  if (capacitiveMvar + inductiveMvar <= 0) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: `${path}.capacitiveMvar + inductiveMvar`,
      value: 0,
      allowedRange: '(0, ∞) Mvar',
      hint: 'An SVC needs a range.',
    });
  }
  return {
    name: requireName(`${path}.name`, record.name, hint),
    busIndex,
    capacitiveMvar,
    inductiveMvar,
    slopePercent: requireNumber(
      `${path}.slopePercent`,
      record.slopePercent,
      { min: 0, max: 20, unit: '%' },
      'SVC slope, commonly 1 to 5 % (common practice).',
    ),
    slopeBaseMva: optionalNumber(
      `${path}.slopeBaseMva`,
      record.slopeBaseMva,
      Math.max(capacitiveMvar, inductiveMvar),
      { min: 0, max: 1e5, minInclusive: false, unit: 'MVA' },
      hint,
    ),
    referenceVoltageKv: requireNumber(`${path}.referenceVoltageKv`, record.referenceVoltageKv, VOLTAGE_RANGE_KV, hint),
    inService: optionalBoolean(`${path}.inService`, record.inService, true, hint),
    path,
  };
}

function readLoadUnit(path: string, value: unknown, busIndex: number): FixedLoad {
  const hint = 'A fixed load is { name, pMw, qMvar, inService? } (constant power, Q > 0 absorbs vars).';
  const record = requireObject(path, value, hint);
  return {
    name: requireName(`${path}.name`, record.name, hint),
    busIndex,
    pMw: requireNumber(`${path}.pMw`, record.pMw, { min: 0, max: 1e5, unit: 'MW' }, hint),
    qMvar: requireNumber(`${path}.qMvar`, record.qMvar, { min: -1e5, max: 1e5, unit: 'Mvar' }, hint),
    inService: optionalBoolean(`${path}.inService`, record.inService, true, hint),
    path,
  };
}

function readSegment(path: string, value: unknown, sectionIndex: number): SeriesSegment {
  const hint =
    "A series segment is { name, position: 'sending-end' | 'mid-section' | 'receiving-end', reactanceOhm, ratedCurrentA, emergencyCurrentA?, bypassed? }.";
  const record = requireObject(path, value, hint);
  const ratedCurrentA = requireNumber(`${path}.ratedCurrentA`, record.ratedCurrentA, { min: 0, max: 1e5, minInclusive: false, unit: 'A' }, hint);
  return {
    name: requireName(`${path}.name`, record.name, hint),
    sectionIndex,
    position: requireChoice(`${path}.position`, record.position, ['sending-end', 'mid-section', 'receiving-end'] as const, hint),
    reactanceOhm: requireNumber(`${path}.reactanceOhm`, record.reactanceOhm, { min: 0, max: 1e5, minInclusive: false, unit: 'ohm' }, hint),
    ratedCurrentA,
    emergencyCurrentA:
      record.emergencyCurrentA === undefined
        ? null
        : requireNumber(
            `${path}.emergencyCurrentA`,
            record.emergencyCurrentA,
            { min: ratedCurrentA, max: 1e5, unit: 'A' },
            'The emergency rating is at least the rated current.',
          ),
    bypassed: optionalBoolean(`${path}.bypassed`, record.bypassed, false, hint),
    path,
  };
}

/** Validates a corridor handed in by a study; every error names the path of the offending field, e.g. corridor.buses[2].reactors[0].qMvar. */
export function readCorridor(value: unknown, path = 'corridor'): Corridor {
  const record = requireObject(path, value, CORRIDOR_HINT);
  const frequencyHz = requireNumber(`${path}.frequencyHz`, record.frequencyHz, FREQUENCY_RANGE_HZ, 'Power frequency, usually 50 or 60 Hz.');
  const nominalVoltageKv = requireNumber(
    `${path}.nominalVoltageKv`,
    record.nominalVoltageKv,
    VOLTAGE_RANGE_KV,
    'Line-to-line nominal voltage of the corridor.',
  );
  const sendingSystem = readSystem(`${path}.sendingSystem`, record.sendingSystem, nominalVoltageKv, 'sending system');
  const receivingSystem = readSystem(`${path}.receivingSystem`, record.receivingSystem, nominalVoltageKv, 'receiving system');
  const unitsByName: Corridor['unitsByName'] = new Map();
  const register = <T extends ShuntUnit | Svc | FixedLoad | SeriesSegment>(item: T): T => {
    const earlier = unitsByName.get(item.name);
    if (earlier) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${item.path}.name`,
        value: item.name,
        allowedRange: `a name not used elsewhere (already used at ${earlier.path})`,
        hint: 'Cases switch units by name, so every reactor, capacitor step, SVC, load and series segment needs its own name.',
      });
    }
    unitsByName.set(item.name, item);
    return item;
  };
  const busNames = new Map<string, number>();
  const buses = requireArray(
    `${path}.buses`,
    record.buses,
    2,
    'List the buses from the sending end to the receiving end: at least the two end buses.',
  ).map((busValue, index): CorridorBus => {
    const busPath = `${path}.buses[${index}]`;
    const bus = requireObject(busPath, busValue, CORRIDOR_HINT);
    const name = requireName(`${busPath}.name`, bus.name, 'Every bus needs a name; cases and results refer to it.');
    if (busNames.has(name)) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${busPath}.name`,
        value: name,
        allowedRange: `a name not used by another bus (already buses[${busNames.get(name)}])`,
        hint: 'Bus names must be unique.',
      });
    }
    busNames.set(name, index);
    const unitHint = 'A list of units.';
    return {
      name,
      index,
      reactors: optionalList(`${busPath}.reactors`, bus.reactors, unitHint).map((unit, unitIndex) =>
        register(readShuntUnit(`${busPath}.reactors[${unitIndex}]`, unit, 'shunt-reactor', index)),
      ),
      capacitors: optionalList(`${busPath}.capacitors`, bus.capacitors, unitHint).map((unit, unitIndex) =>
        register(readShuntUnit(`${busPath}.capacitors[${unitIndex}]`, unit, 'shunt-capacitor', index)),
      ),
      svc: bus.svc === undefined ? null : register(readSvc(`${busPath}.svc`, bus.svc, index)),
      loads: optionalList(`${busPath}.loads`, bus.loads, unitHint).map((unit, unitIndex) =>
        register(readLoadUnit(`${busPath}.loads[${unitIndex}]`, unit, index)),
      ),
    };
  });
  const sectionsInput = requireArray(`${path}.sections`, record.sections, 1, 'One section between each pair of consecutive buses.');
  if (sectionsInput.length !== buses.length - 1) {
    throw new SolverDomainError({
      code: 'inconsistent-quantities',
      quantity: `${path}.sections.length`,
      value: sectionsInput.length,
      allowedRange: `${buses.length - 1} (one per pair of consecutive buses)`,
      hint: 'The corridor is a chain: section i joins buses[i] and buses[i + 1].',
    });
  }
  const sections = sectionsInput.map((sectionValue, index): CorridorSection => {
    const sectionPath = `${path}.sections[${index}]`;
    const section = requireObject(sectionPath, sectionValue, CORRIDOR_HINT);
    const expected = [buses[index]?.name, buses[index + 1]?.name] as [string, string];
    (['from', 'to'] as const).forEach((end, endIndex) => {
      const name = requireName(`${sectionPath}.${end}`, section[end], 'Name the buses the section joins.');
      if (name !== expected[endIndex]) {
        throw new SolverDomainError({
          code: busNames.has(name) ? 'inconsistent-quantities' : 'out-of-range',
          quantity: `${sectionPath}.${end}`,
          value: name,
          allowedRange: `'${expected[endIndex]}' (${busNames.has(name) ? 'sections join consecutive buses in order' : 'no bus has this name'})`,
          hint: `Section ${index} joins buses[${index}] '${expected[0]}' and buses[${index + 1}] '${expected[1]}'.`,
        });
      }
    });
    const constants = atPath(sectionPath, () => resolveLineConstants({ ...section, frequencyHz }));
    const circuits =
      section.circuits === undefined
        ? 1
        : requireNumber(`${sectionPath}.circuits`, section.circuits, { min: 1, max: 2 }, 'One or two identical circuits.');
    if (circuits !== 1 && circuits !== 2) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: `${sectionPath}.circuits`,
        value: circuits,
        allowedRange: '1 or 2',
        hint: 'One or two identical circuits.',
      });
    }
    return {
      name: section.name === undefined ? `${expected[0]} - ${expected[1]}` : requireName(`${sectionPath}.name`, section.name, 'A section name.'),
      index,
      fromIndex: index,
      toIndex: index + 1,
      lengthKm: requireNumber(`${sectionPath}.lengthKm`, section.lengthKm, LENGTH_RANGE_KM, 'Route length of this section.'),
      perKm: constants.perKm,
      circuits,
      seriesCapacitors: optionalList(`${sectionPath}.seriesCapacitors`, section.seriesCapacitors, 'A list of segments.').map(
        (segment, segmentIndex) => register(readSegment(`${sectionPath}.seriesCapacitors[${segmentIndex}]`, segment, index)),
      ),
    };
  });
  const sectionNames = new Set<string>();
  sections.forEach((section) => {
    if (sectionNames.has(section.name)) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${path}.sections[${section.index}].name`,
        value: section.name,
        allowedRange: 'a name not used by another section',
        hint: 'Cases take sections out by name.',
      });
    }
    sectionNames.add(section.name);
  });
  return {
    label: typeof record.label === 'string' && record.label !== '' ? record.label : `${buses[0]?.name} - ${buses[buses.length - 1]?.name}`,
    frequencyHz,
    nominalVoltageKv,
    sendingSystem,
    receivingSystem,
    buses,
    sections,
    unitsByName,
  };
}
