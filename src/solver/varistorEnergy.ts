// Varistor duty of a series capacitor bank during a fault: Goldsworthy's linearised capacitor-varistor model, energy per phase against capability, bypass need.
import { Complex, requireComplex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, forMessage, requireChoice, requireNumber, requireObject } from './errors.ts';
import { phaseVoltsFromLineKv, wToMw } from './units.ts';

export interface VaristorEnergyOptions {
  /** Capacitive reactance of the bank per phase at power frequency. */
  capacitorReactanceOhm: number;
  /** Protective level as a peak capacitor voltage; or give ratedCurrentA with protectiveLevelPu (multiple of the rated peak capacitor voltage). */
  protectiveLevelKvPeak?: number;
  ratedCurrentA?: number;
  protectiveLevelPu?: number;
  /** Fault current through the bank (rms, symmetrical); or give faultCircuit to solve it with the bank's own equivalent impedance. */
  faultCurrentA?: number;
  /** Thevenin source driving the fault through the bank: line-to-line EMF and the loop impedance excluding the bank. */
  faultCircuit?: { sourceVoltageKv: number; impedanceOhm: { re: number; im: number } };
  faultDurationMs: number;
  /** Energy the varistor of one phase may absorb (manufacturer's rating). */
  capabilityMjPerPhase: number;
  /** An external fault is one the bank should ride through on its varistor; an internal one is on the compensated line itself. */
  faultLocation: 'internal' | 'external';
}

export interface VaristorEnergy {
  model: 'Goldsworthy (linearised, fundamental frequency)';
  protectiveLevelKvPeak: number;
  /** Rms line current at which the capacitor's peak voltage reaches the protective level: Vpl / (sqrt 2 Xc). */
  protectiveLevelCurrentA: number;
  faultCurrentA: number;
  /** Fault current over the protective-level current. */
  currentRatioPu: number;
  varistorConducts: boolean;
  /** Series equivalent of the bank during the fault: R_eq - j X_eq. */
  equivalentResistanceOhm: number;
  equivalentReactanceOhm: number;
  /** Fundamental currents in each path, as shares of the line current (they add as phasors, not as magnitudes). */
  capacitorCurrentShare: number;
  varistorCurrentShare: number;
  capacitorVoltageKvRms: number;
  varistorPowerMwPerPhase: number;
  energyMjPerPhase: number;
  capabilityMjPerPhase: number;
  energyShareOfCapability: number;
  /** When the varistor would reach its capability; null when it never does within the fault. */
  timeToCapabilityMs: number | null;
  bypassNeeded: boolean;
  reason: string;
  warnings: string[];
}

const HINT =
  "Pass { capacitorReactanceOhm, protectiveLevelKvPeak (or ratedCurrentA + protectiveLevelPu), faultCurrentA (or faultCircuit: { sourceVoltageKv, impedanceOhm: { re, im } }), faultDurationMs, capabilityMjPerPhase, faultLocation: 'internal' | 'external' }.";
/** Below this current ratio the varistor does not conduct (Goldsworthy's threshold). */
const CONDUCTION_THRESHOLD_PU = 0.98;
/** Upper end of the range the fit is used over here; beyond it the fitted X_eq turns negative. */
const MAXIMUM_RATIO_PU = 10;

/**
 * Goldsworthy's fit (IEEE Trans. Power Delivery, 1987; as used in Anderson & Farmer, Series Compensation of Power Systems, 1996;
 * coefficients from memory) of the capacitor-varistor pair as R_eq - j X_eq in units of Xc, against I_pu = I / I_pr.
 */
export function goldsworthyEquivalent(currentRatioPu: number): { resistancePu: number; reactancePu: number } {
  if (currentRatioPu <= CONDUCTION_THRESHOLD_PU) return { resistancePu: 0, reactancePu: 1 };
  const i = currentRatioPu;
  return {
    resistancePu: 0.0745 + 0.49 * Math.exp(-0.243 * i) - 35.0 * Math.exp(-5.0 * i) - 0.6 * Math.exp(-1.4 * i),
    reactancePu: 0.101 - 0.005749 * i + 2.088 * Math.exp(-0.8566 * i),
  };
}

