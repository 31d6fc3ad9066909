// Operating cases of a corridor: a case's loading and switching state, solved by Newton-Raphson into per-bus, per-section and per-unit figures.
import { Complex, angleDegOf, toPlain } from './complex.ts';
import {
  readCorridor,
  systemImpedanceOhm,
  type Corridor,
  type CorridorInput,
  type CorridorSystem,
  type SeriesSegment,
  type ShuntUnit,
  type Svc,
} from './corridor.ts';
import {
  addSection,
  admittanceMatrix,
  newNetwork,
  newtonPowerFlow,
  sectionPieces,
  svcInjectionPu,
  type NetworkBuilder,
  type NodeSpec,
} from './corridorNetwork.ts';
import { seriesCapacitor } from './elements.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireChoice, requireNumber, requireObject } from './errors.ts';
import { VOLTAGE_RANGE_KV, lineModel } from './lineModels.ts';
import { voltageProfile } from './profile.ts';
import { noseLoadMultiple, readLoad, type LoadInput } from './solutions.ts';
import { IDENTITY_ABCD, cascade, multiplyAbcd, seriesImpedanceAbcd, shuntAdmittanceAbcd, type TwoPort } from './twoPort.ts';
import { kvToV, lineKvFromPhaseVolts, SQRT3, varToMvar, wToMw } from './units.ts';

/** Per-unit power base of the Newton iteration (results are in MW, Mvar, kV, A). */
export const BASE_MVA = 100;

export type CaseLoading =
  | ({ kind: 'receiving-load' } & LoadInput)
  | { kind: 'transfer'; pMw: number }
  | { kind: 'energisation'; closedEnd: 'sending' | 'receiving'; generator?: EnergisingGenerator };

/** A generator that energises the corridor on its own (its system's strength should then be the machine's). */
export interface EnergisingGenerator {
  ratedMva: number;
  /** Short-circuit ratio, 1 / x_d (unsaturated) on the machine's rating. */
  shortCircuitRatio: number;
}

export interface CaseSystemState {
  /** Weakened (or strengthened) short-circuit power for this case. */
  shortCircuitMva?: number;
  open?: boolean;
}

export interface VoltageControlInput {
  bus: string;
  voltageKv: number;
  qMinMvar?: number;
  qMaxMvar?: number;
}

export interface CorridorCaseInput {
  label: string;
  loading: CaseLoading;
  /** Units (shunt units, SVC, loads) switched in that are out by default. */
  unitsIn?: string[];
  /** Units switched out; a series segment named here is bypassed. */
  unitsOut?: string[];
  /** Series segments bypassed in this case. */
  bypassed?: string[];
  /** Series segments inserted in this case that are bypassed by default. */
  inserted?: string[];
  /** Sections with one circuit out (a single-circuit section named here is open). */
  circuitsOut?: string[];
  sendingSystem?: CaseSystemState;
  receivingSystem?: CaseSystemState;
  /** Buses held at a voltage by an ideal var source (with optional limits); the solution reports the vars it must supply. */
  voltageControl?: VoltageControlInput[];
}

export interface BusResult {
  name: string;
  voltageKv: number;
  voltagePu: number;
  angleDeg: number;
}

export interface SectionEndFlow {
  pMw: number;
  qMvar: number;
  /** Current per circuit. */
  currentA: number;
}

export interface SegmentResult {
  name: string;
  position: SeriesSegment['position'];
  bypassed: boolean;
  currentA: number;
  /** Voltage across the segment, per phase (rms). */
  voltageKv: number;
  ratedCurrentA: number;
  ratedVoltageKv: number;
  /** Current over rated current. */
  loadingPu: number;
  withinRating: boolean;
  emergencyCurrentA: number | null;
  withinEmergencyRating: boolean | null;
}

export interface SectionResult {
  name: string;
  from: string;
  to: string;
  circuitsInService: number;
  /** Flow into the section at its from-bus and out of it at its to-bus, all circuits together. */
  fromEnd: SectionEndFlow;
  toEnd: SectionEndFlow;
  lossesMw: number;
  /** Reactive power consumed (+) or generated (-) in the section. */
  reactiveBalanceMvar: number;
  /** Along the section: position from its from-bus and from the corridor's sending bus. */
  maximum: { positionKm: number; corridorKm: number; voltageKv: number; voltagePu: number };
  minimum: { positionKm: number; corridorKm: number; voltageKv: number; voltagePu: number };
  /** The sampled voltage along the section (profilePointCount points; a series segment gives two points at one place), for charts. */
  profile: { corridorKm: number[]; voltagePu: number[] };
  seriesCapacitors: SegmentResult[];
}

export interface ShuntUnitResult {
  name: string;
  bus: string;
  kind: ShuntUnit['kind'];
  inService: boolean;
  ratingMvar: number;
  /** Reactive power delivered to the bus at its voltage: positive capacitive, negative inductive. */
  outputMvar: number;
  currentA: number;
}

export interface SvcResult {
  name: string;
  bus: string;
  inService: boolean;
  voltageKv: number;
  /** Positive capacitive. */
  outputMvar: number;
  susceptanceS: number;
  currentA: number;
  /** The limit the SVC sits at (then a fixed susceptance), or null on its slope. */
  atLimit: 'capacitive' | 'inductive' | null;
}

export interface VoltageControlResult {
  /** 'sending system', 'receiving system', or the bus name of a voltage control or SVC. */
  source: string;
  kind: 'system' | 'voltage-control' | 'svc';
  bus: string;
  voltageKv: number;
  /** Reactive power this source supplies to the corridor (positive = supplied). */
  qMvar: number;
  pMw: number;
}

export interface SystemResult {
  connected: boolean;
  shortCircuitMva: number;
  /** Into the corridor at its end bus. */
  pMw: number;
  qMvar: number;
  emfKv: number | null;
  emfAngleDeg: number | null;
}

