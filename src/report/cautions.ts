// The cautions kvarbook reports carry by themselves: those of every report, and those a study earns by what it computes.

export interface StandingCaution {
  id: string;
  text: string;
}

export const STANDING_CAUTIONS: readonly StandingCaution[] = [
  {
    id: 'engineering-judgment',
    text: 'This study supports, and does not replace, the judgment of a licensed professional engineer. Its figures are valid only for the inputs, methods and assumptions it states.',
  },
  {
    id: 'codes-govern',
    text: "Local codes and regulations, the applicable grid code and the utility's own standards govern wherever they differ from this study.",
  },
  {
    id: 'switching-hazard',
    text: "Switching and energisation of shunt reactors, shunt capacitors, static var compensators and series capacitor banks is hazardous: it can produce overvoltages, inrush and resonance. It is done only under the utility's switching procedures, by authorised persons.",
  },
  {
    id: 'protection-settings',
    text: 'Protection settings (line distance protection near series capacitors, capacitor bank unbalance and overload, varistor energy and bypass) are outside the steady-state methods of this study and need their own protection study.',
  },
  {
    id: 'steady-state-only',
    text: 'Results are balanced, positive-sequence, steady-state values at power frequency. Transients, harmonics, unbalance and subsynchronous interaction need time-domain or frequency-scan studies before equipment is specified.',
  },
];

/** Carried by any report whose study uses a series capacitor bank (a series element, a bank design, a corridor segment, its duties). */
export const SERIES_CAPACITOR_CAUTIONS: readonly StandingCaution[] = [
  {
    id: 'series-fault-overvoltage',
    text: "A series capacitor bank carries the full fault current: its varistor, bypass gap or switch and their coordination must hold the capacitor voltage within its protective level in every internal and external fault, with the varistor energy within its capability. This study's fault figures are steady-state screens, to be confirmed by an electromagnetic-transient study.",
  },
  {
    id: 'series-resonance',
    text: 'Series compensation forms an electrical resonance below power frequency that can interact with turbine-generator shafts (subsynchronous resonance) and with the controls of nearby converters and var compensators; low-frequency oscillations and harmonics need their own studies before the bank is specified.',
  },
  {
    id: 'series-distance-protection',
    text: 'A series capacitor changes the impedance that line distance protection measures and can reverse the voltage or current at a relay; the protection of this line and of adjacent lines must be reviewed with the bank inserted and bypassed.',
  },
];

/** Carried by any report whose study sizes a neutral reactor for single-pole reclosing. */
export const RECLOSING_CAUTIONS: readonly StandingCaution[] = [
  {
    id: 'reclosing-secondary-arc',
    text: "Single-pole reclosing on a shunt-compensated line depends on the secondary arc going out: the neutral reactor's rating and insulation and the dead time must be confirmed against the line's measured capacitances and the utility's arc-extinction experience; the neutral reactor also carries duty in unbalanced faults and open-phase conditions.",
  },
];

const SERIES_FUNCTIONS = new Set(['seriesCapacitor', 'seriesCompensationDesign', 'varistorEnergy', 'ssrScreening', 'seriesBankRatings']);
const RECLOSING_FUNCTIONS = new Set(['neutralReactorDesign']);

/** Whether a solver call's arguments hold a non-empty list of series capacitor segments or a series-capacitor element, at any depth. */
function namesASeriesBank(value: unknown, depth = 0): boolean {
  if (depth > 12 || value === null || typeof value !== 'object') return false;
  if (Array.isArray(value)) return value.some((item) => namesASeriesBank(item, depth + 1));
  const record = value as Record<string, unknown>;
  if (Array.isArray(record.seriesCapacitors) && record.seriesCapacitors.length > 0) return true;
  if (record.kind === 'series-capacitor') return true;
  return Object.values(record).some((item) => namesASeriesBank(item, depth + 1));
}

/** The cautions a study earns by the solver calls it made. */
export function earnedCautions(calls: readonly { functionName: string; argumentsSummary: unknown }[]): StandingCaution[] {
  const usesSeriesBank = calls.some((call) => SERIES_FUNCTIONS.has(call.functionName) || namesASeriesBank(call.argumentsSummary));
  const sizesNeutralReactor = calls.some((call) => RECLOSING_FUNCTIONS.has(call.functionName));
  return [...(usesSeriesBank ? SERIES_CAPACITOR_CAUTIONS : []), ...(sizesNeutralReactor ? RECLOSING_CAUTIONS : [])];
}
