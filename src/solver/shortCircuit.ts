// Short circuits on a corridor case: the passive network with every EMF short-circuited, the strength at each bus, and fault currents through series banks.
import { Complex } from './complex.ts';
import { readCorridor, type Corridor, type CorridorInput } from './corridor.ts';
import { BASE_MVA, buildCase, readCase, type BuiltCase, type CaseState, type CorridorCaseInput } from './cases.ts';
import { admittanceMatrix, linePiS, solveLinear } from './corridorNetwork.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireNumber, requireObject } from './errors.ts';
import { goldsworthyEquivalent } from './varistorEnergy.ts';
import { SQRT3, kvToV, phaseVoltsFromLineKv, vToKv, vaToMva } from './units.ts';

/** The case's network for short-circuit work: a system behind an EMF is grounded through its impedance, a held bus gets it as a shunt. */
interface PassiveNetwork {
  built: BuiltCase;
  /** Nodes left once the EMF nodes are grounded, in matrix order. */
  kept: number[];
}

function passiveNetwork(corridor: Corridor, state: CaseState, systemImpedanceFactor = 1): PassiveNetwork | null {
  const built = buildCase(corridor, state, new Map());
  if ('reason' in built) return null;
  for (const branch of built.network.branches) if (branch.tag.kind === 'system') branch.seriesS = branch.seriesS.div(systemImpedanceFactor);
  const grounded = new Set<number>();
  (['sending', 'receiving'] as const).forEach((end) => {
    const node = built.systemNodes[end];
    if (node === null || !state.systems[end].connected) return;
    const bus = end === 'sending' ? 0 : corridor.buses.length - 1;
    if (node === bus) {
      const impedanceOhm = state.systems[end].system.impedanceOhm.mul(systemImpedanceFactor);
      built.network.shuntS[bus] = built.network.shuntS[bus]!.add(new Complex(1, 0).div(impedanceOhm));
    } else grounded.add(node);
  });
  const kept = Array.from({ length: built.network.nodeCount }, (_, node) => node).filter((node) => !grounded.has(node));
  return { built, kept };
}

/** Node voltages for a unit current injected at one node (a column of Z = Y^-1), in the given impedance base; null when singular. */
function impedanceColumn(passive: PassiveNetwork, node: number, baseImpedanceOhm: number): Complex[] | null {
  const full = admittanceMatrix(passive.built.network, baseImpedanceOhm);
  const { kept } = passive;
  const size = kept.length;
  // The complex system Y x = e_k as a real one of twice the size.
  const real = Array.from({ length: 2 * size }, () => new Array<number>(2 * size).fill(0));
  kept.forEach((rowNode, row) =>
    kept.forEach((columnNode, column) => {
      const y = full[rowNode]![columnNode]!;
      real[row]![column] = y.re;
      real[row]![size + column] = -y.im;
      real[size + row]![column] = y.im;
      real[size + row]![size + column] = y.re;
    }),
  );
  const rhs = new Array<number>(2 * size).fill(0);
  rhs[kept.indexOf(node)] = 1;
  const solution = solveLinear(real, rhs);
  if (solution === null) return null;
  const column = Array.from({ length: passive.built.network.nodeCount }, () => new Complex(0, 0));
  kept.forEach((keptNode, position) => {
    column[keptNode] = new Complex(solution[position]!, solution[size + position]!);
  });
  return column;
}

/**
 * Short-circuit power (MVA) at every corridor bus: V_nom^2 / |Z_kk| with Z = Y^-1 of the case's passive network, every source EMF
 * short-circuited; a system given by a held bus voltage enters as its Thevenin impedance to ground. Constant-power loads, SVCs on their
 * slope and ideal voltage controls are left out (they do not set the short-circuit level).
 */
export function shortCircuitMvaAtBuses(corridor: Corridor, state: CaseState): number[] | null {
  const passive = passiveNetwork(corridor, state);
  if (passive === null) return null;
  const baseV = kvToV(corridor.nominalVoltageKv);
  const baseImpedanceOhm = (baseV * baseV) / (BASE_MVA * 1e6);
  const result: number[] = [];
  for (const bus of corridor.buses) {
    const column = impedanceColumn(passive, bus.index, baseImpedanceOhm);
    if (column === null) return null;
    result.push(BASE_MVA / column[bus.index]!.abs());
  }
  return result;
}