export interface EnergisationResult {
  closedEnd: 'sending' | 'receiving';
  energisingBus: string;
  openEndBus: string;
  openEndVoltageKv: number;
  openEndVoltagePu: number;
  /** The bus voltage before the line is connected: the system EMF (or the held voltage). */
  energisingBusVoltageBeforeKv: number;
  energisingBusVoltageKv: number;
  energisingBusRisePercent: number;
  highestAlongLine: { section: string; corridorKm: number; voltageKv: number; voltagePu: number };
  /**
   * Self-excitation screen for an energising generator (common practice, from memory): the machine can self-excite when the capacitive
   * reactance it sees falls to its synchronous reactance, i.e. when the net charging at nominal voltage exceeds SCR x rated MVA.
   */
  selfExcitation: {
    netChargingMvarAtNominal: number;
    /** SCR x rated MVA: the charging the machine can take without self-excitation. */
    machineLimitMvar: number;
    /** (limit - charging) / limit. */
    marginPercent: number;
    risk: boolean;
  } | null;
}

export interface SolvedCorridorCase {
  label: string;
  solved: true;
  loading: CaseLoading['kind'];
  lineModel: 'distributed';
  buses: BusResult[];
  sections: SectionResult[];
  shuntUnits: ShuntUnitResult[];
  svcs: SvcResult[];
  voltageControlled: VoltageControlResult[];
  systems: { sending: SystemResult; receiving: SystemResult };
  energisation: EnergisationResult | null;
  newton: { iterations: number; mismatchMva: number; toleranceMva: number; basisMva: number };
}

export interface UnsolvedCorridorCase {
  label: string;
  solved: false;
  loading: CaseLoading['kind'];
  reason: string;
}

export type CorridorCaseSolution = SolvedCorridorCase | UnsolvedCorridorCase;

const CASE_HINT =
  "A case is { label, loading: { kind: 'receiving-load', pMw, qMvar } | { kind: 'transfer', pMw } | { kind: 'energisation', closedEnd }, unitsIn?, unitsOut?, bypassed?, inserted?, circuitsOut?, sendingSystem?, receivingSystem?, voltageControl? }.";

/** A case in resolved form: the state of every unit and system. */
export interface CaseState {
  label: string;
  /** Where the case came from, e.g. cases[3], for errors in its data. */
  path: string;
  loading: CaseLoading['kind'];
  receivingLoad: Complex | null;
  transferMw: number;
  closedEnd: 'sending' | 'receiving' | null;
  generator: EnergisingGenerator | null;
  inService: (name: string) => boolean;
  bypassed: (segment: SeriesSegment) => boolean;
  circuitsInService: number[];
  systems: { sending: { system: CorridorSystem; connected: boolean }; receiving: { system: CorridorSystem; connected: boolean } };
  voltageControl: Array<{ busIndex: number; voltageKv: number; qMinMvar: number | null; qMaxMvar: number | null }>;
}

function nameList(path: string, value: unknown, corridor: Corridor, allowed: (kind: string) => boolean, what: string): Set<string> {
  const names = value === undefined ? [] : requireArray(path, value, 0, CASE_HINT);
  return new Set(
    names.map((name, index) => {
      const unit = typeof name === 'string' ? corridor.unitsByName.get(name) : undefined;
      if (!unit || !allowed(kindOfUnit(unit))) {
        const known = [...corridor.unitsByName.values()]
          .filter((candidate) => allowed(kindOfUnit(candidate)))
          .map((candidate) => `'${candidate.name}'`);
        throw new SolverDomainError({
          code: 'out-of-range',
          quantity: `${path}[${index}]`,
          value: String(name),
          allowedRange: known.length === 0 ? `no ${what} in this corridor` : `one of ${known.join(', ')}`,
          hint: `Name ${what} defined in the corridor.`,
        });
      }
      return name as string;
    }),
  );
}

function kindOfUnit(unit: ReturnType<Corridor['unitsByName']['get']>): string {
  if (!unit) return 'none';
  if ('kind' in unit) return unit.kind;
  if ('position' in unit) return 'segment';
  if ('slopePercent' in unit) return 'svc';
  return 'load';
}

function readSystemState(
  path: string,
  value: unknown,
  system: CorridorSystem,
  nominalVoltageKv: number,
): { system: CorridorSystem; connected: boolean } {
  if (value === undefined) return { system, connected: true };
  const record = requireObject(path, value, 'Pass { shortCircuitMva?, open? }.');
  const shortCircuitMva = optionalNumber(
    `${path}.shortCircuitMva`,
    record.shortCircuitMva,
    system.shortCircuitMva,
    { min: 0, max: 1e6, minInclusive: false, unit: 'MVA' },
    'The system strength in this case.',
  );
  if (record.open !== undefined && typeof record.open !== 'boolean') {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: `${path}.open`,
      value: String(record.open),
      allowedRange: 'true or false',
      hint: 'Whether this system is disconnected in the case.',
    });
  }
  return {
    system: { ...system, shortCircuitMva, impedanceOhm: systemImpedanceOhm(nominalVoltageKv, shortCircuitMva, system.xOverR) },
    connected: record.open !== true,
  };
}

