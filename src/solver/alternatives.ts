// Compensation alternatives of one corridor side by side: voltages in the study's cases, transfer limits, losses, capitalised cost, criteria.
import { Complex } from './complex.ts';
import { readCorridor, type Corridor, type CorridorInput } from './corridor.ts';
import { caseVoltageExtremes, readCase, solveCorridorCases, type CaseState, type CorridorCaseInput, type SolvedCorridorCase } from './cases.ts';
import { corridorCaseCriteria, type CaseCriterionKind, type CaseCriterionRow, type CaseCriterionSettings } from './caseCriteria.ts';
import { capitalisedCostComparison, type CapitalisedCostComparison } from './costs.ts';
import { receivingPowerAtAngleMw, steadyStateLimitAngleRad } from './curves.ts';
import { sectionPieces } from './corridorNetwork.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { lineAbcd, perKmToSi } from './lineModels.ts';
import { IDENTITY_ABCD, multiplyAbcd, seriesImpedanceAbcd, shuntAdmittanceAbcd, type AbcdMatrix } from './twoPort.ts';
import { degToRad, kmToM, kvToV, wToMw } from './units.ts';

/** How each kind of equipment is priced: per Mvar of its rating, and its own losses in % of that rating while in service. */
export interface EquipmentPrice {
  costPerMvar: number;
  lossPercent?: number;
}

export interface CompensationAlternativeInput {
  label: string;
  /** The whole corridor with this alternative's compensation; every shunt unit, SVC and series segment in it is priced. */
  corridor: CorridorInput;
  /** Switching of this alternative's own units in a case, by case label (e.g. its reactors out at the peak). */
  switching?: Record<string, Pick<CorridorCaseInput, 'unitsIn' | 'unitsOut' | 'bypassed' | 'inserted'>>;
  /** Cost outside the priced equipment (bays, land), in the cost unit. */
  otherCost?: number;
  /** Criteria the study judges itself for this alternative (a resonance screen, say), counted with the rest. */
  studyCriteria?: Array<{ name: string; passed: boolean; value?: number; limit?: number; unit?: string; note?: string }>;
}

export interface AlternativeCaseSummary {
  label: string;
  solved: boolean;
  /** Why the case has no operating point (empty when solved). */
  reason: string;
  highestPu: number | null;
  highestAt: string;
  lowestPu: number | null;
  lowestAt: string;
  /** Between the corridor's end buses. */
  angleDeg: number | null;
  lossesMw: number | null;
}

/** A criterion row as corridorCaseCriteria gives it, for the worst case of the criterion (case empty for the transfer and a study's own). */
export interface AlternativeCriterion extends Omit<CaseCriterionRow, 'criterion'> {
  criterion: CaseCriterionKind | 'transfer' | 'study';
  /** The criterion in words (e.g. 'the voltage band'), or the name a study criterion was given. */
  name: string;
}

export interface PricedEquipment {
  name: string;
  kind: 'shunt-reactor' | 'shunt-capacitor' | 'svc' | 'series-capacitor';
  /** Nameplate Mvar (an SVC: its capacitive plus inductive range; a series segment: 3 I_rated^2 Xc for every circuit). */
  ratingMvar: number;
  cost: number;
  lossMw: number;
}

export interface CompensationAlternative {
  label: string;
  cases: AlternativeCaseSummary[];
  /** The no-load case's highest voltage and the peak case's lowest, anywhere on the corridor (null when the case is unsolved). */
  noLoadHighestPu: number | null;
  peakLowestPu: number | null;
  peakAngleDeg: number | null;
  peakLossesMw: number | null;
  /** Steady-state limit between the end buses held at nominal voltage, in the peak case's switching state. */
  maximumTransferMw: number;
  maximumTransferSil: number;
  /** The largest transfer within the angle limit (and the thermal limit, when given) between the same held end buses. */
  loadabilityMw: number;
  loadabilitySil: number;
  loadabilityLimitedBy: 'angle' | 'thermal' | 'steady-state limit';
  equipment: PricedEquipment[];
  equipmentCost: number;
  presentValueOfLosses: number;
  presentValueOfMaintenance: number;
  capitalisedCost: number;
  costRank: number;
  differenceToCheapest: number;
  criteria: AlternativeCriterion[];
  criteriaMet: number;
  allCriteriaMet: boolean;
}

