// Neutral reactor of a four-reactor shunt bank for single-pole reclosing: interphase cancellation, secondary arc current, recovery voltage, ratings.
import { requireComplex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, forMessage, optionalNumber, requireNumber, requireObject } from './errors.ts';
import { FREQUENCY_RANGE_HZ, LENGTH_RANGE_KM, VOLTAGE_RANGE_KV } from './lineModels.ts';
import { angularFrequency, phaseVoltsFromLineKv, varToMvar, vToKv } from './units.ts';

export interface NeutralReactorOptions {
  frequencyHz: number;
  /** Line-to-line voltage the duty is evaluated at (often the highest system voltage). */
  voltageKv: number;
  lengthKm: number;
  /** Per-km sequence capacitances, e.g. from sequenceCapacitanceFromGeometry. */
  positiveSequenceCapacitanceNfPerKm: number;
  zeroSequenceCapacitanceNfPerKm: number;
  /** Phase reactors' positive-sequence susceptance over the line's positive-sequence charging susceptance. */
  shuntCompensationDegree: number;
  /** Share of the interphase capacitance the reactors cancel, 1 = full (default). */
  interphaseCancellation?: number;
  /** Identical four-reactor banks sharing the compensation (e.g. 2 for one at each end); ratings are per bank. */
  reactorBankCount?: number;
  /** Secondary arc current taken as self-extinguishing (common practice: about 20 A rms at moderate recovery voltage). */
  secondaryArcLimitA?: number;
  /** Zero-sequence voltage in normal operation, as % of phase voltage, for the continuous rating (common practice: 1 to 2 %). */
  steadyStateZeroSequenceVoltagePercent?: number;
  /** For the inductive part of the secondary arc current: the healthy phases' load current and the interphase mutual impedance (Z0 - Z1) / 3. */
  inductiveCoupling?: { loadCurrentA: number; mutualImpedanceOhmPerKm: { re: number; im: number }; faultPositionPu?: number };
}

export interface SecondaryArcCase {
  /** From the healthy phases through the (net) interphase capacitance: independent of the fault position. */
  capacitiveCurrentA: number;
  /** Voltage of the open phase once the arc is out (capacitive coupling only), line-to-ground. */
  recoveryVoltageKv: number;
  recoveryVoltagePu: number;
}

export interface NeutralReactorDesign {
  frequencyHz: number;
  voltageKv: number;
  lengthKm: number;
  positiveSequenceSusceptanceS: number;
  zeroSequenceSusceptanceS: number;
  chargingMvar: number;
  phaseReactor: {
    reactanceOhmPerPhase: number;
    inductanceHPerPhase: number;
    qMvarThreePhase: number;
    perBank: { reactanceOhmPerPhase: number; qMvarThreePhase: number };
  };
  neutralReactor: {
    reactanceOhm: number;
    inductanceH: number;
    ratioToPhaseReactor: number;
    perBank: { reactanceOhm: number; inductanceH: number };
    rating: {
      /** While the secondary arc burns: faulted phase at ground potential. */
      arcingVoltageKv: number;
      /** After extinction, and for as long as a pole stays open: the open phase floats at its recovery voltage. */
      openPhaseVoltageKv: number;
      shortTimeVoltageKv: number;
      shortTimeCurrentAPerBank: number;
      shortTimeMvarPerBank: number;
      continuousVoltageKv: number | null;
      continuousCurrentAPerBank: number | null;
    };
  };
  interphaseCancellation: number;
  /** Largest cancellation the phase reactors allow (neutral reactor infinite, i.e. an isolated neutral). */
  maximumInterphaseCancellation: number;
  secondaryArc: {
    withNeutralReactor: SecondaryArcCase;
    solidlyGroundedNeutral: SecondaryArcCase;
    withoutReactors: SecondaryArcCase;
    /** Induced by the healthy phases' load current; null when inductiveCoupling was not given. */
    inductiveCurrentA: number | null;
    faultPositionPu: number | null;
    /** Capacitive and inductive parts added arithmetically: an upper bound, as their phase angle depends on the load. */
    totalUpperBoundA: number;
    limitA: number;
    limitBasis: 'common practice';
    withinLimit: boolean;
  };
  warnings: string[];
}