export function readCase(corridor: Corridor, value: unknown, path: string): CaseState {
  const record = requireObject(path, value, CASE_HINT);
  const label = typeof record.label === 'string' && record.label !== '' ? record.label : path;
  const loadingRecord = requireObject(`${path}.loading`, record.loading, CASE_HINT);
  const loading = requireChoice(`${path}.loading.kind`, loadingRecord.kind, ['receiving-load', 'transfer', 'energisation'] as const, CASE_HINT);
  const isShunt = (kind: string) => kind === 'shunt-reactor' || kind === 'shunt-capacitor' || kind === 'svc' || kind === 'load';
  const unitsIn = nameList(`${path}.unitsIn`, record.unitsIn, corridor, isShunt, 'a shunt unit, SVC or load');
  const unitsOut = nameList(`${path}.unitsOut`, record.unitsOut, corridor, () => true, 'a unit');
  const bypassed = nameList(`${path}.bypassed`, record.bypassed, corridor, (kind) => kind === 'segment', 'a series segment');
  const inserted = nameList(`${path}.inserted`, record.inserted, corridor, (kind) => kind === 'segment', 'a series segment');
  for (const name of unitsIn) {
    if (unitsOut.has(name)) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${path}.unitsIn`,
        value: name,
        allowedRange: 'names not also in unitsOut',
        hint: 'A unit is either in or out in one case.',
      });
    }
  }
  for (const name of inserted) {
    if (bypassed.has(name) || unitsOut.has(name)) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${path}.inserted`,
        value: name,
        allowedRange: 'names not also bypassed',
        hint: 'A segment is either inserted or bypassed in one case.',
      });
    }
  }
  const sectionNames = corridor.sections.map((section) => section.name);
  const circuitsInService = corridor.sections.map((section) => section.circuits as number);
  (record.circuitsOut === undefined ? [] : requireArray(`${path}.circuitsOut`, record.circuitsOut, 0, CASE_HINT)).forEach((name, index) => {
    const sectionIndex = typeof name === 'string' ? sectionNames.indexOf(name) : -1;
    if (sectionIndex < 0) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: `${path}.circuitsOut[${index}]`,
        value: String(name),
        allowedRange: `one of ${sectionNames.map((candidate) => `'${candidate}'`).join(', ')}`,
        hint: 'Name the section that loses one circuit (N-1).',
      });
    }
    circuitsInService[sectionIndex] = Math.max(0, (circuitsInService[sectionIndex] as number) - 1);
  });
  const systems = {
    sending: readSystemState(`${path}.sendingSystem`, record.sendingSystem, corridor.sendingSystem, corridor.nominalVoltageKv),
    receiving: readSystemState(`${path}.receivingSystem`, record.receivingSystem, corridor.receivingSystem, corridor.nominalVoltageKv),
  };
  let receivingLoad: Complex | null = null;
  let transferMw = 0;
  let closedEnd: 'sending' | 'receiving' | null = null;
  let generator: EnergisingGenerator | null = null;
  const requireConnected = (end: 'sending' | 'receiving', why: string) => {
    if (!systems[end].connected) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${path}.${end}System.open`,
        value: 'true',
        allowedRange: 'false for this loading',
        hint: why,
      });
    }
  };
  if (loading === 'receiving-load') {
    receivingLoad = readLoad(`${path}.loading`, loadingRecord);
    requireConnected('sending', 'A receiving-end load is fed from the sending system.');
    systems.receiving = { ...systems.receiving, connected: false };
  } else if (loading === 'transfer') {
    transferMw = requireNumber(
      `${path}.loading.pMw`,
      loadingRecord.pMw,
      { min: -1e5, max: 1e5, unit: 'MW' },
      'Active power the receiving system absorbs (negative for a reverse transfer).',
    );
    requireConnected('sending', 'A transfer runs between both systems.');
    requireConnected('receiving', 'A transfer runs between both systems.');
  } else {
    closedEnd = requireChoice(
      `${path}.loading.closedEnd`,
      loadingRecord.closedEnd,
      ['sending', 'receiving'] as const,
      'The end whose breaker is closed; the other end is open.',
    );
    if (loadingRecord.generator !== undefined) {
      const generatorHint = 'A generator is { ratedMva, shortCircuitRatio } (SCR = 1 / unsaturated x_d on the machine rating; typically 0.4 to 1.2).';
      const machine = requireObject(`${path}.loading.generator`, loadingRecord.generator, generatorHint);
      generator = {
        ratedMva: requireNumber(
          `${path}.loading.generator.ratedMva`,
          machine.ratedMva,
          { min: 0, max: 1e5, minInclusive: false, unit: 'MVA' },
          generatorHint,
        ),
        shortCircuitRatio: requireNumber(
          `${path}.loading.generator.shortCircuitRatio`,
          machine.shortCircuitRatio,
          { min: 0, max: 10, minInclusive: false },
          generatorHint,
        ),
      };
    }
    requireConnected(closedEnd, 'The line is energised from the system at its closed end.');
    const openEnd = closedEnd === 'sending' ? 'receiving' : 'sending';
    systems[openEnd] = { ...systems[openEnd], connected: false };
  }
  const controlHint = 'A voltage control is { bus, voltageKv, qMinMvar?, qMaxMvar? }.';
  const voltageControl = (
    record.voltageControl === undefined ? [] : requireArray(`${path}.voltageControl`, record.voltageControl, 0, controlHint)
  ).map((item, index) => {
    const itemPath = `${path}.voltageControl[${index}]`;
    const control = requireObject(itemPath, item, controlHint);
    const busIndex = corridor.buses.findIndex((bus) => bus.name === control.bus);
    if (busIndex < 0) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: `${itemPath}.bus`,
        value: String(control.bus),
        allowedRange: `one of ${corridor.buses.map((bus) => `'${bus.name}'`).join(', ')}`,
        hint: 'Name a bus of the corridor.',
      });
    }
    const qMinMvar =
      control.qMinMvar === undefined
        ? null
        : requireNumber(`${itemPath}.qMinMvar`, control.qMinMvar, { min: -1e5, max: 1e5, unit: 'Mvar' }, controlHint);
    const qMaxMvar =
      control.qMaxMvar === undefined
        ? null
        : requireNumber(`${itemPath}.qMaxMvar`, control.qMaxMvar, { min: qMinMvar ?? -1e5, max: 1e5, unit: 'Mvar' }, controlHint);
    return { busIndex, voltageKv: requireNumber(`${itemPath}.voltageKv`, control.voltageKv, VOLTAGE_RANGE_KV, controlHint), qMinMvar, qMaxMvar };
  });
  return {
    label,
    path,
    loading,
    receivingLoad,
    transferMw,
    closedEnd,
    generator,
    inService: (name) => {
      const unit = corridor.unitsByName.get(name);
      if (unitsOut.has(name)) return false;
      if (unitsIn.has(name)) return true;
      return unit !== undefined && 'inService' in unit ? unit.inService : true;
    },
    bypassed: (segment) => bypassed.has(segment.name) || unitsOut.has(segment.name) || (segment.bypassed && !inserted.has(segment.name)),
    circuitsInService,
    systems,
    voltageControl,
  };
}

export interface BuiltCase {
  network: NetworkBuilder;
  specs: NodeSpec[];
  sectionBranches: number[][];
  systemNodes: { sending: number | null; receiving: number | null };
  slackEnd: 'sending' | 'receiving';
  svcs: Array<{ svc: Svc; atLimit: 'capacitive' | 'inductive' | null }>;
}

function endBusIndex(corridor: Corridor, end: 'sending' | 'receiving'): number {
  return end === 'sending' ? 0 : corridor.buses.length - 1;
}

/** Nodes reachable from the slack over branches with a series path. */
function reachable(network: NetworkBuilder, start: number): Set<number> {
  const seen = new Set([start]);
  const queue = [start];
  while (queue.length > 0) {
    const node = queue.pop() as number;
    for (const branch of network.branches) {
      const other = branch.from === node ? branch.to : branch.to === node ? branch.from : -1;
      if (other >= 0 && !seen.has(other)) {
        seen.add(other);
        queue.push(other);
      }
    }
  }
  return seen;
}

export function buildCase(corridor: Corridor, state: CaseState, svcLimits: Map<string, 'capacitive' | 'inductive'>): BuiltCase | { reason: string } {
  const network = newNetwork(corridor);
  const baseV = kvToV(corridor.nominalVoltageKv);
  const sectionBranches = corridor.sections.map((section) =>
    (state.circuitsInService[section.index] as number) === 0
      ? []
      : addSection(network, section, state.circuitsInService[section.index] as number, sectionPieces(section, state.bypassed)),
  );
  const specs: NodeSpec[] = [];
  const pq = (): NodeSpec => ({ type: 'pq', voltagePu: 1, pPu: 0, qPu: 0, svcSlope: null });
  const systemNodes: BuiltCase['systemNodes'] = { sending: null, receiving: null };
  const slackEnd: 'sending' | 'receiving' = state.systems.sending.connected ? 'sending' : 'receiving';
  const sourceSpecs: Array<{ node: number; spec: NodeSpec }> = [];
  (['sending', 'receiving'] as const).forEach((end) => {
    const { system, connected } = state.systems[end];
    if (!connected) return;
    const bus = endBusIndex(corridor, end);
    const type = end === slackEnd ? 'slack' : 'pv';
    const pPu = type === 'pv' ? -state.transferMw / BASE_MVA : 0;
    if (system.emfKv !== null) {
      const node = network.addNode();
      network.branches.push({
        from: node,
        to: bus,
        seriesS: new Complex(1, 0).div(system.impedanceOhm),
        shuntFromS: new Complex(0, 0),
        shuntToS: new Complex(0, 0),
        tag: { kind: 'system', end },
      });
      systemNodes[end] = node;
      sourceSpecs.push({ node, spec: { type, voltagePu: system.emfKv / corridor.nominalVoltageKv, pPu, qPu: 0, svcSlope: null } });
    } else {
      systemNodes[end] = bus;
      sourceSpecs.push({
        node: bus,
        spec: { type, voltagePu: (system.heldVoltageKv as number) / corridor.nominalVoltageKv, pPu, qPu: 0, svcSlope: null },
      });
    }
  });
  for (let node = 0; node < network.nodeCount; node += 1) specs.push(pq());
  for (const { node, spec } of sourceSpecs) specs[node] = spec;
  const svcs: BuiltCase['svcs'] = [];
  for (const bus of corridor.buses) {
    const spec = specs[bus.index] as NodeSpec;
    for (const unit of [...bus.reactors, ...bus.capacitors]) {
      if (state.inService(unit.name)) network.shuntS[bus.index] = (network.shuntS[bus.index] as Complex).add(new Complex(0, unit.susceptanceS));
    }
    for (const load of bus.loads) {
      if (!state.inService(load.name)) continue;
      spec.pPu -= load.pMw / BASE_MVA;
      spec.qPu -= load.qMvar / BASE_MVA;
    }
    if (bus.svc && state.inService(bus.svc.name)) {
      const svc = bus.svc;
      const limit = svcLimits.get(svc.name) ?? null;
      svcs.push({ svc, atLimit: limit });
      if (limit !== null) {
        const limitMvar = limit === 'capacitive' ? svc.capacitiveMvar : -svc.inductiveMvar;
        network.shuntS[bus.index] = (network.shuntS[bus.index] as Complex).add(new Complex(0, (limitMvar * 1e6) / (baseV * baseV)));
      } else if (spec.type !== 'pq') {
        throw new SolverDomainError({
          code: 'inconsistent-quantities',
          quantity: svc.path,
          value: svc.name,
          allowedRange: 'an SVC at a bus whose voltage no system holds',
          hint: `In case '${state.label}' (${state.path}) a system holds the voltage of bus '${bus.name}', so the SVC's share of the vars is undefined; move the SVC, give the system an EMF, or switch the SVC out.`,
        });
      } else if (svc.slopePercent === 0) {
        spec.type = 'pv';
        spec.voltagePu = svc.referenceVoltageKv / corridor.nominalVoltageKv;
      } else {
        spec.svcSlope = {
          basePu: svc.slopeBaseMva / BASE_MVA,
          referencePu: svc.referenceVoltageKv / corridor.nominalVoltageKv,
          slope: svc.slopePercent / 100,
        };
      }
    }
  }
  if (state.receivingLoad) {
    const spec = specs[endBusIndex(corridor, 'receiving')] as NodeSpec;
    spec.pPu -= wToMw(state.receivingLoad.re) / BASE_MVA;
    spec.qPu -= varToMvar(state.receivingLoad.im) / BASE_MVA;
  }
  state.voltageControl.forEach((control, index) => {
    const spec = specs[control.busIndex] as NodeSpec;
    const busName = corridor.buses[control.busIndex]?.name;
    if (spec.type !== 'pq' || spec.svcSlope) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: `${state.path}.voltageControl[${index}].bus`,
        value: String(busName),
        allowedRange: 'a bus whose voltage nothing else holds (no system holding it, no SVC in service, no other control)',
        hint: 'One bus can have one voltage control.',
      });
    }
    spec.type = 'pv';
    spec.voltagePu = control.voltageKv / corridor.nominalVoltageKv;
  });
  const slackNode = systemNodes[slackEnd];
  if (slackNode === null) return { reason: 'no system is connected to the corridor' };
  const supplied = reachable(network, slackNode);
  const cutOff = corridor.buses.filter((bus) => !supplied.has(bus.index)).map((bus) => `'${bus.name}'`);
  if (cutOff.length > 0) {
    const open = corridor.sections.filter((section) => state.circuitsInService[section.index] === 0).map((section) => `'${section.name}'`);
    return { reason: `the corridor is split (${open.join(', ')} open): bus(es) ${cutOff.join(', ')} are not connected to the ${slackEnd} system` };
  }
  return { network, specs, sectionBranches, systemNodes, slackEnd, svcs };
}

