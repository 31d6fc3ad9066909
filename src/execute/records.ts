// What a calculation block leaves behind, as plain data that crosses the process boundary from the calculation child.
import type { DiagnosticValue } from '../diagnostics/diagnostic.ts';

/** Where in a block something happened, before the parent maps it to a study line. */
export interface BlockPosition {
  blockIndex: number;
  /** 1-based line and column in the transpiled JavaScript of that block. */
  line: number;
  column: number;
}

export type ScalarValue = number | string | boolean;

export interface ResultRecord {
  kind: 'result';
  name: string;
  value: ScalarValue;
  unit: string;
  digits: number;
  note?: string;
  /** Relative tolerance a checker allows for this figure; the study default applies when absent. */
  tolerance?: number;
}

export interface CriterionRecord {
  kind: 'criterion';
  name: string;
  value: number;
  unit: string;
  digits: number;
  min?: number;
  max?: number;
  passed: boolean;
  note?: string;
  /** What the criterion measures, in words, for the report's criteria section. */
  measures?: string;
  /** Where the limit comes from: the standard, code or rule it is taken from. */
  basis?: string;
}

export interface CautionRecord {
  kind: 'caution';
  text: string;
}

export interface TableColumn {
  key: string;
  label: string;
  unit: string;
  digits: number;
}

export interface TableRecord {
  kind: 'table';
  caption?: string;
  columns: TableColumn[];
  rows: ScalarValue[][];
}

export interface ChartRecord {
  kind: 'chart';
  caption: string;
  spec: unknown;
}

export interface TextRecord {
  kind: 'text';
  text: string;
}

export interface SolverCallRecord {
  kind: 'solver-call';
  functionName: string;
  /** Arguments and return value in full, as the calculation log records them (the names are kept for the records' shape). */
  argumentsSummary: unknown;
  returnedSummary: unknown;
}

export type BlockRecord = (ResultRecord | CriterionRecord | CautionRecord | TableRecord | ChartRecord | TextRecord | SolverCallRecord) & {
  position?: BlockPosition;
};

/** A thrown error as the child reports it: no host stack, only positions inside blocks. */
export interface BlockErrorReport {
  name: string;
  message: string;
  code?: string;
  hint?: string;
  /** The value at fault, when the error is one of kvarbook's own (see Diagnostic). */
  quantity?: string;
  expected?: string;
  actual?: DiagnosticValue;
  positions: BlockPosition[];
}
