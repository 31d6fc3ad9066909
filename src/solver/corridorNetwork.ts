// The corridor in one switching state as a bus admittance network (nodes, pi branches, shunts) and its Newton-Raphson power flow.
import { Complex } from './complex.ts';
import { lineAbcd, perKmToSi } from './lineModels.ts';
import type { Corridor, CorridorSection, SeriesSegment } from './corridor.ts';
import { kmToM } from './units.ts';

/** A pi branch between two nodes; admittances in siemens, already multiplied by the circuits in service. */
export interface NetworkBranch {
  from: number;
  to: number;
  seriesS: Complex;
  shuntFromS: Complex;
  shuntToS: Complex;
  /** What the branch is, so results can be read back. */
  tag:
    | { kind: 'line'; sectionIndex: number; lengthKm: number; offsetKm: number }
    | { kind: 'segment'; segment: SeriesSegment }
    | { kind: 'system'; end: 'sending' | 'receiving' };
}

/** One piece of a section's chain from its from-bus: a run of line or an inserted series segment. */
export type SectionPiece = { kind: 'line'; lengthKm: number; offsetKm: number } | { kind: 'segment'; segment: SeriesSegment };

/** The chain of a section in one switching state: segments at the sending end, the line (split around mid-section segments), segments at the receiving end. */
export function sectionPieces(section: CorridorSection, bypassed: (segment: SeriesSegment) => boolean): SectionPiece[] {
  const inserted = (position: SeriesSegment['position']) =>
    section.seriesCapacitors
      .filter((segment) => segment.position === position && !bypassed(segment))
      .map((segment): SectionPiece => ({ kind: 'segment', segment }));
  const middle = inserted('mid-section');
  const half = section.lengthKm / 2;
  const line: SectionPiece[] =
    middle.length === 0
      ? [{ kind: 'line', lengthKm: section.lengthKm, offsetKm: 0 }]
      : [{ kind: 'line', lengthKm: half, offsetKm: 0 }, ...middle, { kind: 'line', lengthKm: half, offsetKm: half }];
  return [...inserted('sending-end'), ...line, ...inserted('receiving-end')];
}

/** Exact pi equivalent of a length of distributed line: series 1/B, each shunt (A - 1)/B (A = D for a uniform line). */
export function linePiS(section: CorridorSection, lengthKm: number): { seriesS: Complex; shuntS: Complex } {
  const { z, y } = perKmToSi(section.perKm);
  const abcd = lineAbcd('distributed', z, y, kmToM(lengthKm));
  return { seriesS: new Complex(1, 0).div(abcd.B), shuntS: abcd.A.sub(1).div(abcd.B) };
}

export interface NetworkBuilder {
  nodeCount: number;
  branches: NetworkBranch[];
  /** Shunt admittance at each node (S). */
  shuntS: Complex[];
  addNode(): number;
}

export function newNetwork(corridor: Corridor): NetworkBuilder {
  const network: NetworkBuilder = {
    nodeCount: corridor.buses.length,
    branches: [],
    shuntS: corridor.buses.map(() => new Complex(0, 0)),
    addNode() {
      network.shuntS.push(new Complex(0, 0));
      network.nodeCount += 1;
      return network.nodeCount - 1;
    },
  };
  return network;
}

/** Adds a section's chain with the given circuits in service; returns the branch indices in order from the from-bus. */
export function addSection(network: NetworkBuilder, section: CorridorSection, circuitsInService: number, pieces: SectionPiece[]): number[] {
  const indices: number[] = [];
  let node = section.fromIndex;
  pieces.forEach((piece, pieceIndex) => {
    const next = pieceIndex === pieces.length - 1 ? section.toIndex : network.addNode();
    if (piece.kind === 'line') {
      const pi = linePiS(section, piece.lengthKm);
      network.branches.push({
        from: node,
        to: next,
        seriesS: pi.seriesS.mul(circuitsInService),
        shuntFromS: pi.shuntS.mul(circuitsInService),
        shuntToS: pi.shuntS.mul(circuitsInService),
        tag: { kind: 'line', sectionIndex: section.index, lengthKm: piece.lengthKm, offsetKm: piece.offsetKm },
      });
    } else {
      network.branches.push({
        from: node,
        to: next,
        seriesS: new Complex(0, 1 / piece.segment.reactanceOhm).mul(circuitsInService),
        shuntFromS: new Complex(0, 0),
        shuntToS: new Complex(0, 0),
        tag: { kind: 'segment', segment: piece.segment },
      });
    }
    indices.push(network.branches.length - 1);
    node = next;
  });
  return indices;
}