const HINT =
  'Pass { frequencyHz, voltageKv, lengthKm, positiveSequenceCapacitanceNfPerKm, zeroSequenceCapacitanceNfPerKm, shuntCompensationDegree, interphaseCancellation?, reactorBankCount?, secondaryArcLimitA?, steadyStateZeroSequenceVoltagePercent?, inductiveCoupling? }.';

/** Lumped line during the dead time: net interphase and net phase-to-ground susceptance (capacitive positive), both in siemens. */
function deadTimeCase(phaseVoltageV: number, interphaseS: number, phaseToGroundS: number): SecondaryArcCase {
  const capacitiveCurrentA = phaseVoltageV * Math.abs(interphaseS);
  // The open phase's own susceptance: to ground and to the two healthy phases (whose sources are short circuits for this part).
  const selfS = phaseToGroundS + 2 * interphaseS;
  if (selfS === 0 || Math.abs(selfS) < 1e-12 * Math.abs(interphaseS)) {
    throw new SolverDomainError({
      code: 'degenerate-network',
      quantity: 'open-phase self susceptance (S)',
      value: selfS,
      allowedRange: 'non-zero',
      hint: 'The open phase is exactly resonant with the reactors; change the shunt compensation degree or the neutral reactor.',
    });
  }
  const recoveryVoltagePu = Math.abs(interphaseS / selfS);
  return { capacitiveCurrentA, recoveryVoltageKv: vToKv(recoveryVoltagePu * phaseVoltageV), recoveryVoltagePu };
}

/**
 * Four-reactor scheme (Knudsen 1962; Kimbark, IEEE Trans. PAS-83, 1964) on a transposed line with lumped capacitances: phase
 * reactors of positive-sequence susceptance F B1; the neutral reactor sets the zero-sequence susceptance B_L0 so that the
 * reactors' equivalent interphase susceptance (F B1 - B_L0) / 3 cancels the share k of the interphase capacitance (B1 - B0) / 3.
 * During the dead time the arc current is V |b_pp| and the recovery voltage V |b_pp / (b_g + 2 b_pp)| with b_pp, b_g the net
 * interphase and phase-to-ground susceptances (capacitance less reactors).
 */
