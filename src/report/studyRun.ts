// Everything a finished run knows, gathered for the render stage, and the machine-readable results document.
import type { SourceLocation } from '../diagnostics/diagnostic.ts';
import type { EffectiveInput } from '../study/inputs.ts';
import type { Study } from '../study/model.ts';
import type { ExecutionOutcome, LocatedRecord } from '../execute/session.ts';
import type { CautionRecord, ChartRecord, CriterionRecord, ResultRecord, SolverCallRecord } from '../execute/records.ts';
import type { SensitivityOutcome } from '../sensitivity/outcome.ts';
import { STANDING_CAUTIONS, earnedCautions } from './cautions.ts';
import type { Provenance } from './provenance.ts';

export interface StudyRun {
  study: Study;
  inputs: EffectiveInput[];
  outcome: ExecutionOutcome;
  provenance: Provenance;
  /** The one-at-a-time runs, when the run was asked for them (`--sensitivity`). */
  sensitivity?: StudySensitivity;
}

export interface StudySensitivity {
  outcome: SensitivityOutcome;
  /** One tornado chart per followed result, in the order of `outcome.results`. */
  charts: ChartRecord[];
}

type Located<T> = T & { at?: SourceLocation };

export function recordsOf<K extends LocatedRecord['kind']>(run: StudyRun, kind: K): Located<Extract<LocatedRecord, { kind: K }>>[] {
  return run.outcome.blocks.flatMap((block) =>
    block.records.filter((record): record is Located<Extract<LocatedRecord, { kind: K }>> => record.kind === kind),
  );
}

/** One step of the calculation log: a result, a criterion or a solver call, numbered in the order the study made them. */
export interface LogStep {
  step: number;
  record: Located<Extract<LocatedRecord, { kind: 'result' | 'criterion' | 'solver-call' }>>;
}

export function calculationLogSteps(run: StudyRun): LogStep[] {
  const steps: LogStep[] = [];
  for (const block of run.outcome.blocks)
    for (const record of block.records)
      if (record.kind === 'result' || record.kind === 'criterion' || record.kind === 'solver-call')
        steps.push({ step: steps.length + 1, record: record as LogStep['record'] });
  return steps;
}

/** What a solver call was given: solver functions take one options object, logged as that object rather than a list of one. */
export function solverCallOptions(record: SolverCallRecord): unknown {
  const args = record.argumentsSummary;
  return Array.isArray(args) && args.length === 1 ? args[0] : args;
}

/** A solver call as results.json carries it: every argument and every returned value in full, by its log step. */
export interface SolverCallEntry {
  step: number;
  functionName: string;
  at?: SourceLocation;
  arguments: unknown;
  returned: unknown;
}

export interface CautionEntry {
  text: string;
  standing: boolean;
  at?: SourceLocation;
}

export function cautionsOf(run: StudyRun): CautionEntry[] {
  const fromStudy = recordsOf(run, 'caution').map((record: Located<CautionRecord>) => ({
    text: record.text,
    standing: false,
    ...(record.at ? { at: record.at } : {}),
  }));
  const catalogue = [...STANDING_CAUTIONS, ...earnedCautions(recordsOf(run, 'solver-call'))];
  return [...catalogue.map((caution) => ({ text: caution.text, standing: true })), ...fromStudy];
}

export interface ResultsDocument {
  format: 'kvarbook-results/1';
  study: {
    id: string;
    revision: number;
    title: string;
    project: string;
    date: string;
    engineer: Study['meta']['engineer'];
    checker?: Study['meta']['checker'];
  };
  inputs: { name: string; value: number; unit: string; source: 'given' | 'overridden'; given: string; description?: string }[];
  results: Located<Omit<ResultRecord, 'position'>>[];
  criteria: Located<Omit<CriterionRecord, 'position'>>[];
  cautions: CautionEntry[];
  solverCalls: number;
  /** The solver calls of the calculation log in full; the report's log points here for what it does not show inline. */
  solverCallLog: SolverCallEntry[];
  sensitivity?: SensitivityOutcome;
  provenance: Provenance;
}

export function resultsDocument(run: StudyRun): ResultsDocument {
  const { meta } = run.study;
  return {
    format: 'kvarbook-results/1',
    study: {
      id: meta.id,
      revision: meta.revision,
      title: meta.title,
      project: meta.project,
      date: meta.date,
      engineer: meta.engineer,
      ...(meta.checker ? { checker: meta.checker } : {}),
    },
    inputs: run.inputs.map((input) => ({
      name: input.name,
      value: input.value,
      unit: input.unit,
      source: input.source,
      given: input.givenText,
      ...(input.description ? { description: input.description } : {}),
    })),
    results: recordsOf(run, 'result'),
    criteria: recordsOf(run, 'criterion'),
    cautions: cautionsOf(run),
    solverCalls: recordsOf(run, 'solver-call').length as number,
    solverCallLog: calculationLogSteps(run).flatMap(({ step, record }) =>
      record.kind === 'solver-call'
        ? [
            {
              step,
              functionName: record.functionName,
              ...(record.at ? { at: record.at } : {}),
              arguments: solverCallOptions(record),
              returned: record.returnedSummary,
            },
          ]
        : [],
    ),
    ...(run.sensitivity ? { sensitivity: run.sensitivity.outcome } : {}),
    provenance: run.provenance,
  };
}

export type { SolverCallRecord };