/** Dense bus admittance matrix (per unit) of the network. */
export function admittanceMatrix(network: NetworkBuilder, baseImpedanceOhm: number): Complex[][] {
  const size = network.nodeCount;
  const matrix = Array.from({ length: size }, () => Array.from({ length: size }, () => new Complex(0, 0)));
  const add = (row: number, column: number, value: Complex) => {
    (matrix[row] as Complex[])[column] = (matrix[row] as Complex[])[column]!.add(value.mul(baseImpedanceOhm));
  };
  network.shuntS.forEach((shunt, node) => add(node, node, shunt));
  for (const branch of network.branches) {
    add(branch.from, branch.from, branch.seriesS.add(branch.shuntFromS));
    add(branch.to, branch.to, branch.seriesS.add(branch.shuntToS));
    add(branch.from, branch.to, branch.seriesS.neg());
    add(branch.to, branch.from, branch.seriesS.neg());
  }
  return matrix;
}

/** Per-unit specification of one node for the power flow. */
export interface NodeSpec {
  type: 'slack' | 'pv' | 'pq';
  /** Voltage magnitude held (slack and pv). */
  voltagePu: number;
  /** Injected power (generation positive, load negative). */
  pPu: number;
  qPu: number;
  /** SVC on its slope at a pq node: Q_injected(V) = basePu V (Vref - V) / slope, from V = Vref - slope I_capacitive. */
  svcSlope: { basePu: number; referencePu: number; slope: number } | null;
}

export function svcInjectionPu(slope: NonNullable<NodeSpec['svcSlope']>, voltagePu: number): { q: number; dqdv: number } {
  return {
    q: (slope.basePu * voltagePu * (slope.referencePu - voltagePu)) / slope.slope,
    dqdv: (slope.basePu * (slope.referencePu - 2 * voltagePu)) / slope.slope,
  };
}

export type PowerFlowResult =
  | { converged: true; voltages: Complex[]; iterations: number; mismatchPu: number }
  | { converged: false; iterations: number; mismatchPu: number };

/** Gaussian elimination with partial pivoting; null when the matrix is singular. */
export function solveLinear(matrix: number[][], rhs: number[]): number[] | null {
  const size = rhs.length;
  const a = matrix.map((row, index) => [...row, rhs[index] as number]);
  for (let column = 0; column < size; column += 1) {
    let pivot = column;
    for (let row = column + 1; row < size; row += 1) if (Math.abs(a[row]![column]!) > Math.abs(a[pivot]![column]!)) pivot = row;
    if (!(Math.abs(a[pivot]![column]!) > 1e-14)) return null;
    [a[column], a[pivot]] = [a[pivot]!, a[column]!];
    const pivotRow = a[column]!;
    for (let row = column + 1; row < size; row += 1) {
      const current = a[row]!;
      const factor = current[column]! / pivotRow[column]!;
      if (factor === 0) continue;
      for (let k = column; k <= size; k += 1) current[k] = current[k]! - factor * pivotRow[k]!;
    }
  }
  const solution = new Array<number>(size).fill(0);
  for (let row = size - 1; row >= 0; row -= 1) {
    let sum = a[row]![size]!;
    for (let k = row + 1; k < size; k += 1) sum -= a[row]![k]! * solution[k]!;
    solution[row] = sum / a[row]![row]!;
  }
  return solution;
}

/**
 * Newton-Raphson in polar form: unknowns are the angles of every non-slack node and the magnitudes of pq nodes; the mismatch is
 * S_calc - S_spec with S_calc = V conj(Y V). Flat start (held magnitudes, zero angles), which lands on the upper (normal) branch of
 * the P-V curve for a corridor operated near nominal voltage. Converged when the largest P or Q mismatch is within tolerancePu.
 */