export interface CompensationAlternatives {
  lineModel: 'distributed';
  method: string;
  nominalVoltageKv: number;
  /** Of the uncompensated corridor, V^2 / sqrt(X / B) over its sections' totals (lossless). */
  surgeImpedanceLoadingMw: number;
  noLoadCase: string;
  peakCase: string;
  angleLimitDeg: number;
  targetTransferMw: number | null;
  alternatives: CompensationAlternative[];
  /** The cheapest capitalised cost among the alternatives that meet every criterion; null when none does. */
  recommended: string | null;
  /** The cost comparison itself, as capitalisedCostComparison gives it (for costComparisonChart). */
  costs: CapitalisedCostComparison;
}

const HINT =
  'Pass { alternatives: [{ label, corridor, switching?: { <case label>: { unitsIn?, unitsOut?, bypassed?, inserted? } }, otherCost? }], cases: [...], noLoadCase, peakCase, bandPu, angleLimitDeg, caseSettings?, targetTransferMw?, thermalLimitMw?, costs: { discountRatePercent, lifeYears, energyCostPerMwh, demandCostPerKwYear?, costUnit?, loadFactor, maintenancePercentPerYear?, prices: { shuntReactor, shuntCapacitor, svc, seriesCapacitor } }, profilePointCount? }.';

const METHOD =
  'Each alternative is its own corridor, solved by Newton-Raphson in every case; the transfer limits are those of the corridor between its end buses held at nominal voltage, in the peak case switching state, with an SVC at its capacitive ceiling; capitalised cost from the equipment, the peak-case line losses and the equipment losses over the life.';

const CRITERION_NAMES: Record<CaseCriterionKind | 'transfer', string> = {
  'operating-point': 'an operating point in every case',
  'voltage-band': 'the voltage band',
  'corridor-angle': 'the angle limit',
  'series-bank-current': 'the series bank rating',
  'svc-range': 'the SVC range',
  transfer: 'the target transfer within the angle limit',
};

const PRICE_KINDS = { shuntReactor: 'shunt-reactor', shuntCapacitor: 'shunt-capacitor', svc: 'svc', seriesCapacitor: 'series-capacitor' } as const;

/**
 * Compares compensation alternatives of one corridor. Each alternative is solved in the study's cases (with its own switching), judged
 * on the case criteria (corridorCaseCriteria) and on carrying the target transfer within the angle limit, and costed with
 * capitalisedCostComparison; the recommendation is the cheapest alternative that meets every criterion.
 */
