// The revision diff: what changed between two reports of a study, from their figures and study sources; pure.
import { diffArrays, structuredPatch } from 'diff';
import { compareResults, type MismatchReason, type ResultValue } from '../seal/compare.ts';
import type { CalcBlock } from '../study/model.ts';
import type { ReportPayload } from './payload.ts';

export const DIFF_FORMAT = 'kvarbook-diff/1';

/** Lines of unchanged code shown around each changed stretch of a block. */
const CONTEXT_LINES = 3;

export interface DiffSide {
  report: string;
  studyId: string;
  revision: string;
  title: string;
  studyFile: string;
  figuresFrom: 'seal' | 'results';
  sealedBy: string | null;
  kvarbookVersion: string;
  nodeVersion: string;
  lockfileSha256: string;
}

export interface FieldChange {
  field: string;
  old: string | null;
  new: string | null;
}

export interface InputState {
  /** The value as the front matter writes it. */
  given: string | null;
  value: number;
  unit: string;
  source: 'given' | 'overridden' | 'default';
}

export type Change = 'added' | 'removed';

export interface InputChange {
  name: string;
  change: Change | 'changed';
  old: InputState | null;
  new: InputState | null;
}

export interface ResultChange {
  name: string;
  change: Change | 'moved';
  /** Why a result present in both is listed; null for one added or removed. */
  reason: MismatchReason | null;
  old: { value: ResultValue; unit: string | null } | null;
  new: { value: ResultValue; unit: string | null } | null;
  /** new − old, for two finite numbers; null otherwise. */
  difference: number | null;
  /** |new − old| / max(|old|, |new|), the seal's measure; null when not two finite numbers. */
  relativeDifference: number | null;
  /** The relative tolerance within which the figure counts as unchanged; null for text and flags. */
  tolerance: number | null;
}

export interface CriterionState {
  value: number;
  unit: string | null;
  passed: boolean;
  limits: string;
}

export interface CriterionChange {
  name: string;
  change: Change | 'flipped';
  old: CriterionState | null;
  new: CriterionState | null;
}

export interface BlockPlace {
  /** 1-based position among the study's calculation blocks. */
  position: number;
  /** Study line of the opening fence. */
  fenceLine: number;
  /** The options after `ts` on the fence (`hide-code`, `no-run`), as written there. */
  options: string[];
}

export interface CodeHunk {
  oldStart: number;
  oldLines: number;
  newStart: number;
  newLines: number;
  /** Each line starts with ' ' (unchanged), '-' (old only) or '+' (new only); line numbers count within the block. */
  lines: string[];
}

export interface BlockChange {
  change: Change | 'changed';
  old: BlockPlace | null;
  new: BlockPlace | null;
  hunks: CodeHunk[];
}

export interface RevisionDiff {
  format: typeof DIFF_FORMAT;
  old: DiffSide;
  new: DiffSide;
  /** How many entries the lists below hold, both lists of cautions counted: 0 for two reports alike. */
  differences: number;
  frontMatter: FieldChange[];
  inputs: InputChange[];
  results: ResultChange[];
  criteria: CriterionChange[];
  cautions: { added: string[]; removed: string[] };
  blocks: BlockChange[];
  environment: FieldChange[];
}

export interface DiffOptions {
  /** Relative tolerance for results that state none, as `check` uses it. */
  defaultRelativeTolerance?: number;
}

export function revisionDiff(older: ReportPayload, newer: ReportPayload, options: DiffOptions = {}): RevisionDiff {
  const parts = {
    frontMatter: fieldChanges(flatFields(older.study.meta), flatFields(newer.study.meta)),
    inputs: inputChanges(older, newer),
    results: resultChanges(older, newer, options),
    criteria: criterionChanges(older, newer),
    cautions: {
      added: newer.figures.cautions.filter((text) => !older.figures.cautions.includes(text)),
      removed: older.figures.cautions.filter((text) => !newer.figures.cautions.includes(text)),
    },
    blocks: blockChanges(older.study.blocks, newer.study.blocks),
    environment: fieldChanges(environmentFields(older), environmentFields(newer)),
  };
  const differences =
    parts.frontMatter.length +
    parts.inputs.length +
    parts.results.length +
    parts.criteria.length +
    parts.cautions.added.length +
    parts.cautions.removed.length +
    parts.blocks.length +
    parts.environment.length;
  return { format: DIFF_FORMAT, old: sideOf(older), new: sideOf(newer), differences, ...parts };
}