export function newtonPowerFlow(matrix: Complex[][], specs: NodeSpec[], tolerancePu: number, maxIterations: number): PowerFlowResult {
  const size = specs.length;
  const magnitude = specs.map((spec) => (spec.type === 'pq' ? 1 : spec.voltagePu));
  const angle = specs.map(() => 0);
  const angleUnknowns = specs.flatMap((spec, node) => (spec.type === 'slack' ? [] : [node]));
  const magnitudeUnknowns = specs.flatMap((spec, node) => (spec.type === 'pq' ? [node] : []));
  const row = (node: number, list: number[]) => list.indexOf(node);
  let mismatchPu = Number.POSITIVE_INFINITY;
  for (let iteration = 0; ; iteration += 1) {
    const voltages = magnitude.map((value, node) => new Complex(value * Math.cos(angle[node]!), value * Math.sin(angle[node]!)));
    const currents = matrix.map((rowValues) => rowValues.reduce((sum, y, k) => sum.add(y.mul(voltages[k]!)), new Complex(0, 0)));
    const powers = voltages.map((voltage, node) => voltage.mul(currents[node]!.conjugate()));
    const residual: number[] = [];
    const svcTerms = specs.map((spec, node) => (spec.svcSlope ? svcInjectionPu(spec.svcSlope, magnitude[node]!) : { q: 0, dqdv: 0 }));
    for (const node of angleUnknowns) residual.push(powers[node]!.re - specs[node]!.pPu);
    for (const node of magnitudeUnknowns) residual.push(powers[node]!.im - specs[node]!.qPu - svcTerms[node]!.q);
    mismatchPu = residual.reduce((largest, value) => Math.max(largest, Math.abs(value)), 0);
    if (!Number.isFinite(mismatchPu)) return { converged: false, iterations: iteration, mismatchPu: Number.MAX_VALUE };
    if (mismatchPu <= tolerancePu) return { converged: true, voltages, iterations: iteration, mismatchPu };
    if (iteration >= maxIterations) return { converged: false, iterations: iteration, mismatchPu };
    const unknownCount = angleUnknowns.length + magnitudeUnknowns.length;
    const jacobian = Array.from({ length: unknownCount }, () => new Array<number>(unknownCount).fill(0));
    // dS_i/dtheta_k = -j V_i conj(Y_ik V_k) (k != i), j S_i - j |V_i|^2 conj(Y_ii) (k = i);
    // dS_i/d|V_k| = V_i conj(Y_ik V_k) / |V_k| (k != i), S_i / |V_i| + |V_i| conj(Y_ii) (k = i).
    const fill = (equationNode: number, equationRow: number, part: 're' | 'im') => {
      for (let k = 0; k < size; k += 1) {
        const y = matrix[equationNode]![k]!;
        const vi = voltages[equationNode]!;
        let byAngle: Complex;
        let byMagnitude: Complex;
        if (k === equationNode) {
          byAngle = new Complex(0, 1).mul(powers[k]!).sub(new Complex(0, 1).mul(y.conjugate()).mul(magnitude[k]! ** 2));
          byMagnitude = powers[k]!.div(magnitude[k]!).add(y.conjugate().mul(magnitude[k]!));
        } else {
          if (y.re === 0 && y.im === 0) continue;
          const term = vi.mul(y.mul(voltages[k]!).conjugate());
          byAngle = new Complex(0, -1).mul(term);
          byMagnitude = term.div(magnitude[k]!);
        }
        const angleColumn = row(k, angleUnknowns);
        if (angleColumn >= 0) jacobian[equationRow]![angleColumn] = byAngle[part];
        const magnitudeColumn = row(k, magnitudeUnknowns);
        if (magnitudeColumn >= 0) jacobian[equationRow]![angleUnknowns.length + magnitudeColumn] = byMagnitude[part];
      }
    };
    angleUnknowns.forEach((node, index) => fill(node, index, 're'));
    magnitudeUnknowns.forEach((node, index) => {
      const equationRow = angleUnknowns.length + index;
      fill(node, equationRow, 'im');
      jacobian[equationRow]![equationRow] = jacobian[equationRow]![equationRow]! - svcTerms[node]!.dqdv;
    });
    const step = solveLinear(jacobian, residual);
    if (step === null) return { converged: false, iterations: iteration, mismatchPu };
    angleUnknowns.forEach((node, index) => {
      angle[node] = angle[node]! - step[index]!;
    });
    magnitudeUnknowns.forEach((node, index) => {
      magnitude[node] = magnitude[node]! - step[angleUnknowns.length + index]!;
    });
    if (magnitude.some((value) => !(value > 0))) return { converged: false, iterations: iteration + 1, mismatchPu };
  }
}