export function compareCompensationAlternatives(options: {
  alternatives: CompensationAlternativeInput[];
  cases: CorridorCaseInput[];
  noLoadCase: string;
  peakCase: string;
  bandPu: { min: number; max: number };
  angleLimitDeg: number;
  caseSettings?: Record<string, CaseCriterionSettings>;
  targetTransferMw?: number;
  thermalLimitMw?: number;
  costs: {
    discountRatePercent: number;
    lifeYears: number;
    energyCostPerMwh: number;
    demandCostPerKwYear?: number;
    costUnit?: string;
    loadFactor: number;
    maintenancePercentPerYear?: number;
    prices: Record<keyof typeof PRICE_KINDS, EquipmentPrice>;
  };
  profilePointCount?: number;
}): CompensationAlternatives {
  const record = requireObject('options', options, HINT);
  const inputs = requireArray('alternatives', record.alternatives, 1, HINT).map((value, index) => readAlternative(value, index));
  const cases = requireArray('cases', record.cases, 1, HINT).map((value, index) => requireObject(`cases[${index}]`, value, HINT));
  const labels = cases.map((item) => String(item.label));
  const noLoadCase = requireCaseLabel('noLoadCase', record.noLoadCase, labels);
  const peakCase = requireCaseLabel('peakCase', record.peakCase, labels);
  const angleLimitDeg = requireNumber(
    'angleLimitDeg',
    record.angleLimitDeg,
    { min: 0, max: 90, minInclusive: false, unit: 'deg' },
    'The planning angle limit across the corridor; about 30 to 35 degrees is common practice.',
  );
  const targetTransferMw =
    record.targetTransferMw === undefined
      ? null
      : requireNumber('targetTransferMw', record.targetTransferMw, { min: 0, max: 1e5, minInclusive: false, unit: 'MW' }, HINT);
  const thermalLimitMw =
    record.thermalLimitMw === undefined
      ? null
      : requireNumber('thermalLimitMw', record.thermalLimitMw, { min: 0, max: 1e5, minInclusive: false, unit: 'MW' }, HINT);
  const costs = requireObject('costs', record.costs, HINT);
  const loadFactor = requireNumber(
    'costs.loadFactor',
    costs.loadFactor,
    { min: 0, max: 1 },
    'Load factor of the peak case loading, for the line losses over the year.',
  );
  const maintenancePercent = optionalNumber(
    'costs.maintenancePercentPerYear',
    costs.maintenancePercentPerYear,
    0,
    { min: 0, max: 20, unit: '%' },
    'Annual maintenance in % of the equipment cost (1 to 2 % is common practice).',
  );
  const prices = readPrices(requireObject('costs.prices', costs.prices, HINT));

  const evaluated = inputs.map((alternative, index) => {
    const where = `alternatives[${index}]`;
    const corridor = readCorridor(alternative.corridor, `${where}.corridor`);
    const ownCases = cases.map((item) => withSwitching(item, alternative.switching[String(item.label)]));
    const table = solveCorridorCases({
      corridor: alternative.corridor,
      cases: ownCases as unknown as CorridorCaseInput[],
      ...(record.profilePointCount === undefined ? {} : { profilePointCount: record.profilePointCount as number }),
    });
    const summaries = table.cases.map(summariseCase);
    const judged = corridorCaseCriteria({
      table,
      bandPu: record.bandPu as { min: number; max: number },
      maxAngleDeg: angleLimitDeg,
      ...(record.caseSettings === undefined ? {} : { cases: record.caseSettings as Record<string, CaseCriterionSettings> }),
    });
    const peakState = readCase(corridor, ownCases[labels.indexOf(peakCase)], `${where}.cases[${labels.indexOf(peakCase)}]`);
    const transfer = transferLimits(corridor, peakState, angleLimitDeg, thermalLimitMw, where);
    const equipment = priceEquipment(corridor, prices);
    const criteria: AlternativeCriterion[] = judged.summary.map((entry) => ({
      criterion: entry.criterion,
      name: CRITERION_NAMES[entry.criterion],
      passed: entry.failedCount === 0,
      case: entry.worst.case,
      where: entry.worst.where,
      value: entry.worst.value,
      limit: entry.worst.limit,
      unit: entry.worst.unit,
      margin: entry.worst.margin,
      note: entry.failedCount === 0 ? `met in ${entry.caseCount} cases` : `${entry.failedCount} failed; worst: ${entry.worst.note}`,
    }));
    if (targetTransferMw !== null) {
      criteria.push({
        criterion: 'transfer',
        name: CRITERION_NAMES.transfer,
        passed: transfer.loadabilityMw >= targetTransferMw,
        case: '',
        where: `${corridor.buses[0]!.name} to ${corridor.buses[corridor.buses.length - 1]!.name}`,
        value: transfer.loadabilityMw,
        limit: targetTransferMw,
        unit: 'MW',
        margin: transfer.loadabilityMw - targetTransferMw,
        note: `the target transfer within ${angleLimitDeg} deg between end buses at nominal voltage`,
      });
    }
    criteria.push(...alternative.studyCriteria.map((own) => ({ criterion: 'study' as const, case: '', where: '', ...own })));
    return { alternative, corridor, summaries, transfer, equipment, criteria };
  });

  const silMw = surgeImpedanceLoadingMw(evaluated[0]!.corridor);
  const costComparison = capitalisedCostComparison({
    discountRatePercent: costs.discountRatePercent as number,
    lifeYears: costs.lifeYears as number,
    energyCostPerMwh: costs.energyCostPerMwh as number,
    ...(costs.demandCostPerKwYear === undefined ? {} : { demandCostPerKwYear: costs.demandCostPerKwYear as number }),
    ...(typeof costs.costUnit === 'string' ? { costUnit: costs.costUnit } : {}),
    options: evaluated.map(({ alternative, summaries, equipment }) => {
      const equipmentCost = alternative.otherCost + equipment.reduce((sum, item) => sum + item.cost, 0);
      return {
        label: alternative.label,
        equipmentCost,
        // An unsolved peak case has no losses to cost; the alternative then fails its operating-point criterion anyway.
        lineLosses: { peakLossMw: summaries[labels.indexOf(peakCase)]!.lossesMw ?? 0, loadFactor },
        equipmentLosses: equipment.map((item) => ({ label: item.name, lossMw: item.lossMw })),
        annualMaintenanceCost: (equipmentCost * maintenancePercent) / 100,
      };
    }),
  });

  const alternatives = evaluated.map(({ alternative, summaries, transfer, equipment, criteria }, index): CompensationAlternative => {
    const cost = costComparison.options[index]!;
    const noLoad = summaries[labels.indexOf(noLoadCase)]!;
    const peak = summaries[labels.indexOf(peakCase)]!;
    const criteriaMet = criteria.filter((item) => item.passed).length;
    return {
      label: alternative.label,
      cases: summaries,
      noLoadHighestPu: noLoad.highestPu,
      peakLowestPu: peak.lowestPu,
      peakAngleDeg: peak.angleDeg,
      peakLossesMw: peak.lossesMw,
      maximumTransferMw: transfer.maximumTransferMw,
      maximumTransferSil: transfer.maximumTransferMw / silMw,
      loadabilityMw: transfer.loadabilityMw,
      loadabilitySil: transfer.loadabilityMw / silMw,
      loadabilityLimitedBy: transfer.limitedBy,
      equipment,
      equipmentCost: cost.equipmentCost,
      presentValueOfLosses: cost.presentValueOfLosses,
      presentValueOfMaintenance: cost.presentValueOfMaintenance,
      capitalisedCost: cost.capitalisedCost,
      costRank: cost.rank,
      differenceToCheapest: cost.differenceToCheapest,
      criteria,
      criteriaMet,
      allCriteriaMet: criteriaMet === criteria.length,
    };
  });
  const meeting = alternatives.filter((item) => item.allCriteriaMet).sort((first, second) => first.capitalisedCost - second.capitalisedCost);
  return assertFiniteResult('compareCompensationAlternatives', {
    lineModel: 'distributed' as const,
    method: METHOD,
    nominalVoltageKv: evaluated[0]!.corridor.nominalVoltageKv,
    surgeImpedanceLoadingMw: silMw,
    noLoadCase,
    peakCase,
    angleLimitDeg,
    targetTransferMw,
    alternatives,
    recommended: meeting[0]?.label ?? null,
    costs: costComparison,
  });
}

