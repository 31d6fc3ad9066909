// The subsynchronous frequency scan of a corridor case: the radial chain from a generator at the sending end, built from the corridor's data.
import { readCorridor, type Corridor, type CorridorInput } from './corridor.ts';
import { readCase, type CaseState, type CorridorCaseInput } from './cases.ts';
import { SolverDomainError, optionalNumber, requireNumber, requireObject } from './errors.ts';
import { frequencyScan, type FrequencyScan, type ScanElement } from './frequencyScan.ts';
import { sectionPieces } from './corridorNetwork.ts';

export interface CorridorFrequencyScan extends FrequencyScan {
  /** The chain the scan was run on, from the generator outwards, as frequencyScan takes it. */
  elements: ScanElement[];
  /** What the radial chain leaves out of the corridor case, so that a reader knows what the scan is of. */
  omissions: string[];
}

const HINT =
  'Pass { corridor, case, generator: { subtransientReactanceOhm, resistanceOhm? }, transformer: { reactanceOhm, resistanceOhm? }, torsionalModesHz?, marginHz?, startHz?, stopHz?, stepHz? }, impedances referred to the corridor voltage.';
const OHM_RANGE = { min: 0, max: 1e6, minInclusive: false, unit: 'ohm' } as const;

/**
 * Builds the chain a turbine-generator at the corridor's sending bus sees in one switching state: its subtransient reactance and step-up
 * transformer, then bus by bus the shunt units in service and each section's circuits in service (parallel identical circuits as one
 * with z / n and n y per km) with its inserted series segments (X / n), ending in the receiving system's Thevenin impedance when it is
 * connected; then scans it with frequencyScan.
 */
export function corridorFrequencyScan(options: {
  corridor: CorridorInput;
  case: CorridorCaseInput;
  generator: { subtransientReactanceOhm: number; resistanceOhm?: number };
  transformer: { reactanceOhm: number; resistanceOhm?: number };
  torsionalModesHz?: number[];
  marginHz?: number;
  startHz?: number;
  stopHz?: number;
  stepHz?: number;
}): CorridorFrequencyScan {
  const record = requireObject('options', options, HINT);
  const corridor = readCorridor(record.corridor);
  const state = readCase(corridor, record.case, 'case');
  const generator = requireObject('generator', record.generator, HINT);
  const transformer = requireObject('transformer', record.transformer, HINT);
  const head: ScanElement[] = [
    {
      kind: 'generator',
      subtransientReactanceOhm: requireNumber('generator.subtransientReactanceOhm', generator.subtransientReactanceOhm, OHM_RANGE, HINT),
      resistanceOhm: optionalNumber('generator.resistanceOhm', generator.resistanceOhm, 0, { min: 0, max: 1e6, unit: 'ohm' }, HINT),
    },
    {
      kind: 'transformer',
      reactanceOhm: requireNumber('transformer.reactanceOhm', transformer.reactanceOhm, OHM_RANGE, HINT),
      resistanceOhm: optionalNumber('transformer.resistanceOhm', transformer.resistanceOhm, 0, { min: 0, max: 1e6, unit: 'ohm' }, HINT),
    },
  ];
  const { elements, omissions } = corridorChain(corridor, state);
  const scanOptions = Object.fromEntries(
    ['torsionalModesHz', 'marginHz', 'startHz', 'stopHz', 'stepHz'].filter((key) => record[key] !== undefined).map((key) => [key, record[key]]),
  );
  const chain = [...head, ...elements];
  return { ...frequencyScan({ frequencyHz: corridor.frequencyHz, elements: chain, ...scanOptions }), elements: chain, omissions };
}

function corridorChain(corridor: Corridor, state: CaseState): { elements: ScanElement[]; omissions: string[] } {
  const elements: ScanElement[] = [];
  const omissions: string[] = [];
  if (state.systems.sending.connected) {
    omissions.push(
      `the sending system (${corridor.sendingSystem.label}) is replaced by the generator studied: a radial scan has no parallel path at its bus`,
    );
  }
  corridor.buses.forEach((bus, index) => {
    for (const unit of [...bus.reactors, ...bus.capacitors]) {
      if (!state.inService(unit.name)) continue;
      elements.push({ kind: unit.kind, qMvar: unit.qMvar, ratedVoltageKv: unit.ratedVoltageKv });
    }
    if (bus.svc && state.inService(bus.svc.name))
      omissions.push(`${bus.svc.name} is left out: its controls set its subsynchronous behaviour; study it with its maker's model`);
    for (const load of bus.loads) if (state.inService(load.name)) omissions.push(`the load ${load.name} is left out`);
    const section = corridor.sections[index];
    if (!section) return;
    const circuits = state.circuitsInService[section.index] as number;
    if (circuits === 0) {
      throw new SolverDomainError({
        code: 'degenerate-network',
        quantity: 'case.circuitsOut',
        value: section.name,
        allowedRange: 'a case in which every section has a circuit in service',
        hint: 'With a section open the generator is cut off from the rest of the corridor; scan the case with the section in.',
      });
    }
    for (const piece of sectionPieces(section, state.bypassed)) {
      if (piece.kind === 'segment') {
        elements.push({ kind: 'series-capacitor', reactanceOhm: piece.segment.reactanceOhm / circuits });
        continue;
      }
      elements.push({
        kind: 'line-section',
        lengthKm: piece.lengthKm,
        seriesResistanceOhmPerKm: section.perKm.seriesResistanceOhmPerKm / circuits,
        seriesReactanceOhmPerKm: section.perKm.seriesReactanceOhmPerKm / circuits,
        shuntSusceptanceUsPerKm: section.perKm.shuntSusceptanceUsPerKm * circuits,
        shuntConductanceUsPerKm: section.perKm.shuntConductanceUsPerKm * circuits,
      });
    }
  });
  if (state.systems.receiving.connected) {
    const impedance = state.systems.receiving.system.impedanceOhm;
    elements.push({ kind: 'system', reactanceOhm: impedance.im, resistanceOhm: impedance.re });
  }
  return { elements, omissions };
}