export interface SegmentFaultDuty {
  name: string;
  section: string;
  /** Whether the segment is in the circuit in this case (a bypassed segment carries no current). */
  inserted: boolean;
  /** Current per circuit with the capacitor taken as linear (no varistor): an upper bound where the varistor conducts. */
  linearCurrentA: number;
  /** Current per circuit with the varistor's Goldsworthy equivalent in the network; equal to the linear one without a protective level. */
  currentA: number;
  /** Current over the protective-level current; null without a protective level. */
  currentRatioPu: number | null;
  varistorConducts: boolean;
  /** The bank's series equivalent in the fault, R - j X (X = Xc when the varistor does not conduct). */
  equivalentResistanceOhm: number;
  equivalentReactanceOhm: number;
  /**
   * Peak of the fundamental-frequency voltage across the capacitor, sqrt 2 I |R_eq - j X_eq|. While the varistor conducts the instantaneous
   * voltage is clipped at the protective level, and this fundamental may exceed it by up to 4/pi.
   */
  capacitorVoltageKvPeak: number;
}

/** Where the fault is: at a bus, or on a section at a distance from its from-bus. */
export type FaultPlace = { bus: string } | { section: string; distanceKm: number };

export interface CorridorFault {
  case: string;
  /** The bus, or the section and distance, in words. */
  faultAt: string;
  method: string;
  voltageFactor: number;
  /** Initial symmetrical short-circuit current at the fault (three-phase, bolted), rms. */
  faultCurrentKa: number;
  /** The same with every series capacitor taken as linear. */
  linearFaultCurrentKa: number;
  shortCircuitMva: number;
  segments: SegmentFaultDuty[];
  /** Fixed-point iterations of the varistor equivalents (0 when no segment has a protective level). */
  iterations: number;
}

const HINT =
  'Pass { corridor, case, at: { bus } | { section, distanceKm }, voltageFactor?, protectiveLevelsKvPeak?: { <segment name>: kV peak } }; the case sets the switching state.';
const ITERATION_LIMIT = 200;
const ITERATION_TOLERANCE = 1e-9;

/**
 * A three-phase bolted fault at a corridor bus or at a point of a line section (the line side of a series segment is the point where its
 * line piece starts), by the equivalent voltage source at the fault (IEC 60909-0: c U_n / sqrt 3, every other
 * source short-circuited, pre-fault load currents left out; each system as a feeder of impedance c U_n^2 / S_sc) on the case's network
 * with line charging and connected shunts. Each
 * inserted series segment's current follows from the node voltages; where a segment has a protective level its capacitor-varistor
 * pair is replaced by Goldsworthy's equivalent for the current it carries, and the network is solved again until the currents settle.
 */
