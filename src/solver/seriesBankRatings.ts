// Series capacitor segment ratings from a case table: continuous and emergency current, capacitor voltage and Mvar, overload duties and protective level.
import type { CorridorCaseTable, SegmentResult } from './cases.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { kvToV, varToMvar, vToKv } from './units.ts';

export interface OverloadDuty {
  label: string;
  /** Multiple of the rated current. */
  currentPu: number;
  durationMinutes: number;
}

/**
 * The overload duty cycle of a series capacitor bank as the series-capacitor standards describe it (IEC 60143-1 and IEEE Std 824:
 * 1.10 pu for 8 h in 12 h, 1.35 pu for 30 min in 6 h, 1.50 pu for 10 min in 2 h; values from memory). A study passes its own when the
 * purchaser's specification differs.
 */
export const STANDARD_OVERLOAD_DUTIES: readonly OverloadDuty[] = Object.freeze([
  Object.freeze({ label: '8 h in every 12 h', currentPu: 1.1, durationMinutes: 480 }),
  Object.freeze({ label: '30 min in every 6 h', currentPu: 1.35, durationMinutes: 30 }),
  Object.freeze({ label: '10 min in every 2 h', currentPu: 1.5, durationMinutes: 10 }),
]);

export interface SeriesBankRatings {
  segment: string;
  reactanceOhm: number;
  /** Highest current over the normal (non-emergency) cases, rms per circuit, and the case it occurs in. */
  continuousDuty: { currentArms: number; case: string };
  /** Highest current over the emergency cases, rms per circuit; null when no emergency case was named. */
  emergencyDuty: { currentArms: number; case: string; heldTo: OverloadDuty } | null;
  designMarginPercent: number;
  /**
   * The current swing after a fault (from a stability study), held to the bank's swing capability; null when none was given. The
   * varistor must not conduct in the swing, so its peak capacitor voltage is compared with the protective level.
   */
  swingDuty: {
    currentArms: number;
    capabilityPu: number;
    durationSeconds: number;
    capacitorVoltageKvPeak: number;
    belowProtectiveLevel: boolean;
  } | null;
  /** Which duty sets the rated current. */
  governedBy: 'continuous' | 'emergency' | 'swing';
  /** Rounded up to the rating step. */
  ratedCurrentArms: number;
  /** Per phase, across the capacitor at rated current: I_rated Xc. */
  ratedVoltageKvRms: number;
  /** Three-phase, per circuit: 3 I_rated^2 Xc. */
  ratedMvar: number;
  protectiveLevelPu: number;
  /** Peak capacitor voltage at which the varistor limits: k sqrt 2 I_rated Xc. */
  protectiveLevelKvPeak: number;
  /** Each overload duty of the cycle at the rated current, rms. */
  overloadDuties: Array<OverloadDuty & { currentArms: number }>;
  /** Cases without a solution, which the rating does not cover. */
  unsolvedCases: string[];
}

const HINT =
  'Pass { table (from solveCorridorCases), segment, emergencyCases?: [case labels], designMarginPercent?, ratingStepA?, protectiveLevelPu?, overloadDuties?, emergencyDutyLabel?, swing?: { currentArms, capabilityPu, durationSeconds } }.';

/**
 * Ratings of one series capacitor segment from the currents the case table gives it: the rated current covers the highest normal-case
 * current with the design margin, and the highest emergency-case current within the overload duty it is held to (by default the
 * 30-minute duty); the capacitor's rated voltage and Mvar follow from the rated current and the reactance, and the protective level
 * is a multiple of the rated peak capacitor voltage (2.0 to 2.5 is common practice).
 */