function sideOf(payload: ReportPayload): DiffSide {
  const { figures } = payload;
  return {
    report: payload.path,
    studyId: figures.studyId,
    revision: figures.revision,
    title: figures.title,
    studyFile: figures.studyFile,
    figuresFrom: payload.figuresFrom,
    sealedBy: payload.sealedBy,
    kvarbookVersion: figures.kvarbookVersion,
    nodeVersion: figures.nodeVersion,
    lockfileSha256: figures.lockfileSha256,
  };
}

function environmentFields(payload: ReportPayload): Map<string, string> {
  const { kvarbookVersion, nodeVersion, lockfileSha256 } = payload.figures;
  return new Map([
    ['kvarbookVersion', kvarbookVersion],
    ['nodeVersion', nodeVersion],
    ['lockfileSha256', lockfileSha256],
  ]);
}

/** The front matter as kvarbook read it, one dotted field per value (`engineer.name`, `limits.heapMb`). */
function flatFields(value: unknown, prefix = '', into = new Map<string, string>()): Map<string, string> {
  if (Array.isArray(value)) value.forEach((item, index) => flatFields(item, `${prefix}[${index}]`, into));
  else if (typeof value === 'object' && value !== null) {
    for (const [key, item] of Object.entries(value)) flatFields(item, prefix ? `${prefix}.${key}` : key, into);
  } else if (value !== undefined) into.set(prefix, String(value));
  return into;
}

/** Fields of either side in order (the old ones first, then those only the new one has), listed when they differ. */
function fieldChanges(older: Map<string, string>, newer: Map<string, string>): FieldChange[] {
  const fields = [...older.keys(), ...[...newer.keys()].filter((field) => !older.has(field))];
  return fields.flatMap((field) => {
    const was = older.get(field) ?? null;
    const is = newer.get(field) ?? null;
    return was === is ? [] : [{ field, old: was, new: is }];
  });
}

function namesInOrder(older: readonly string[], newer: readonly string[]): string[] {
  const known = new Set(older);
  return [...older, ...newer.filter((name) => !known.has(name))];
}

function inputState(payload: ReportPayload, name: string): InputState | null {
  const effective = payload.figures.effectiveInputs[name];
  if (effective === undefined) return null;
  const declared = payload.study.inputs.find((input) => input.name === name);
  return { given: declared?.givenText ?? null, value: effective.value, unit: effective.unit, source: effective.source };
}

function inputChanges(older: ReportPayload, newer: ReportPayload): InputChange[] {
  return namesInOrder(Object.keys(older.figures.effectiveInputs), Object.keys(newer.figures.effectiveInputs)).flatMap((name): InputChange[] => {
    const was = inputState(older, name);
    const is = inputState(newer, name);
    if (was !== null && is !== null) {
      const same = was.given === is.given && was.value === is.value && was.unit === is.unit && was.source === is.source;
      return same ? [] : [{ name, change: 'changed', old: was, new: is }];
    }
    return [{ name, change: was === null ? 'added' : 'removed', old: was, new: is }];
  });
}

/** Moved figures by relative change, largest first, then those with no numeric change (text, flags, units); then added and removed. */
function resultChanges(older: ReportPayload, newer: ReportPayload, options: DiffOptions): ResultChange[] {
  const comparison = compareResults(
    older.figures.results,
    newer.figures.results,
    options.defaultRelativeTolerance === undefined ? {} : { defaultRelativeTolerance: options.defaultRelativeTolerance },
  );
  const figureOf = (payload: ReportPayload, name: string) => {
    const result = payload.figures.results.find((item) => item.name === name);
    return result === undefined ? null : { value: result.value, unit: result.unit ?? null };
  };
  const moved: ResultChange[] = comparison.mismatches.map((mismatch) => ({
    name: mismatch.name,
    change: 'moved',
    reason: mismatch.reason,
    old: figureOf(older, mismatch.name),
    new: figureOf(newer, mismatch.name),
    difference: mismatch.difference,
    relativeDifference: mismatch.relativeDifference,
    tolerance: mismatch.tolerance,
  }));
  moved.sort((a, b) => (b.relativeDifference ?? Number.NEGATIVE_INFINITY) - (a.relativeDifference ?? Number.NEGATIVE_INFINITY));
  const oneSided = (name: string, change: Change): ResultChange => ({
    name,
    change,
    reason: null,
    old: figureOf(older, name),
    new: figureOf(newer, name),
    difference: null,
    relativeDifference: null,
    tolerance: null,
  });
  return [...moved, ...comparison.extra.map((name) => oneSided(name, 'added')), ...comparison.missing.map((name) => oneSided(name, 'removed'))];
}