export interface CaseSolveSettings {
  /** Largest power mismatch accepted at convergence (default 1e-6 MVA). */
  toleranceMva: number;
  maxIterations: number;
  /** Points of the voltage profile along each section (default 101). */
  profilePointCount: number;
}

function readSettings(record: Record<string, unknown>): CaseSolveSettings {
  return {
    toleranceMva: optionalNumber(
      'toleranceMva',
      record.toleranceMva,
      1e-6,
      { min: 0, max: 1, minInclusive: false, unit: 'MVA' },
      'Power mismatch accepted at convergence.',
    ),
    maxIterations: optionalNumber('maxIterations', record.maxIterations, 30, { min: 1, max: 200 }, 'Newton iteration limit.'),
    profilePointCount: Math.round(
      optionalNumber('profilePointCount', record.profilePointCount, 101, { min: 2, max: 100_000 }, 'Points along each section.'),
    ),
  };
}

const formatMvar = (value: number) => String(Number(value.toPrecision(5)));

/**
 * For a receiving-end load on a plain chain (no other loads, SVCs on their slope or voltage controls), the largest load at the case's
 * power factor from the closed form on the chain's ABCD (noseLoadMultiple), so an unsolved case still says how far off it is.
 */
function chainNoseNote(corridor: Corridor, state: CaseState, built: BuiltCase): string {
  const receivingBus = endBusIndex(corridor, 'receiving');
  const load = state.receivingLoad;
  if (load === null || built.slackEnd !== 'sending') return '';
  const plain = built.specs.every(
    (spec, node) =>
      spec.type === 'slack' || (spec.type === 'pq' && spec.svcSlope === null && (node === receivingBus || (spec.pPu === 0 && spec.qPu === 0))),
  );
  if (!plain) return '';
  let chain = IDENTITY_ABCD;
  for (const branch of built.network.branches.filter((candidate) => candidate.tag.kind === 'system'))
    chain = multiplyAbcd(chain, seriesImpedanceAbcd(new Complex(1, 0).div(branch.seriesS)));
  chain = multiplyAbcd(chain, shuntAdmittanceAbcd(built.network.shuntS[0]!));
  for (const indices of built.sectionBranches) {
    for (const index of indices) {
      const branch = built.network.branches[index]!;
      // Internal nodes carry no shunt of their own; bus shunts enter once, at bus 0 above and at each section's to-bus below.
      chain = multiplyAbcd(chain, shuntAdmittanceAbcd(branch.shuntFromS));
      chain = multiplyAbcd(chain, seriesImpedanceAbcd(new Complex(1, 0).div(branch.seriesS)));
      chain = multiplyAbcd(chain, shuntAdmittanceAbcd(branch.shuntToS));
    }
    const toBus = built.network.branches[indices[indices.length - 1]!]?.to;
    if (toBus !== undefined) chain = multiplyAbcd(chain, shuntAdmittanceAbcd(built.network.shuntS[toBus]!));
  }
  const slack = built.specs[built.systemNodes.sending!]!;
  const multiple = noseLoadMultiple(chain, slack.voltagePu * kvToV(corridor.nominalVoltageKv), load);
  if (!Number.isFinite(multiple)) return '';
  return `; the largest load at this power factor is P = ${formatMvar(wToMw(multiple * load.re))} MW, Q = ${formatMvar(varToMvar(multiple * load.im))} Mvar (nose of the chain's P-V curve)`;
}