export function seriesBankRatings(options: {
  table: CorridorCaseTable;
  segment: string;
  emergencyCases?: string[];
  designMarginPercent?: number;
  ratingStepA?: number;
  protectiveLevelPu?: number;
  overloadDuties?: OverloadDuty[];
  emergencyDutyLabel?: string;
  swing?: { currentArms: number; capabilityPu: number; durationSeconds: number };
}): SeriesBankRatings {
  const record = requireObject('options', options, HINT);
  const table = requireObject('table', record.table, HINT) as unknown as CorridorCaseTable;
  const solutions = requireArray('table.cases', table.cases, 1, HINT) as CorridorCaseTable['cases'];
  const labels = solutions.map((solution) => solution.label);
  const emergencyCases = new Set(
    (record.emergencyCases === undefined ? [] : requireArray('emergencyCases', record.emergencyCases, 0, HINT)).map((label, index) => {
      if (typeof label === 'string' && labels.includes(label)) return label;
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: `emergencyCases[${index}]`,
        value: String(label),
        allowedRange: `one of ${labels.map((known) => `'${known}'`).join(', ')}`,
        hint: 'Name the contingency cases of the table by their labels.',
      });
    }),
  );
  const designMarginPercent = optionalNumber(
    'designMarginPercent',
    record.designMarginPercent,
    0,
    { min: 0, max: 100, unit: '%' },
    'Margin over the highest normal-case current.',
  );
  const ratingStepA = optionalNumber(
    'ratingStepA',
    record.ratingStepA,
    50,
    { min: 0, max: 1000, minInclusive: false, unit: 'A' },
    'The rated current is rounded up to a multiple of this.',
  );
  const protectiveLevelPu = optionalNumber(
    'protectiveLevelPu',
    record.protectiveLevelPu,
    2.3,
    { min: 1.5, max: 3.5, unit: 'pu' },
    'Multiple of the rated peak capacitor voltage at which the varistor limits; 2.0 to 2.5 is common practice.',
  );
  const duties = record.overloadDuties === undefined ? STANDARD_OVERLOAD_DUTIES : readDuties(record.overloadDuties);
  const dutyLabel = record.emergencyDutyLabel === undefined ? '30 min in every 6 h' : String(record.emergencyDutyLabel);
  const heldTo = duties.find((duty) => duty.label === dutyLabel);
  if (!heldTo) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'emergencyDutyLabel',
      value: dutyLabel,
      allowedRange: `one of ${duties.map((duty) => `'${duty.label}'`).join(', ')}`,
      hint: 'The overload duty the emergency cases are held to.',
    });
  }
  const segmentName = record.segment;
  const currents: Array<{ label: string; emergency: boolean; segment: SegmentResult }> = [];
  let found = false;
  for (const solution of solutions) {
    if (!solution.solved) continue;
    for (const section of solution.sections) {
      const segment = section.seriesCapacitors.find((candidate) => candidate.name === segmentName);
      if (!segment) continue;
      found = true;
      if (!segment.bypassed) currents.push({ label: solution.label, emergency: emergencyCases.has(solution.label), segment });
    }
  }
  if (!found) {
    const known = [
      ...new Set(
        solutions.flatMap((solution) =>
          solution.solved ? solution.sections.flatMap((section) => section.seriesCapacitors.map((segment) => segment.name)) : [],
        ),
      ),
    ];
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'segment',
      value: String(segmentName),
      allowedRange: known.length === 0 ? 'no series segments in the solved cases' : `one of ${known.map((name) => `'${name}'`).join(', ')}`,
      hint: 'Name a series capacitor segment of the corridor.',
    });
  }
  const highest = (emergency: boolean) =>
    currents
      .filter((entry) => entry.emergency === emergency)
      .reduce<(typeof currents)[number] | null>(
        (best, entry) => (best === null || entry.segment.currentA > best.segment.currentA ? entry : best),
        null,
      );
  const normal = highest(false);
  if (normal === null) {
    throw new SolverDomainError({
      code: 'missing-quantity',
      quantity: 'table.cases',
      value: null,
      allowedRange: `at least one solved normal case with '${String(segmentName)}' inserted`,
      hint: 'The continuous rating is set by the normal cases; mark only the contingencies as emergency cases.',
    });
  }
  const emergency = highest(true);
  // The reactance is the segment's per-phase power-frequency reactance: its voltage over its current in any solved case.
  const reactanceOhm = kvToV(normal.segment.voltageKv) / normal.segment.currentA;
  const forContinuousA = normal.segment.currentA * (1 + designMarginPercent / 100);
  const forEmergencyA = emergency ? emergency.segment.currentA / heldTo.currentPu : 0;
  const swing = record.swing === undefined ? null : readSwing(record.swing);
  const forSwingA = swing ? swing.currentArms / swing.capabilityPu : 0;
  const ratedCurrentArms = Math.ceil(Math.max(forContinuousA, forEmergencyA, forSwingA) / ratingStepA) * ratingStepA;
  const ratedVoltageKvRms = vToKv(ratedCurrentArms * reactanceOhm);
  const protectiveLevelKvPeak = protectiveLevelPu * Math.SQRT2 * ratedVoltageKvRms;
  const governing = Math.max(forContinuousA, forEmergencyA, forSwingA);
  return assertFiniteResult('seriesBankRatings', {
    segment: String(segmentName),
    reactanceOhm,
    continuousDuty: { currentArms: normal.segment.currentA, case: normal.label },
    emergencyDuty: emergency ? { currentArms: emergency.segment.currentA, case: emergency.label, heldTo } : null,
    designMarginPercent,
    swingDuty: swing
      ? {
          ...swing,
          capacitorVoltageKvPeak: vToKv(Math.SQRT2 * swing.currentArms * reactanceOhm),
          belowProtectiveLevel: vToKv(Math.SQRT2 * swing.currentArms * reactanceOhm) < protectiveLevelKvPeak,
        }
      : null,
    governedBy: governing === forContinuousA ? 'continuous' : governing === forEmergencyA ? 'emergency' : 'swing',
    ratedCurrentArms,
    ratedVoltageKvRms,
    ratedMvar: varToMvar(3 * ratedCurrentArms ** 2 * reactanceOhm),
    protectiveLevelPu,
    protectiveLevelKvPeak,
    overloadDuties: duties.map((duty) => ({ ...duty, currentArms: duty.currentPu * ratedCurrentArms })),
    unsolvedCases: solutions.filter((solution) => !solution.solved).map((solution) => solution.label),
  });
}