function criterionChanges(older: ReportPayload, newer: ReportPayload): CriterionChange[] {
  const stateOf = (payload: ReportPayload, name: string): CriterionState | null => {
    const criterion = payload.figures.criteria.find((item) => item.name === name);
    return criterion === undefined
      ? null
      : { value: criterion.value, unit: criterion.unit ?? null, passed: criterion.passed, limits: criterion.limits };
  };
  const names = (payload: ReportPayload) => payload.figures.criteria.map((criterion) => criterion.name);
  return namesInOrder(names(older), names(newer)).flatMap((name): CriterionChange[] => {
    const was = stateOf(older, name);
    const is = stateOf(newer, name);
    if (was !== null && is !== null) return was.passed === is.passed ? [] : [{ name, change: 'flipped', old: was, new: is }];
    return [{ name, change: was === null ? 'added' : 'removed', old: was, new: is }];
  });
}

const placeOf = (block: CalcBlock): BlockPlace => ({
  position: block.index + 1,
  fenceLine: block.fenceLine,
  options: [...(block.options.hideCode ? ['hide-code'] : []), ...(block.options.noRun ? ['no-run'] : [])],
});

const sameOptions = (older: CalcBlock, newer: CalcBlock) =>
  older.options.hideCode === newer.options.hideCode && older.options.noRun === newer.options.noRun;

function codeHunks(older: string, newer: string): CodeHunk[] {
  return structuredPatch('old', 'new', older, newer, undefined, undefined, { context: CONTEXT_LINES }).hunks.map((hunk) => ({
    oldStart: hunk.oldStart,
    oldLines: hunk.oldLines,
    newStart: hunk.newStart,
    newLines: hunk.newLines,
    lines: hunk.lines,
  }));
}

/**
 * Blocks are matched by their code in order (a longest common subsequence of the two lists): blocks alike on both sides
 * are unchanged unless their options changed; where some old blocks gave way to new ones, they pair up in turn as changed,
 * and the rest are removed or added.
 */
function blockChanges(older: readonly CalcBlock[], newer: readonly CalcBlock[]): BlockChange[] {
  const changes: BlockChange[] = [];
  let oldAt = 0;
  let newAt = 0;
  let removed: CalcBlock[] = [];
  const flush = (added: CalcBlock[]) => {
    const paired = Math.min(removed.length, added.length);
    for (let index = 0; index < paired; index += 1) {
      const was = removed[index]!;
      const is = added[index]!;
      changes.push({ change: 'changed', old: placeOf(was), new: placeOf(is), hunks: codeHunks(was.code, is.code) });
    }
    for (const was of removed.slice(paired)) changes.push({ change: 'removed', old: placeOf(was), new: null, hunks: codeHunks(was.code, '') });
    for (const is of added.slice(paired)) changes.push({ change: 'added', old: null, new: placeOf(is), hunks: codeHunks('', is.code) });
    removed = [];
  };
  const parts = diffArrays(
    older.map((block) => block.code),
    newer.map((block) => block.code),
  );
  for (const part of parts) {
    if (part.removed) {
      removed = older.slice(oldAt, oldAt + part.count);
      oldAt += part.count;
    } else if (part.added) {
      flush(newer.slice(newAt, newAt + part.count));
      newAt += part.count;
    } else {
      flush([]);
      // Alike in code; a block whose options changed (now hidden, or no longer run) is still a change.
      for (let index = 0; index < part.count; index += 1) {
        const was = older[oldAt + index]!;
        const is = newer[newAt + index]!;
        if (!sameOptions(was, is)) changes.push({ change: 'changed', old: placeOf(was), new: placeOf(is), hunks: [] });
      }
      oldAt += part.count;
      newAt += part.count;
    }
  }
  flush([]);
  return changes;
}