/** Fault current consistent with the bank's own current-dependent impedance: the smallest I with I |Z + Z_eq(I)| = E. */
function solveFaultCurrentA(sourcePhaseV: number, loop: Complex, xcOhm: number, protectiveCurrentA: number): number {
  const mismatch = (currentA: number) => {
    const { resistancePu, reactancePu } = goldsworthyEquivalent(currentA / protectiveCurrentA);
    return currentA * loop.add(new Complex(resistancePu * xcOhm, -reactancePu * xcOhm)).abs() - sourcePhaseV;
  };
  const highestA = MAXIMUM_RATIO_PU * protectiveCurrentA;
  const stepCount = 2000;
  let lowA = 0;
  for (let step = 1; step <= stepCount; step += 1) {
    const currentA = (highestA * step) / stepCount;
    if (mismatch(currentA) >= 0) {
      let highA = currentA;
      for (let iteration = 0; iteration < 100 && highA - lowA > 1e-9 * highA; iteration += 1) {
        const middle = (lowA + highA) / 2;
        if (mismatch(middle) >= 0) highA = middle;
        else lowA = middle;
      }
      return (lowA + highA) / 2;
    }
    lowA = currentA;
  }
  throw new SolverDomainError({
    code: 'out-of-range',
    quantity: 'fault current / protective-level current',
    value: `> ${MAXIMUM_RATIO_PU}`,
    allowedRange: `[0, ${MAXIMUM_RATIO_PU}]`,
    hint: 'The fault drives the bank beyond the range of the linearised model; the bank would be bypassed at once (or check the source and loop impedance).',
  });
}

/**
 * Energy the varistor of one phase absorbs during a fault of given current and duration: P = I^2 R_eq from Goldsworthy's
 * equivalent (the only dissipative element of the pair), E = P t; bypass needed when E exceeds the capability.
 */
