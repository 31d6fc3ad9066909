// The globals of a calculation block, typed: the type check uses this file, and an editor can too.
//
// In a scratch .ts file, `/// <reference path="<kvarbook>/src/execute/blockGlobals.d.ts" />` gives completion for the
// block API and the solver. Declare your study's inputs by adding to `KvarbookStudyInputs`:
//   declare global { interface KvarbookStudyInputs { lineLength: import('<kvarbook>/src/blocks/blockApi.ts').InputValue } }
import type * as Api from '../blocks/blockApi.ts';
import type * as SolverModule from '../solver/index.ts';
import type * as ChartModule from '../blocks/charts.ts';

declare global {
  /** The study's inputs, one member per input of the front matter; kvarbook fills it in for each study. */
  interface KvarbookStudyInputs {}
  const inputs: Readonly<KvarbookStudyInputs>;
  const result: Api.BlockApi['result'];
  const criterion: Api.BlockApi['criterion'];
  const caution: Api.BlockApi['caution'];
  const table: Api.BlockApi['table'];
  const caseTable: Api.BlockApi['caseTable'];
  const chart: Api.BlockApi['chart'];
  const figure: Api.BlockApi['figure'];
  const solver: typeof SolverModule;
  const charts: typeof ChartModule;
  const console: { log(...parts: unknown[]): void };
}