/** Solves one resolved case: Newton-Raphson, then SVCs past a limit become fixed susceptances and the case is solved again. */
export function solveCaseState(corridor: Corridor, state: CaseState, settings: CaseSolveSettings): CorridorCaseSolution {
  const unsolved = (reason: string): UnsolvedCorridorCase => ({ label: state.label, solved: false, loading: state.loading, reason });
  const baseV = kvToV(corridor.nominalVoltageKv);
  const baseImpedanceOhm = (baseV * baseV) / (BASE_MVA * 1e6);
  const limits = new Map<string, 'capacitive' | 'inductive'>();
  for (;;) {
    const built = buildCase(corridor, state, limits);
    if ('reason' in built) return unsolved(built.reason);
    const matrix = admittanceMatrix(built.network, baseImpedanceOhm);
    const flow = newtonPowerFlow(matrix, built.specs, settings.toleranceMva / BASE_MVA, settings.maxIterations);
    if (!flow.converged) {
      return unsolved(
        `Newton-Raphson found no operating point within ${settings.maxIterations} iterations (largest mismatch ${formatMvar(flow.mismatchPu * BASE_MVA)} MVA): ` +
          'the loading is beyond the nose of the P-V curve of the corridor in this switching state, or too close to it' +
          chainNoseNote(corridor, state, built),
      );
    }
    const injections = flow.voltages.map((voltage, node) =>
      voltage.mul(matrix[node]!.reduce((sum, y, k) => sum.add(y.mul(flow.voltages[k]!)), new Complex(0, 0)).conjugate()),
    );
    /** Reactive power (pu) a voltage-holding source at a node supplies beyond the node's own loads. */
    const heldQPu = (node: number) => injections[node]!.im - built.specs[node]!.qPu;
    let changed = false;
    for (const { svc, atLimit } of built.svcs) {
      if (atLimit !== null) continue;
      const spec = built.specs[svc.busIndex]!;
      const magnitude = flow.voltages[svc.busIndex]!.abs();
      const qPu = spec.svcSlope ? svcInjectionPu(spec.svcSlope, magnitude).q : heldQPu(svc.busIndex);
      const atNominalMvar = (qPu * BASE_MVA) / (magnitude * magnitude);
      if (atNominalMvar > svc.capacitiveMvar * (1 + 1e-9)) limits.set(svc.name, 'capacitive');
      else if (atNominalMvar < -svc.inductiveMvar * (1 + 1e-9)) limits.set(svc.name, 'inductive');
      else continue;
      changed = true;
    }
    if (changed) continue;
    for (const control of state.voltageControl) {
      const qMvar = heldQPu(control.busIndex) * BASE_MVA;
      if ((control.qMaxMvar !== null && qMvar > control.qMaxMvar) || (control.qMinMvar !== null && qMvar < control.qMinMvar)) {
        return unsolved(
          `holding bus '${corridor.buses[control.busIndex]?.name}' at ${control.voltageKv} kV needs ${formatMvar(qMvar)} Mvar, outside its range ` +
            `[${control.qMinMvar ?? '-∞'}, ${control.qMaxMvar ?? '∞'}] Mvar: the control is at its limit`,
        );
      }
    }
    return assembleSolution(corridor, state, settings, built, flow, injections, heldQPu);
  }
}