export function varistorEnergy(options: VaristorEnergyOptions): VaristorEnergy {
  const record = requireObject('options', options, HINT);
  const xcOhm = requireNumber('capacitorReactanceOhm', record.capacitorReactanceOhm, { min: 0, max: 1e4, minInclusive: false, unit: 'ohm' }, HINT);
  const protectiveLevelKvPeak =
    record.protectiveLevelKvPeak !== undefined
      ? requireNumber('protectiveLevelKvPeak', record.protectiveLevelKvPeak, { min: 0, max: 1e4, minInclusive: false, unit: 'kV' }, HINT)
      : (requireNumber(
          'protectiveLevelPu',
          record.protectiveLevelPu,
          { min: 1, max: 5, unit: 'pu' },
          'Multiple of the rated peak capacitor voltage, 2.0 to 2.5 in common practice.',
        ) *
          Math.SQRT2 *
          requireNumber('ratedCurrentA', record.ratedCurrentA, { min: 0, max: 1e5, minInclusive: false, unit: 'A' }, HINT) *
          xcOhm) /
        1e3;
  const protectiveLevelCurrentA = (protectiveLevelKvPeak * 1e3) / (Math.SQRT2 * xcOhm);
  const faultDurationMs = requireNumber(
    'faultDurationMs',
    record.faultDurationMs,
    { min: 0, max: 10_000, minInclusive: false, unit: 'ms' },
    'Time the fault current flows through the bank (protection plus breaker time, longer for a back-up clearance).',
  );
  const capabilityMjPerPhase = requireNumber(
    'capabilityMjPerPhase',
    record.capabilityMjPerPhase,
    { min: 0, max: 1e4, minInclusive: false, unit: 'MJ' },
    HINT,
  );
  const faultLocation = requireChoice('faultLocation', record.faultLocation, ['internal', 'external'] as const, HINT);
  let faultCurrentA: number;
  if (record.faultCurrentA !== undefined) {
    faultCurrentA = requireNumber(
      'faultCurrentA',
      record.faultCurrentA,
      { min: 0, max: MAXIMUM_RATIO_PU * protectiveLevelCurrentA, minInclusive: false, unit: 'A' },
      `The linearised model is used up to ${MAXIMUM_RATIO_PU} times the protective-level current (${forMessage(protectiveLevelCurrentA)} A).`,
    );
  } else {
    const circuit = requireObject('faultCircuit', record.faultCircuit, HINT);
    const sourcePhaseV = phaseVoltsFromLineKv(
      requireNumber('faultCircuit.sourceVoltageKv', circuit.sourceVoltageKv, { min: 0, max: 2000, minInclusive: false, unit: 'kV' }, HINT),
    );
    const loop = requireComplex(
      'faultCircuit.impedanceOhm',
      circuit.impedanceOhm,
      'Loop impedance from the source EMF to the fault, excluding the bank, as { re, im }.',
    );
    faultCurrentA = solveFaultCurrentA(sourcePhaseV, loop, xcOhm, protectiveLevelCurrentA);
  }
  const currentRatioPu = faultCurrentA / protectiveLevelCurrentA;
  const { resistancePu, reactancePu } = goldsworthyEquivalent(currentRatioPu);
  const resistanceOhm = resistancePu * xcOhm;
  const reactanceOhm = reactancePu * xcOhm;
  // With V = I (R - jX) across the pair, the capacitor carries V / (-j Xc) = I (X + jR) / Xc and the varistor the rest.
  const capacitorCurrentShare = Math.hypot(reactancePu, resistancePu);
  const varistorCurrentShare = Math.hypot(1 - reactancePu, resistancePu);
  const powerW = faultCurrentA ** 2 * resistanceOhm;
  const energyJ = powerW * (faultDurationMs / 1e3);
  const capabilityJ = capabilityMjPerPhase * 1e6;
  const bypassNeeded = energyJ > capabilityJ;
  const timeToCapabilityMs = powerW > 0 && bypassNeeded ? (capabilityJ / powerW) * 1e3 : null;
  const energyMj = energyJ / 1e6;
  const reason = !(currentRatioPu > CONDUCTION_THRESHOLD_PU)
    ? `The fault current ${faultCurrentA.toFixed(0)} A stays below ${CONDUCTION_THRESHOLD_PU} of the protective-level current ${protectiveLevelCurrentA.toFixed(0)} A: the varistor does not conduct.`
    : bypassNeeded
      ? `The varistor would absorb ${energyMj.toFixed(2)} MJ per phase in ${faultDurationMs} ms against a capability of ${capabilityMjPerPhase} MJ; it reaches the capability after ${timeToCapabilityMs!.toFixed(0)} ms, so a fast bypass (triggered gap or bypass switch) must act before then.`
      : `The varistor absorbs ${energyMj.toFixed(2)} MJ per phase in ${faultDurationMs} ms, within its capability of ${capabilityMjPerPhase} MJ: no bypass is needed for this fault.`;
  const warnings: string[] = [];
  if (bypassNeeded && faultLocation === 'external') {
    warnings.push(
      'An external fault would bypass the bank, removing the compensation when the system most needs it (common practice is to ride through external faults on the varistor): consider a larger varistor.',
    );
  }
  if (currentRatioPu > CONDUCTION_THRESHOLD_PU) {
    warnings.push(
      'The linearised model is fundamental-frequency only: the first-cycle offset and reinsertion after clearing add energy; confirm the duty with a time-domain study.',
    );
  }
  return assertFiniteResult('varistorEnergy', {
    model: 'Goldsworthy (linearised, fundamental frequency)' as const,
    protectiveLevelKvPeak,
    protectiveLevelCurrentA,
    faultCurrentA,
    currentRatioPu,
    varistorConducts: currentRatioPu > CONDUCTION_THRESHOLD_PU,
    equivalentResistanceOhm: resistanceOhm,
    equivalentReactanceOhm: reactanceOhm,
    capacitorCurrentShare,
    varistorCurrentShare,
    capacitorVoltageKvRms: (faultCurrentA * Math.hypot(resistanceOhm, reactanceOhm)) / 1e3,
    varistorPowerMwPerPhase: wToMw(powerW),
    energyMjPerPhase: energyMj,
    capabilityMjPerPhase,
    energyShareOfCapability: energyJ / capabilityJ,
    timeToCapabilityMs,
    bypassNeeded,
    reason,
    warnings,
  });
}