type StudyCriterion = Omit<AlternativeCriterion, 'criterion' | 'case' | 'where'>;
type ReadAlternative = Omit<Required<CompensationAlternativeInput>, 'studyCriteria'> & { studyCriteria: StudyCriterion[] };

function readAlternative(value: unknown, index: number): ReadAlternative {
  const where = `alternatives[${index}]`;
  const record = requireObject(where, value, HINT);
  if (typeof record.label !== 'string' || record.label === '') {
    throw new SolverDomainError({ code: 'missing-quantity', quantity: `${where}.label`, value: null, allowedRange: 'a non-empty name', hint: HINT });
  }
  return {
    label: record.label,
    corridor: record.corridor as CorridorInput,
    switching: (record.switching === undefined ? {} : requireObject(`${where}.switching`, record.switching, HINT)) as ReadAlternative['switching'],
    otherCost: optionalNumber(
      `${where}.otherCost`,
      record.otherCost,
      0,
      { min: 0, max: 1e13 },
      'Cost outside the priced equipment, in the cost unit.',
    ),
    studyCriteria: (record.studyCriteria === undefined ? [] : requireArray(`${where}.studyCriteria`, record.studyCriteria, 0, HINT)).map(
      (value, criterionIndex) => readStudyCriterion(value, `${where}.studyCriteria[${criterionIndex}]`),
    ),
  };
}

