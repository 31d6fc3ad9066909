// The study as kvarbook understands it after parsing: metadata, typed inputs, calculation blocks, inline values.
import type { Token } from 'markdown-it';
import type { SourceLocation } from '../diagnostics/diagnostic.ts';
import type { ParsedQuantity, QuantityKind } from './units.ts';

export interface Person {
  name: string;
  licence?: string;
  jurisdiction?: string;
}

export interface RunLimits {
  /** Wall time one calculation block may take. */
  blockSeconds: number;
  /** Wall time the whole study may take. */
  studySeconds: number;
  /** Heap the calculation process may use. */
  heapMb: number;
}

export const DEFAULT_LIMITS: RunLimits = { blockSeconds: 10, studySeconds: 120, heapMb: 512 };

/** Where the report shows the calculation code: in an appendix, the body keeping a reference (the default), or beside its outputs. */
export type CodePlacement = 'appendix' | 'inline';
export const CODE_PLACEMENTS: readonly CodePlacement[] = ['appendix', 'inline'];

export interface ReportOptions {
  pdf: boolean;
  paper: 'A4' | 'Letter';
  code: CodePlacement;
}

export interface StudyMeta {
  title: string;
  project: string;
  /** The line the study is about, as the utility names it; optional, and what the archive is searched by. */
  line?: string;
  id: string;
  revision: number;
  /** ISO date (YYYY-MM-DD) of the study; the report never uses the wall clock. */
  date: string;
  engineer: Person;
  checker?: Person;
  limits: RunLimits;
  report: ReportOptions;
}

export interface InputSpec {
  name: string;
  given: ParsedQuantity;
  /** The text as written in the front matter, e.g. "320 km". */
  givenText: string;
  kind?: QuantityKind;
  min?: ParsedQuantity;
  max?: ParsedQuantity;
  description?: string;
  at: SourceLocation;
}

/** How far an uncertain input may lie from its value: per cent either side, a factor either way, or two quantities. */
export type SensitivitySpread =
  | { kind: 'percent'; lowPercent: number; highPercent: number }
  | { kind: 'factor'; factor: number }
  | { kind: 'ends'; low: ParsedQuantity; high: ParsedQuantity };

export interface SensitivityRange {
  input: string;
  spread: SensitivitySpread;
  /** The range as the front matter writes it, e.g. "-1 % to +1 %". */
  declared: string;
  at: SourceLocation;
}

/** A result or criterion the sensitivity section names, where it names it. */
export interface NamedFigure {
  name: string;
  at: SourceLocation;
}

/** The front matter's `sensitivity:` section: the uncertain inputs with their ranges, and the figures to follow. */
export interface SensitivityPlan {
  ranges: SensitivityRange[];
  results: NamedFigure[];
  criteria: NamedFigure[];
  /** A sampled run besides the ends: `samples` draws of every ranged input at once, uniform within its range, from `seed`. */
  sampling?: { samples: number; seed: number };
  at: SourceLocation;
}

export interface BlockOptions {
  /** Run the block but show only its outputs in the report. */
  hideCode: boolean;
  /** Show the code in the report but never run it. */
  noRun: boolean;
}

export interface CalcBlock {
  /** 0-based position among all `ts` blocks of the study. */
  index: number;
  code: string;
  /** 1-based study line of the opening fence. */
  fenceLine: number;
  /** 1-based study line of the first code line. */
  firstCodeLine: number;
  options: BlockOptions;
}

export interface InlineExpression {
  id: number;
  expression: string;
  at: SourceLocation;
  /** How many runnable blocks precede it: it is evaluated after that many have run. */
  afterRunnableBlocks: number;
}

export interface Study {
  /** The path as the user named it, used in every location. */
  file: string;
  source: string;
  sourceSha256: string;
  meta: StudyMeta;
  inputs: InputSpec[];
  /** Present when the front matter declares what is uncertain (`kvarbook run --sensitivity` uses it). */
  sensitivity?: SensitivityPlan;
  blocks: CalcBlock[];
  inlines: InlineExpression[];
  /** markdown-it tokens of the body, kept for rendering. */
  bodyTokens: Token[];
  /** 1-based study line where the Markdown body starts. */
  bodyFirstLine: number;
}