function assembleSolution(
  corridor: Corridor,
  state: CaseState,
  settings: CaseSolveSettings,
  built: BuiltCase,
  flow: { voltages: Complex[]; iterations: number; mismatchPu: number },
  injections: Complex[],
  heldQPu: (node: number) => number,
): SolvedCorridorCase {
  const nominalKv = corridor.nominalVoltageKv;
  const phaseBaseV = kvToV(nominalKv) / SQRT3;
  const phase = flow.voltages.map((voltage) => voltage.mul(phaseBaseV));
  const kvAt = (node: number) => lineKvFromPhaseVolts(phase[node]!.abs());
  const threePhase = (voltage: Complex, current: Complex) => voltage.mul(current.conjugate()).mul(3 / 1e6);
  const branchEnds = (index: number) => {
    const branch = built.network.branches[index]!;
    const through = branch.seriesS.mul(phase[branch.from]!.sub(phase[branch.to]!));
    return {
      branch,
      fromCurrent: through.add(branch.shuntFromS.mul(phase[branch.from]!)),
      toCurrent: through.sub(branch.shuntToS.mul(phase[branch.to]!)),
      through,
    };
  };
  const buses: BusResult[] = corridor.buses.map((bus) => ({
    name: bus.name,
    voltageKv: kvAt(bus.index),
    voltagePu: kvAt(bus.index) / nominalKv,
    angleDeg: angleDegOf(phase[bus.index]!),
  }));
  let offsetKm = 0;
  const sections: SectionResult[] = corridor.sections.map((section) => {
    const corridorStartKm = offsetKm;
    offsetKm += section.lengthKm;
    const circuits = state.circuitsInService[section.index] as number;
    const indices = built.sectionBranches[section.index] as number[];
    const from = corridor.buses[section.fromIndex]!.name;
    const to = corridor.buses[section.toIndex]!.name;
    const segmentResult = (segment: SeriesSegment, currentA: number, bypassed: boolean): SegmentResult => {
      const withinEmergency = segment.emergencyCurrentA === null ? null : currentA <= segment.emergencyCurrentA;
      return {
        name: segment.name,
        position: segment.position,
        bypassed,
        currentA,
        voltageKv: (currentA * segment.reactanceOhm) / 1e3,
        ratedCurrentA: segment.ratedCurrentA,
        ratedVoltageKv: (segment.ratedCurrentA * segment.reactanceOhm) / 1e3,
        loadingPu: currentA / segment.ratedCurrentA,
        withinRating: currentA <= segment.ratedCurrentA,
        emergencyCurrentA: segment.emergencyCurrentA,
        withinEmergencyRating: withinEmergency,
      };
    };
    if (circuits === 0) {
      const open: SectionEndFlow = { pMw: 0, qMvar: 0, currentA: 0 };
      const fromPoint = {
        positionKm: 0,
        corridorKm: corridorStartKm,
        voltageKv: kvAt(section.fromIndex),
        voltagePu: kvAt(section.fromIndex) / nominalKv,
      };
      return {
        name: section.name,
        from,
        to,
        circuitsInService: 0,
        fromEnd: open,
        toEnd: open,
        lossesMw: 0,
        reactiveBalanceMvar: 0,
        maximum: fromPoint,
        minimum: fromPoint,
        // An open section carries no voltage along it: nothing to draw.
        profile: { corridorKm: [], voltagePu: [] },
        seriesCapacitors: section.seriesCapacitors.map((segment) => segmentResult(segment, 0, state.bypassed(segment))),
      };
    }
    const first = branchEnds(indices[0]!);
    const last = branchEnds(indices[indices.length - 1]!);
    const sendingPower = threePhase(phase[section.fromIndex]!, first.fromCurrent);
    const receivingPower = threePhase(phase[section.toIndex]!, last.toCurrent);
    const segmentCurrents = new Map<string, number>();
    const pieces: TwoPort[] = indices.map((index) => {
      const { branch, through } = branchEnds(index);
      if (branch.tag.kind === 'segment') {
        segmentCurrents.set(branch.tag.segment.name, through.abs() / circuits);
        return seriesCapacitor({ reactanceOhm: branch.tag.segment.reactanceOhm, label: branch.tag.segment.name });
      }
      const lengthKm = branch.tag.kind === 'line' ? branch.tag.lengthKm : section.lengthKm;
      return lineModel({ frequencyHz: corridor.frequencyHz, ...section.perKm, lengthKm, label: `${section.name} ${lengthKm} km` });
    });
    const profile = voltageProfile({
      network: cascade({ elements: pieces, label: section.name }),
      operatingPoint: {
        sendingEnd: { phaseVoltageV: toPlain(phase[section.fromIndex]!), lineCurrentA: toPlain(first.fromCurrent.div(circuits)) },
        receivingEnd: { phaseVoltageV: toPlain(phase[section.toIndex]!), lineCurrentA: toPlain(last.toCurrent.div(circuits)) },
      },
      pointCount: settings.profilePointCount,
      nominalVoltageKv: nominalKv,
    });
    const extreme = (point: { positionKm: number; voltageKv: number }) => ({
      positionKm: point.positionKm,
      corridorKm: corridorStartKm + point.positionKm,
      voltageKv: point.voltageKv,
      voltagePu: point.voltageKv / nominalKv,
    });
    return {
      name: section.name,
      from,
      to,
      circuitsInService: circuits,
      fromEnd: { pMw: sendingPower.re, qMvar: sendingPower.im, currentA: first.fromCurrent.abs() / circuits },
      toEnd: { pMw: receivingPower.re, qMvar: receivingPower.im, currentA: last.toCurrent.abs() / circuits },
      lossesMw: sendingPower.re - receivingPower.re,
      reactiveBalanceMvar: sendingPower.im - receivingPower.im,
      maximum: extreme(profile.maximum),
      minimum: extreme(profile.minimum),
      profile: {
        corridorKm: profile.positionKm.map((positionKm) => corridorStartKm + positionKm),
        voltagePu: profile.voltageKv.map((voltageKv) => voltageKv / nominalKv),
      },
      seriesCapacitors: section.seriesCapacitors.map((segment) =>
        segmentResult(segment, segmentCurrents.get(segment.name) ?? 0, state.bypassed(segment)),
      ),
    };
  });
  const shuntUnits: ShuntUnitResult[] = corridor.buses.flatMap((bus) =>
    [...bus.reactors, ...bus.capacitors].map((unit) => {
      const inService = state.inService(unit.name);
      const voltage = phase[bus.index]!.abs();
      return {
        name: unit.name,
        bus: bus.name,
        kind: unit.kind,
        inService,
        ratingMvar: unit.qMvar,
        outputMvar: inService ? varToMvar(3 * unit.susceptanceS * voltage * voltage) : 0,
        currentA: inService ? Math.abs(unit.susceptanceS) * voltage : 0,
      };
    }),
  );
  const svcState = new Map(built.svcs.map((entry) => [entry.svc.name, entry.atLimit]));
  const svcOutputMvar = (svc: Svc): number => {
    const atLimit = svcState.get(svc.name) ?? null;
    const magnitude = flow.voltages[svc.busIndex]!.abs();
    if (atLimit === 'capacitive') return svc.capacitiveMvar * magnitude * magnitude;
    if (atLimit === 'inductive') return -svc.inductiveMvar * magnitude * magnitude;
    const spec = built.specs[svc.busIndex]!;
    return (spec.svcSlope ? svcInjectionPu(spec.svcSlope, magnitude).q : heldQPu(svc.busIndex)) * BASE_MVA;
  };
  const svcs: SvcResult[] = corridor.buses.flatMap((bus) => {
    if (!bus.svc) return [];
    const svc = bus.svc;
    const inService = svcState.has(svc.name);
    const voltageKv = kvAt(bus.index);
    const outputMvar = inService ? svcOutputMvar(svc) : 0;
    return [
      {
        name: svc.name,
        bus: bus.name,
        inService,
        voltageKv,
        outputMvar,
        susceptanceS: outputMvar / (voltageKv * voltageKv),
        currentA: Math.abs(outputMvar * 1e3) / (SQRT3 * voltageKv),
        atLimit: inService ? (svcState.get(svc.name) ?? null) : null,
      },
    ];
  });
  const systemResult = (end: 'sending' | 'receiving'): SystemResult => {
    const { system, connected } = state.systems[end];
    const node = built.systemNodes[end];
    const bus = endBusIndex(corridor, end);
    if (!connected || node === null)
      return { connected: false, shortCircuitMva: system.shortCircuitMva, pMw: 0, qMvar: 0, emfKv: null, emfAngleDeg: null };
    let power: Complex;
    if (node === bus) {
      power = new Complex(injections[bus]!.re - built.specs[bus]!.pPu, heldQPu(bus)).mul(BASE_MVA);
    } else {
      const index = built.network.branches.findIndex((branch) => branch.tag.kind === 'system' && branch.tag.end === end);
      power = threePhase(phase[bus]!, branchEnds(index).toCurrent);
    }
    return {
      connected: true,
      shortCircuitMva: system.shortCircuitMva,
      pMw: power.re,
      qMvar: power.im,
      emfKv: node === bus ? null : kvAt(node),
      emfAngleDeg: node === bus ? null : angleDegOf(phase[node]!),
    };
  };
  const systems = { sending: systemResult('sending'), receiving: systemResult('receiving') };
  const voltageControlled: VoltageControlResult[] = [
    ...(['sending', 'receiving'] as const).flatMap((end) =>
      systems[end].connected
        ? [
            {
              source: `${end} system`,
              kind: 'system' as const,
              bus: buses[endBusIndex(corridor, end)]!.name,
              voltageKv: buses[endBusIndex(corridor, end)]!.voltageKv,
              qMvar: systems[end].qMvar,
              pMw: systems[end].pMw,
            },
          ]
        : [],
    ),
    ...state.voltageControl.map((control) => ({
      source: corridor.buses[control.busIndex]!.name,
      kind: 'voltage-control' as const,
      bus: corridor.buses[control.busIndex]!.name,
      voltageKv: kvAt(control.busIndex),
      qMvar: heldQPu(control.busIndex) * BASE_MVA,
      pMw: 0,
    })),
    ...svcs
      .filter((svc) => svc.inService)
      .map((svc) => ({ source: svc.name, kind: 'svc' as const, bus: svc.bus, voltageKv: svc.voltageKv, qMvar: svc.outputMvar, pMw: 0 })),
  ];
  let energisation: EnergisationResult | null = null;
  if (state.closedEnd !== null) {
    const closed = state.closedEnd;
    const system = state.systems[closed].system;
    const energisingBus = buses[endBusIndex(corridor, closed)]!;
    const openBus = buses[endBusIndex(corridor, closed === 'sending' ? 'receiving' : 'sending')]!;
    const beforeKv = system.emfKv ?? (system.heldVoltageKv as number);
    const highest = sections.reduce((best, section) => (section.maximum.voltageKv > best.maximum.voltageKv ? section : best));
    energisation = {
      closedEnd: closed,
      energisingBus: energisingBus.name,
      openEndBus: openBus.name,
      openEndVoltageKv: openBus.voltageKv,
      openEndVoltagePu: openBus.voltagePu,
      energisingBusVoltageBeforeKv: beforeKv,
      energisingBusVoltageKv: energisingBus.voltageKv,
      energisingBusRisePercent: ((energisingBus.voltageKv - beforeKv) / beforeKv) * 100,
      highestAlongLine: {
        section: highest.name,
        corridorKm: highest.maximum.corridorKm,
        voltageKv: highest.maximum.voltageKv,
        voltagePu: highest.maximum.voltagePu,
      },
      selfExcitation: null,
    };
    if (state.generator) {
      // The vars the corridor returns to the machine, referred to nominal voltage (the corridor is linear at no load).
      const netChargingMvarAtNominal = -systems[closed].qMvar * (nominalKv / energisingBus.voltageKv) ** 2;
      const machineLimitMvar = state.generator.shortCircuitRatio * state.generator.ratedMva;
      energisation.selfExcitation = {
        netChargingMvarAtNominal,
        machineLimitMvar,
        marginPercent: ((machineLimitMvar - netChargingMvarAtNominal) / machineLimitMvar) * 100,
        risk: netChargingMvarAtNominal >= machineLimitMvar,
      };
    }
  }
  return {
    label: state.label,
    solved: true,
    loading: state.loading,
    lineModel: 'distributed',
    buses,
    sections,
    shuntUnits,
    svcs,
    voltageControlled,
    systems,
    energisation,
    newton: { iterations: flow.iterations, mismatchMva: flow.mismatchPu * BASE_MVA, toleranceMva: settings.toleranceMva, basisMva: BASE_MVA },
  };
}