function readStudyCriterion(value: unknown, where: string): StudyCriterion {
  const record = requireObject(where, value, 'Pass { name, passed, value?, limit?, unit?, note? }.');
  if (typeof record.name !== 'string' || record.name === '' || typeof record.passed !== 'boolean') {
    throw new SolverDomainError({
      code: 'missing-quantity',
      quantity: `${where}.name / .passed`,
      value: null,
      allowedRange: 'a non-empty name and true or false',
      hint: 'A study criterion names what it judges and whether the alternative meets it.',
    });
  }
  const optional = (key: string) =>
    record[key] === undefined ? null : requireNumber(`${where}.${key}`, record[key], {}, 'The value judged and its limit, when there are numbers.');
  return {
    name: record.name,
    passed: record.passed,
    value: optional('value'),
    limit: optional('limit'),
    unit: typeof record.unit === 'string' ? record.unit : '',
    margin: null,
    note: typeof record.note === 'string' ? record.note : '',
  };
}

function requireCaseLabel(quantity: string, value: unknown, labels: string[]): string {
  if (typeof value !== 'string' || !labels.includes(value)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity,
      value: String(value),
      allowedRange: `one of ${labels.map((label) => `'${label}'`).join(', ')}`,
      hint: 'Name one of the cases by its label.',
    });
  }
  return value;
}

function readPrices(record: Record<string, unknown>): Record<PricedEquipment['kind'], Required<EquipmentPrice>> {
  const entries = Object.entries(PRICE_KINDS).map(([key, kind]) => {
    const price = requireObject(`costs.prices.${key}`, record[key], HINT);
    return [
      kind,
      {
        costPerMvar: requireNumber(
          `costs.prices.${key}.costPerMvar`,
          price.costPerMvar,
          { min: 0, max: 1e9 },
          'Installed cost per Mvar of rating, in the cost unit.',
        ),
        lossPercent: optionalNumber(
          `costs.prices.${key}.lossPercent`,
          price.lossPercent,
          0,
          { min: 0, max: 10, unit: '%' },
          'Losses in service in % of the rating (about 0.2 % for a shunt reactor, 0.05 % for capacitors; common practice).',
        ),
      },
    ] as const;
  });
  return Object.fromEntries(entries) as Record<PricedEquipment['kind'], Required<EquipmentPrice>>;
}

/** The common case with the alternative's own switching added to its lists. */
function withSwitching(item: Record<string, unknown>, switching: Record<string, unknown> | undefined): Record<string, unknown> {
  if (switching === undefined) return item;
  const merged: Record<string, unknown> = { ...item };
  for (const key of ['unitsIn', 'unitsOut', 'bypassed', 'inserted']) {
    const own = switching[key];
    if (own === undefined) continue;
    merged[key] = [...((item[key] as unknown[] | undefined) ?? []), ...(own as unknown[])];
  }
  return merged;
}

function summariseCase(solution: SolvedCorridorCase | { label: string; solved: false; reason: string }): AlternativeCaseSummary {
  if (!solution.solved) {
    return {
      label: solution.label,
      solved: false,
      reason: solution.reason,
      highestPu: null,
      highestAt: '',
      lowestPu: null,
      lowestAt: '',
      angleDeg: null,
      lossesMw: null,
    };
  }
  const extremes = caseVoltageExtremes(solution);
  return {
    label: solution.label,
    solved: true,
    reason: '',
    highestPu: extremes.highestPu,
    highestAt: extremes.highestAt,
    lowestPu: extremes.lowestPu,
    lowestAt: extremes.lowestAt,
    angleDeg: Math.abs(solution.buses[0]!.angleDeg - solution.buses[solution.buses.length - 1]!.angleDeg),
    lossesMw: solution.sections.reduce((sum, section) => sum + section.lossesMw, 0),
  };
}

/**
 * The corridor's chain between its end buses in one switching state: shunt units in service at each bus, an SVC in service at its
 * capacitive ceiling (where it sits near the transfer limit), each section's circuits in service with its inserted segments.
 */
