// Public surface of the solver: every function a study block may call as solver.<name>(options), and the shared types.
export { SolverDomainError } from './errors.ts';
export type { SolverErrorCode } from './errors.ts';
export { polarForm } from './complex.ts';
export type { ComplexValue, PolarForm } from './complex.ts';
export { lineConstantsFromGeometry } from './lineConstants.ts';
export type { ConductorData, GeometryOptions, LineConstantsFromGeometry } from './lineConstants.ts';
export { compensatedLineCharacteristics, lineModel, lineCharacteristics } from './lineModels.ts';
export type { CompensatedLineCharacteristics, LineCharacteristics, LineModelOptions, LinePerKmInput } from './lineModels.ts';
export { cascade, checkReciprocity } from './twoPort.ts';
export type {
  CascadeTwoPort,
  ElementTwoPort,
  LineModelName,
  LineSectionTwoPort,
  LumpedTwoPort,
  PerKmConstants,
  ReciprocityCheck,
  SeriesElementTwoPort,
  ShuntElementTwoPort,
  SourceEquivalentTwoPort,
  TwoPort,
} from './twoPort.ts';
export {
  reverseTwoPort,
  seriesCapacitor,
  seriesImpedance,
  seriesReactor,
  shuntCapacitor,
  shuntReactor,
  sourceEquivalent,
  symmetricalPi,
  twoPortFromAbcd,
} from './elements.ts';
export type { SeriesCapacitorOptions, ShuntElementOptions, SourceEquivalentOptions } from './elements.ts';
export { solveFixedSendingVoltage, solveNoLoad, solveReceivingLoad, solveTwoEndVoltages } from './solutions.ts';
export type { EndQuantities, LoadInput, OperatingCase, OperatingPoint } from './solutions.ts';
export { voltageProfile } from './profile.ts';
export type { VoltageProfile } from './profile.ts';
export { angleForTransfer, powerAngleCurve, powerCircles, pvCurve, qvCurve } from './curves.ts';
export type { PowerAngleCurve, PowerAnglePoint, PowerCircle, PvCurve, PvPoint, QvCurve } from './curves.ts';
export { elementLosses } from './losses.ts';
export type { ElementLoss, ElementLosses } from './losses.ts';
export { shuntCapacitorForLoadVoltage, shuntReactorForNoLoad, svcRange } from './sizing.ts';
export type { ReactorPlacement, ShuntCapacitorSizing, ShuntReactorSizing, SvcCaseResult, SvcRange } from './sizing.ts';
export { seriesCompensationDesign } from './seriesCompensation.ts';
export type { CapacitorLocation, SeriesCompensationDesign } from './seriesCompensation.ts';
export { ssrScreening } from './ssr.ts';
export { frequencyScan } from './frequencyScan.ts';
export type { FrequencyScan, FrequencyScanOptions, ScanElement, SeriesResonance, TorsionalProximity } from './frequencyScan.ts';
export type { SsrScreening } from './ssr.ts';
export { sequenceCapacitanceFromGeometry } from './sequenceCapacitance.ts';
export type { SequenceCapacitance, SequenceCapacitanceOptions } from './sequenceCapacitance.ts';
export { neutralReactorDesign } from './neutralReactor.ts';
export type { NeutralReactorDesign, NeutralReactorOptions, SecondaryArcCase } from './neutralReactor.ts';
export { varistorEnergy } from './varistorEnergy.ts';
export type { VaristorEnergy, VaristorEnergyOptions } from './varistorEnergy.ts';
export { capitalisedCostComparison } from './costs.ts';
export type { CapitalisedCostComparison, CapitalisedCostOptions, CompensationOption, LineLossInput, OptionCost } from './costs.ts';
export { lineLoadability } from './loadability.ts';
export type { LoadabilityCurve, LoadabilityLimit, LoadabilityPoint } from './loadability.ts';
export type {
  CorridorBusInput,
  CorridorInput,
  CorridorSectionInput,
  CorridorSystemInput,
  FixedLoadInput,
  SegmentPosition,
  SeriesSegmentInput,
  ShuntUnitInput,
  SvcInput,
} from './corridor.ts';
export { solveCorridorCase, solveCorridorCases } from './cases.ts';
export type {
  BusResult,
  CaseLoading,
  CaseSystemState,
  CorridorCaseInput,
  CorridorCaseSolution,
  CorridorCaseTable,
  EnergisationResult,
  EnergisingGenerator,
  SectionEndFlow,
  SectionResult,
  SegmentResult,
  ShuntUnitResult,
  SolvedCorridorCase,
  SvcResult,
  SystemResult,
  UnsolvedCorridorCase,
  VoltageControlInput,
  VoltageControlResult,
} from './cases.ts';
export { switchingSteps } from './switchingSteps.ts';
export { sizeReactorsAcrossCases } from './caseSizing.ts';
export { corridorFault } from './shortCircuit.ts';
export { corridorCaseCriteria } from './caseCriteria.ts';
export { seriesBankRatings } from './seriesBankRatings.ts';
export { corridorFrequencyScan } from './corridorScan.ts';
export type { CorridorFrequencyScan } from './corridorScan.ts';
export type { OverloadDuty, SeriesBankRatings } from './seriesBankRatings.ts';
export type { CaseCriteria, CaseCriterionKind, CaseCriterionRow, CaseCriterionSettings, CaseCriterionSummary } from './caseCriteria.ts';
export type { CorridorFault, FaultPlace, SegmentFaultDuty } from './shortCircuit.ts';
export type {
  BusAllotment,
  CaseVoltageSpan,
  ReactorSizingAcrossCases,
  SizedUnit,
  SizedUnitsState,
  SizingCaseInput,
  SizingFailure,
  SizingOption,
} from './caseSizing.ts';
export type { BusVoltageChange, SwitchingStep, SwitchingSteps } from './switchingSteps.ts';
export { compareCompensationAlternatives } from './alternatives.ts';
export type {
  AlternativeCaseSummary,
  AlternativeCriterion,
  CompensationAlternative,
  CompensationAlternativeInput,
  CompensationAlternatives,
  EquipmentPrice,
  PricedEquipment,
} from './alternatives.ts';