const OPTIONS_HINT = 'Pass { corridor, case, toleranceMva?, maxIterations?, profilePointCount? }.';

/** Solves one operating case of a corridor. Bad data throws; a case without an operating point is returned as { solved: false, reason }. */
export function solveCorridorCase(options: {
  corridor: CorridorInput;
  case: CorridorCaseInput;
  toleranceMva?: number;
  maxIterations?: number;
  profilePointCount?: number;
}): CorridorCaseSolution {
  const record = requireObject('options', options, OPTIONS_HINT);
  const corridor = readCorridor(record.corridor);
  const state = readCase(corridor, record.case, 'case');
  return assertFiniteResult('solveCorridorCase', solveCaseState(corridor, state, readSettings(record)));
}

export interface CorridorCaseTable {
  corridor: string;
  busNames: string[];
  sectionNames: string[];
  cases: CorridorCaseSolution[];
}

/** Solves every case of a corridor, in order; unsolved cases stay in the table with their reason. */
export function solveCorridorCases(options: {
  corridor: CorridorInput;
  cases: CorridorCaseInput[];
  toleranceMva?: number;
  maxIterations?: number;
  profilePointCount?: number;
}): CorridorCaseTable {
  const record = requireObject('options', options, 'Pass { corridor, cases: [...], toleranceMva?, maxIterations?, profilePointCount? }.');
  const corridor = readCorridor(record.corridor);
  const settings = readSettings(record);
  const states = requireArray('cases', record.cases, 1, CASE_HINT).map((value, index) => readCase(corridor, value, `cases[${index}]`));
  return assertFiniteResult('solveCorridorCases', {
    corridor: corridor.label,
    busNames: corridor.buses.map((bus) => bus.name),
    sectionNames: corridor.sections.map((section) => section.name),
    cases: states.map((state) => solveCaseState(corridor, state, settings)),
  });
}