export function neutralReactorDesign(options: NeutralReactorOptions): NeutralReactorDesign {
  const record = requireObject('options', options, HINT);
  const frequencyHz = requireNumber('frequencyHz', record.frequencyHz, FREQUENCY_RANGE_HZ, HINT);
  const voltageKv = requireNumber('voltageKv', record.voltageKv, VOLTAGE_RANGE_KV, HINT);
  const lengthKm = requireNumber('lengthKm', record.lengthKm, LENGTH_RANGE_KM, HINT);
  const positiveNfPerKm = requireNumber(
    'positiveSequenceCapacitanceNfPerKm',
    record.positiveSequenceCapacitanceNfPerKm,
    { min: 0, max: 100, minInclusive: false, unit: 'nF/km' },
    HINT,
  );
  const zeroNfPerKm = requireNumber(
    'zeroSequenceCapacitanceNfPerKm',
    record.zeroSequenceCapacitanceNfPerKm,
    { min: 0, max: positiveNfPerKm, minInclusive: false, maxInclusive: false, unit: 'nF/km' },
    'On an overhead line the zero-sequence capacitance is below the positive-sequence one (typically 0.5 to 0.8 of it).',
  );
  const degree = requireNumber(
    'shuntCompensationDegree',
    record.shuntCompensationDegree,
    { min: 0, max: 2, minInclusive: false },
    'Phase reactor Mvar over line charging Mvar, e.g. 0.7.',
  );
  const cancellation = optionalNumber(
    'interphaseCancellation',
    record.interphaseCancellation,
    1,
    { min: 0, max: 1 },
    '1 cancels the interphase capacitance fully.',
  );
  const bankCount = optionalNumber(
    'reactorBankCount',
    record.reactorBankCount,
    1,
    { min: 1, max: 20 },
    'Number of identical four-reactor banks on the line.',
  );
  if (!Number.isInteger(bankCount)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'reactorBankCount',
      value: bankCount,
      allowedRange: 'an integer in [1, 20]',
      hint: HINT,
    });
  }
  const limitA = optionalNumber(
    'secondaryArcLimitA',
    record.secondaryArcLimitA,
    20,
    { min: 0, max: 1000, minInclusive: false, unit: 'A' },
    'Self-extinction limit (common practice: about 20 A rms; set from the utility standard or test data).',
  );
  const unbalancePercent =
    record.steadyStateZeroSequenceVoltagePercent === undefined
      ? null
      : requireNumber('steadyStateZeroSequenceVoltagePercent', record.steadyStateZeroSequenceVoltagePercent, { min: 0, max: 20, unit: '%' }, HINT);

  const omega = angularFrequency(frequencyHz);
  const phaseVoltageV = phaseVoltsFromLineKv(voltageKv);
  const b1 = omega * positiveNfPerKm * 1e-9 * lengthKm;
  const b0 = omega * zeroNfPerKm * 1e-9 * lengthKm;
  const reactor1 = degree * b1;
  const maximumInterphaseCancellation = Math.min(1, reactor1 / (b1 - b0));
  const reactor0 = reactor1 - cancellation * (b1 - b0);
  if (!(reactor0 > 0)) {
    throw new SolverDomainError({
      code: 'target-unreachable',
      quantity: 'interphaseCancellation',
      value: cancellation,
      allowedRange: `[0, ${forMessage(reactor1 / (b1 - b0))}) with shuntCompensationDegree ${degree}`,
      hint: `Full cancellation needs a shunt compensation degree above 1 - C0/C1 = ${forMessage(1 - zeroNfPerKm / positiveNfPerKm)}; raise the degree or accept partial cancellation.`,
    });
  }
  const phaseReactanceOhm = 1 / reactor1;
  const neutralReactanceOhm = (1 / reactor0 - phaseReactanceOhm) / 3;

  const withNeutralReactor = deadTimeCase(phaseVoltageV, (b1 - b0 - (reactor1 - reactor0)) / 3, b0 - reactor0);
  const solidlyGroundedNeutral = deadTimeCase(phaseVoltageV, (b1 - b0) / 3, b0 - reactor1);
  const withoutReactors = deadTimeCase(phaseVoltageV, (b1 - b0) / 3, b0);

  // Neutral voltage of the star: (Va + Vb + Vc) Xn / (3 Xn + Xp); while arcing Va = 0, afterwards Va = -rho Ea with Vb + Vc = -Ea.
  const starShare = neutralReactanceOhm / (3 * neutralReactanceOhm + phaseReactanceOhm);
  const netInterphase = (b1 - b0 - (reactor1 - reactor0)) / 3;
  const rho = netInterphase / (b0 - reactor0 + 2 * netInterphase);
  const arcingVoltageV = phaseVoltageV * starShare;
  const openPhaseVoltageV = phaseVoltageV * Math.abs(1 + rho) * starShare;
  const shortTimeVoltageV = Math.max(arcingVoltageV, openPhaseVoltageV);
  const bankNeutralOhm = neutralReactanceOhm * bankCount;
  // Neutral current |Va + Vb + Vc| / (3 Xn + Xp): finite also for a solidly grounded neutral (Xn = 0).
  const shortTimeCurrentAPerBank = (Math.max(1, Math.abs(1 + rho)) * phaseVoltageV) / (bankCount * (3 * neutralReactanceOhm + phaseReactanceOhm));
  const continuousVoltageV = unbalancePercent === null ? null : 3 * (unbalancePercent / 100) * phaseVoltageV * starShare;
  const continuousCurrentAPerBank =
    unbalancePercent === null ? null : (3 * (unbalancePercent / 100) * phaseVoltageV) / (bankCount * (3 * neutralReactanceOhm + phaseReactanceOhm));

  let inductiveCurrentA: number | null = null;
  let faultPositionPu: number | null = null;
  if (record.inductiveCoupling !== undefined) {
    const coupling = requireObject('inductiveCoupling', record.inductiveCoupling, HINT);
    const loadCurrentA = requireNumber(
      'inductiveCoupling.loadCurrentA',
      coupling.loadCurrentA,
      { min: 0, max: 1e5, unit: 'A' },
      'Load current of the healthy phases during the dead time.',
    );
    const mutual = requireComplex(
      'inductiveCoupling.mutualImpedanceOhmPerKm',
      coupling.mutualImpedanceOhmPerKm,
      '(Z0 - Z1) / 3 per km, as { re, im }.',
    );
    // Worst case at a line end unless a position is given.
    faultPositionPu = optionalNumber(
      'inductiveCoupling.faultPositionPu',
      coupling.faultPositionPu,
      0,
      { min: 0, max: 1 },
      'Fault position from the sending end, 0 to 1.',
    );
    // The EMF induced along the open phase, E = Zm (Ib + Ic) l, drives the phase's own (self) susceptance, split evenly either side
    // of the line's middle: with the potential zero at the fault, I = E (1/2 - m) b_self (reactors taken as split between the ends).
    const inducedEmfV = mutual.abs() * loadCurrentA * lengthKm;
    const selfS = Math.abs(b0 - reactor0 + 2 * netInterphase);
    inductiveCurrentA = inducedEmfV * Math.abs(0.5 - faultPositionPu) * selfS;
  }
  const totalUpperBoundA = withNeutralReactor.capacitiveCurrentA + (inductiveCurrentA ?? 0);
  const warnings: string[] = [];
  if (totalUpperBoundA > limitA) {
    warnings.push(
      `Secondary arc current up to ${totalUpperBoundA.toFixed(1)} A exceeds the ${limitA} A self-extinction limit taken (common practice): single-pole reclosing may fail; consider fuller cancellation, a longer dead time or high-speed grounding switches.`,
    );
  }
  if (withNeutralReactor.recoveryVoltagePu > 1 || openPhaseVoltageV > phaseVoltageV) {
    warnings.push(
      `The open phase is near resonance with the reactors (recovery voltage ${withNeutralReactor.recoveryVoltagePu.toFixed(2)} pu): a pole left open can sustain an overvoltage; check with reactor losses and the real degree of transposition.`,
    );
  }
  if (record.inductiveCoupling === undefined) {
    warnings.push(
      'The inductive part of the secondary arc current was not evaluated (no inductiveCoupling given); on a heavily loaded long line it can dominate at the line ends.',
    );
  }

  return assertFiniteResult('neutralReactorDesign', {
    frequencyHz,
    voltageKv,
    lengthKm,
    positiveSequenceSusceptanceS: b1,
    zeroSequenceSusceptanceS: b0,
    chargingMvar: varToMvar(3 * phaseVoltageV ** 2 * b1),
    phaseReactor: {
      reactanceOhmPerPhase: phaseReactanceOhm,
      inductanceHPerPhase: phaseReactanceOhm / omega,
      qMvarThreePhase: varToMvar(3 * phaseVoltageV ** 2 * reactor1),
      perBank: { reactanceOhmPerPhase: phaseReactanceOhm * bankCount, qMvarThreePhase: varToMvar(3 * phaseVoltageV ** 2 * reactor1) / bankCount },
    },
    neutralReactor: {
      reactanceOhm: neutralReactanceOhm,
      inductanceH: neutralReactanceOhm / omega,
      ratioToPhaseReactor: neutralReactanceOhm / phaseReactanceOhm,
      perBank: { reactanceOhm: bankNeutralOhm, inductanceH: bankNeutralOhm / omega },
      rating: {
        arcingVoltageKv: vToKv(arcingVoltageV),
        openPhaseVoltageKv: vToKv(openPhaseVoltageV),
        shortTimeVoltageKv: vToKv(shortTimeVoltageV),
        shortTimeCurrentAPerBank,
        shortTimeMvarPerBank: varToMvar(shortTimeVoltageV * shortTimeCurrentAPerBank),
        continuousVoltageKv: continuousVoltageV === null ? null : vToKv(continuousVoltageV),
        continuousCurrentAPerBank,
      },
    },
    interphaseCancellation: cancellation,
    maximumInterphaseCancellation,
    secondaryArc: {
      withNeutralReactor,
      solidlyGroundedNeutral,
      withoutReactors,
      inductiveCurrentA,
      faultPositionPu,
      totalUpperBoundA,
      limitA,
      limitBasis: 'common practice' as const,
      withinLimit: totalUpperBoundA <= limitA,
    },
    warnings,
  });
}