function corridorAbcd(corridor: Corridor, state: CaseState, where: string): AbcdMatrix {
  const nominalV = kvToV(corridor.nominalVoltageKv);
  let chain = IDENTITY_ABCD;
  corridor.buses.forEach((bus, index) => {
    let susceptanceS = 0;
    for (const unit of [...bus.reactors, ...bus.capacitors]) if (state.inService(unit.name)) susceptanceS += unit.susceptanceS;
    if (bus.svc && state.inService(bus.svc.name)) susceptanceS += (bus.svc.capacitiveMvar * 1e6) / nominalV ** 2;
    if (susceptanceS !== 0) chain = multiplyAbcd(chain, shuntAdmittanceAbcd(new Complex(0, susceptanceS)));
    const section = corridor.sections[index];
    if (!section) return;
    const circuits = state.circuitsInService[section.index] as number;
    if (circuits === 0) {
      throw new SolverDomainError({
        code: 'degenerate-network',
        quantity: `${where}: peak case circuitsOut`,
        value: section.name,
        allowedRange: 'a peak case with every section in service',
        hint: 'The transfer limit needs a path between the end buses; take the peak case with the section in.',
      });
    }
    const { z, y } = perKmToSi(section.perKm);
    for (const piece of sectionPieces(section, state.bypassed)) {
      chain = multiplyAbcd(
        chain,
        piece.kind === 'segment'
          ? seriesImpedanceAbcd(new Complex(0, -piece.segment.reactanceOhm / circuits))
          : lineAbcd('distributed', z.div(circuits), y.mul(circuits), kmToM(piece.lengthKm)),
      );
    }
  });
  if (!(chain.B.im > 0)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: `${where}.corridor.sections (series reactance)`,
      value: chain.B.im,
      allowedRange: 'a net inductive path between the end buses',
      hint: 'The series capacitors reach the reactance of the line: lower their reactance.',
    });
  }
  return chain;
}

function transferLimits(
  corridor: Corridor,
  state: CaseState,
  angleLimitDeg: number,
  thermalLimitMw: number | null,
  where: string,
): { maximumTransferMw: number; loadabilityMw: number; limitedBy: CompensationAlternative['loadabilityLimitedBy'] } {
  const abcd = corridorAbcd(corridor, state, where);
  const kv = corridor.nominalVoltageKv;
  const limitAngle = steadyStateLimitAngleRad(abcd);
  const maximumTransferMw = receivingPowerAtAngleMw(abcd, kv, kv, limitAngle);
  const angleRad = degToRad(angleLimitDeg);
  const atAngleMw = angleRad >= limitAngle ? maximumTransferMw : receivingPowerAtAngleMw(abcd, kv, kv, angleRad);
  let loadabilityMw = atAngleMw;
  let limitedBy: CompensationAlternative['loadabilityLimitedBy'] = angleRad >= limitAngle ? 'steady-state limit' : 'angle';
  if (thermalLimitMw !== null && thermalLimitMw < loadabilityMw) [loadabilityMw, limitedBy] = [thermalLimitMw, 'thermal'];
  return { maximumTransferMw, loadabilityMw, limitedBy };
}

function surgeImpedanceLoadingMw(corridor: Corridor): number {
  // Totals over the sections (n circuits: X / n and n B), so that a corridor of unlike sections gets one natural load.
  let reactanceOhm = 0;
  let susceptanceS = 0;
  for (const section of corridor.sections) {
    reactanceOhm += (section.perKm.seriesReactanceOhmPerKm * section.lengthKm) / section.circuits;
    susceptanceS += section.perKm.shuntSusceptanceUsPerKm * 1e-6 * section.lengthKm * section.circuits;
  }
  return wToMw(kvToV(corridor.nominalVoltageKv) ** 2 / Math.sqrt(reactanceOhm / susceptanceS));
}

function priceEquipment(corridor: Corridor, prices: Record<PricedEquipment['kind'], Required<EquipmentPrice>>): PricedEquipment[] {
  const priced = (name: string, kind: PricedEquipment['kind'], ratingMvar: number): PricedEquipment => ({
    name,
    kind,
    ratingMvar,
    cost: ratingMvar * prices[kind].costPerMvar,
    lossMw: (ratingMvar * prices[kind].lossPercent) / 100,
  });
  const units = corridor.buses.flatMap((bus) => [
    ...[...bus.reactors, ...bus.capacitors].map((unit) => priced(unit.name, unit.kind, unit.qMvar)),
    ...(bus.svc ? [priced(bus.svc.name, 'svc', bus.svc.capacitiveMvar + bus.svc.inductiveMvar)] : []),
  ]);
  const segments = corridor.sections.flatMap((section) =>
    section.seriesCapacitors.map((segment) =>
      priced(segment.name, 'series-capacitor', (3 * segment.ratedCurrentA ** 2 * segment.reactanceOhm * section.circuits) / 1e6),
    ),
  );
  return [...units, ...segments];
}