const BAND_RANGE = { min: 0.5, max: 1.5, unit: 'pu' };

/** A voltage band { min, max } in per unit, as the case tools take it (sizing, criteria). */
export function readVoltageBand(path: string, value: unknown): { min: number; max: number } {
  const band = requireObject(path, value, 'Pass { min, max } in per unit of the nominal voltage.');
  const min = requireNumber(`${path}.min`, band.min, BAND_RANGE, 'The lowest voltage allowed; the grid code and the planning criteria govern.');
  const max = requireNumber(`${path}.max`, band.max, { ...BAND_RANGE, min }, 'The highest voltage allowed, above the lowest.');
  return { min, max };
}

/** The lowest and highest voltage of a solved case, over every bus and every point along every section, and where each is. */
export function caseVoltageExtremes(solution: SolvedCorridorCase): { lowestPu: number; lowestAt: string; highestPu: number; highestAt: string } {
  const points = [
    ...solution.buses.map((bus) => ({ at: bus.name, pu: bus.voltagePu })),
    ...solution.sections.flatMap((section) => [
      { at: section.name, pu: section.maximum.voltagePu },
      { at: section.name, pu: section.minimum.voltagePu },
    ]),
  ];
  const lowest = points.reduce((best, point) => (point.pu < best.pu ? point : best));
  const highest = points.reduce((best, point) => (point.pu > best.pu ? point : best));
  return { lowestPu: lowest.pu, lowestAt: lowest.at, highestPu: highest.pu, highestAt: highest.at };
}