export function corridorFault(options: {
  corridor: CorridorInput;
  case: CorridorCaseInput;
  at: FaultPlace;
  voltageFactor?: number;
  protectiveLevelsKvPeak?: Record<string, number>;
}): CorridorFault {
  const record = requireObject('options', options, HINT);
  const corridor = readCorridor(record.corridor);
  const state = readCase(corridor, record.case, 'case');
  const place = readFaultPlace(corridor, state, record.at);
  const voltageFactor = optionalNumber(
    'voltageFactor',
    record.voltageFactor,
    1.1,
    { min: 0.9, max: 1.2, unit: 'pu' },
    'IEC 60909-0 voltage factor c: 1.1 for the highest currents at high voltage, 1.0 for the lowest.',
  );
  const segments = corridor.sections.flatMap((section) => section.seriesCapacitors.map((segment) => ({ segment, section })));
  const levels = readProtectiveLevels(record.protectiveLevelsKvPeak, new Set(segments.map(({ segment }) => segment.name)));
  // IEC 60909-0 gives a network feeder the impedance c U_n^2 / S''_k, so that a fault at its own bus draws the stated S''_k.
  const passive = passiveNetwork(corridor, state, voltageFactor);
  const faultNode = passive === null ? null : faultNodeOf(corridor, state, passive, place);
  if (passive === null || faultNode === null) {
    throw new SolverDomainError({
      code: 'no-operating-point',
      quantity: 'case',
      value: state.label,
      allowedRange: 'a case in which the fault point is connected to a system',
      hint: 'The case splits the corridor or disconnects both systems; a fault needs a source.',
    });
  }
  const segmentBranches = passive.built.network.branches.filter((branch) => branch.tag.kind === 'segment');
  const circuitsOf = (sectionIndex: number) => state.circuitsInService[sectionIndex] as number;
  const sourcePhaseV = voltageFactor * phaseVoltsFromLineKv(corridor.nominalVoltageKv);

  const solve = () => {
    const column = impedanceColumn(passive, faultNode, 1);
    if (column === null) {
      throw new SolverDomainError({
        code: 'degenerate-network',
        quantity: 'at',
        value: place.description,
        allowedRange: 'a bus with a path to a source',
        hint: 'The network of the case is singular at the fault bus.',
      });
    }
    // Node voltages are Z_ik I_f; only magnitudes are reported, so the phase of I_f does not matter.
    const faultCurrentA = sourcePhaseV / column[faultNode]!.abs();
    const currents = new Map(
      segmentBranches.map((branch) => {
        const tag = branch.tag as { kind: 'segment'; segment: { name: string; sectionIndex: number } };
        const dropV = column[branch.from]!.sub(column[branch.to]!).mul(faultCurrentA);
        return [tag.segment.name, dropV.mul(branch.seriesS).abs() / circuitsOf(tag.segment.sectionIndex)];
      }),
    );
    return { faultCurrentA, currents };
  };

  const linear = solve();
  let settled = linear;
  let iterations = 0;
  const equivalents = new Map<string, { resistancePu: number; reactancePu: number; ratio: number }>();
  if (segmentBranches.some((branch) => levels.has((branch.tag as { segment: { name: string } }).segment.name))) {
    // Under-relaxed fixed point on each bank's current ratio: the equivalent's reactance falls as the current rises, which can overshoot.
    const ratios = new Map<string, number>();
    for (; iterations < ITERATION_LIMIT; iterations += 1) {
      let largestChange = 0;
      for (const branch of segmentBranches) {
        const segment = (branch.tag as { segment: { name: string; reactanceOhm: number; sectionIndex: number } }).segment;
        const levelKv = levels.get(segment.name);
        if (levelKv === undefined) continue;
        const protectiveCurrentA = kvToV(levelKv) / (Math.SQRT2 * segment.reactanceOhm);
        const computed = settled.currents.get(segment.name)! / protectiveCurrentA;
        const previous = ratios.get(segment.name) ?? computed;
        const ratio = iterations === 0 ? computed : 0.5 * previous + 0.5 * computed;
        largestChange = Math.max(largestChange, Math.abs(ratio - previous) / Math.max(ratio, 1e-12));
        ratios.set(segment.name, ratio);
        const equivalent = goldsworthyEquivalent(ratio);
        equivalents.set(segment.name, { ...equivalent, ratio });
        const impedanceOhm = new Complex(equivalent.resistancePu * segment.reactanceOhm, -equivalent.reactancePu * segment.reactanceOhm);
        branch.seriesS = new Complex(circuitsOf(segment.sectionIndex), 0).div(impedanceOhm);
      }
      settled = solve();
      if (iterations > 0 && largestChange < ITERATION_TOLERANCE) break;
    }
    if (iterations >= ITERATION_LIMIT) {
      throw new SolverDomainError({
        code: 'no-convergence',
        quantity: 'varistor equivalents',
        value: iterations,
        allowedRange: `settled within ${ITERATION_LIMIT} iterations`,
        hint: 'The bank currents did not settle; check the protective levels (a level far below the load current bypasses the bank in effect).',
      });
    }
  }
  const inserted = new Set(segmentBranches.map((branch) => (branch.tag as { segment: { name: string } }).segment.name));
  return assertFiniteResult('corridorFault', {
    case: state.label,
    faultAt: place.description,
    method: 'IEC 60909-0 equivalent voltage source at the fault; Goldsworthy equivalent for conducting varistors',
    voltageFactor,
    faultCurrentKa: settled.faultCurrentA / 1e3,
    linearFaultCurrentKa: linear.faultCurrentA / 1e3,
    shortCircuitMva: vaToMva(SQRT3 * kvToV(corridor.nominalVoltageKv) * settled.faultCurrentA),
    segments: segments.map(({ segment, section }): SegmentFaultDuty => {
      const isInserted = inserted.has(segment.name);
      const currentA = isInserted ? settled.currents.get(segment.name)! : 0;
      const equivalent = equivalents.get(segment.name);
      const conducts = equivalent !== undefined && equivalent.resistancePu > 0;
      const reactancePu = equivalent?.reactancePu ?? 1;
      const resistancePu = equivalent?.resistancePu ?? 0;
      // The capacitor carries I (X + jR) / Xc of the line current I (its voltage is the pair's voltage).
      const capacitorCurrentA = currentA * Math.hypot(reactancePu, resistancePu);
      return {
        name: segment.name,
        section: section.name,
        inserted: isInserted,
        linearCurrentA: isInserted ? linear.currents.get(segment.name)! : 0,
        currentA,
        currentRatioPu: equivalent && isInserted ? equivalent.ratio : null,
        varistorConducts: conducts && isInserted,
        equivalentResistanceOhm: resistancePu * segment.reactanceOhm,
        equivalentReactanceOhm: reactancePu * segment.reactanceOhm,
        capacitorVoltageKvPeak: vToKv(Math.SQRT2 * capacitorCurrentA * segment.reactanceOhm),
      };
    }),
    iterations,
  });
}

type ReadPlace = { description: string } & ({ busIndex: number } | { sectionIndex: number; distanceKm: number });