function readSwing(value: unknown): { currentArms: number; capabilityPu: number; durationSeconds: number } {
  const swing = requireObject(
    'swing',
    value,
    'Pass { currentArms, capabilityPu, durationSeconds }: the swing from a stability study and the capability specified for it.',
  );
  return {
    currentArms: requireNumber(
      'swing.currentArms',
      swing.currentArms,
      { min: 0, max: 1e5, minInclusive: false, unit: 'A' },
      'The highest rms current of the swing after a fault, from a stability study.',
    ),
    capabilityPu: requireNumber(
      'swing.capabilityPu',
      swing.capabilityPu,
      { min: 1, max: 3, unit: 'pu' },
      "The bank's swing capability as a multiple of its rated current, as the purchaser's specification states it.",
    ),
    durationSeconds: requireNumber(
      'swing.durationSeconds',
      swing.durationSeconds,
      { min: 0, max: 600, minInclusive: false, unit: 's' },
      'How long the swing lasts.',
    ),
  };
}

function readDuties(value: unknown): OverloadDuty[] {
  return requireArray('overloadDuties', value, 1, HINT).map((entry, index) => {
    const duty = requireObject(`overloadDuties[${index}]`, entry, 'Pass { label, currentPu, durationMinutes }.');
    if (typeof duty.label !== 'string' || duty.label === '') {
      throw new SolverDomainError({
        code: 'missing-quantity',
        quantity: `overloadDuties[${index}].label`,
        value: null,
        allowedRange: 'a name',
        hint: 'Name each duty.',
      });
    }
    return {
      label: duty.label,
      currentPu: requireNumber(
        `overloadDuties[${index}].currentPu`,
        duty.currentPu,
        { min: 1, max: 3, unit: 'pu' },
        'Multiple of the rated current.',
      ),
      durationMinutes: requireNumber(
        `overloadDuties[${index}].durationMinutes`,
        duty.durationMinutes,
        { min: 0, max: 1440, minInclusive: false, unit: 'min' },
        'How long the duty lasts.',
      ),
    };
  });
}