function readFaultPlace(corridor: Corridor, state: CaseState, value: unknown): ReadPlace {
  const place = requireObject('at', value, HINT);
  if (place.bus !== undefined) {
    const bus = corridor.buses.find((candidate) => candidate.name === place.bus);
    if (!bus) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: 'at.bus',
        value: String(place.bus),
        allowedRange: `one of ${corridor.buses.map((candidate) => `'${candidate.name}'`).join(', ')}`,
        hint: 'Name the corridor bus where the fault is applied.',
      });
    }
    return { description: bus.name, busIndex: bus.index };
  }
  const section = corridor.sections.find((candidate) => candidate.name === place.section);
  if (!section) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'at.section',
      value: String(place.section),
      allowedRange: `one of ${corridor.sections.map((candidate) => `'${candidate.name}'`).join(', ')}`,
      hint: 'Give { bus } for a bus fault, or { section, distanceKm } for a fault on a line section.',
    });
  }
  const distanceKm = requireNumber(
    'at.distanceKm',
    place.distanceKm,
    { min: 0, max: section.lengthKm, unit: 'km' },
    "Distance of the fault from the section's from-bus.",
  );
  const circuits = state.circuitsInService[section.index] as number;
  if (circuits !== 1) {
    throw new SolverDomainError({
      code: 'inconsistent-quantities',
      quantity: 'at.section',
      value: section.name,
      allowedRange: 'a section with exactly one circuit in service in the case',
      hint:
        circuits === 0
          ? 'The section is open in this case.'
          : 'The model joins parallel circuits into one branch, so a fault on one of them is not represented; take the other circuit out in the case, or fault a bus.',
    });
  }
  return { description: `${section.name} at ${distanceKm} km`, sectionIndex: section.index, distanceKm };
}

/** The node of the fault: the bus, or a point of the section's line, split there into two exact pi pieces when inside a piece. */
function faultNodeOf(corridor: Corridor, state: CaseState, passive: PassiveNetwork, place: ReadPlace): number | null {
  if ('busIndex' in place) return place.busIndex;
  const section = corridor.sections[place.sectionIndex]!;
  const { network } = passive.built;
  const pieceIndex = network.branches.findIndex(
    (branch) =>
      branch.tag.kind === 'line' &&
      branch.tag.sectionIndex === place.sectionIndex &&
      place.distanceKm >= branch.tag.offsetKm - 1e-9 &&
      place.distanceKm <= branch.tag.offsetKm + branch.tag.lengthKm + 1e-9,
  );
  const piece = network.branches[pieceIndex];
  if (piece?.tag.kind !== 'line') return null;
  const intoPieceKm = place.distanceKm - piece.tag.offsetKm;
  if (intoPieceKm <= 1e-9) return piece.from;
  if (piece.tag.lengthKm - intoPieceKm <= 1e-9) return piece.to;
  const circuits = state.circuitsInService[place.sectionIndex] as number;
  const node = network.addNode();
  const pieceBranch = (from: number, to: number, lengthKm: number, offsetKm: number) => {
    const pi = linePiS(section, lengthKm);
    return {
      from,
      to,
      seriesS: pi.seriesS.mul(circuits),
      shuntFromS: pi.shuntS.mul(circuits),
      shuntToS: pi.shuntS.mul(circuits),
      tag: { kind: 'line' as const, sectionIndex: place.sectionIndex, lengthKm, offsetKm },
    };
  };
  network.branches.splice(
    pieceIndex,
    1,
    pieceBranch(piece.from, node, intoPieceKm, piece.tag.offsetKm),
    pieceBranch(node, piece.to, piece.tag.lengthKm - intoPieceKm, place.distanceKm),
  );
  passive.kept.push(node);
  return node;
}

function readProtectiveLevels(value: unknown, names: Set<string>): Map<string, number> {
  if (value === undefined) return new Map();
  const record = requireObject('protectiveLevelsKvPeak', value, HINT);
  return new Map(
    Object.entries(record).map(([name, level]) => {
      if (!names.has(name)) {
        throw new SolverDomainError({
          code: 'out-of-range',
          quantity: `protectiveLevelsKvPeak.${name}`,
          value: name,
          allowedRange: names.size === 0 ? 'no series segments in this corridor' : `one of ${[...names].map((known) => `'${known}'`).join(', ')}`,
          hint: 'Name a series capacitor segment of the corridor.',
        });
      }
      return [
        name,
        requireNumber(
          `protectiveLevelsKvPeak.${name}`,
          level,
          { min: 0, max: 1e4, minInclusive: false, unit: 'kV' },
          'Peak capacitor voltage at which the varistor limits.',
        ),
      ];
    }),
  );
}
