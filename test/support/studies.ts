// Building small studies for tests and running them through the whole pipeline.
import type { Diagnostic } from '../../src/diagnostics/diagnostic.ts';
import { StudyFailure } from '../../src/diagnostics/diagnostic.ts';
import { runStudy, type RunProduct } from '../../src/pipeline.ts';
import type { InputOverride } from '../../src/study/inputs.ts';
import { reportStylesheet } from '../../src/cli/environment.ts';

export const TEST_ENVIRONMENT = { kvarbookVersion: '0.0.0-test', nodeVersion: 'v20-test', lockfileSha256: '0'.repeat(64) };
/** The installation's report stylesheet, as the edge reads it for a run. */
export const TEST_STYLESHEET = reportStylesheet();

export interface StudyParts {
  /** Extra front-matter lines (YAML), added after the required keys. */
  frontMatter?: string;
  /** The `inputs:` section body, indented two spaces per entry. */
  inputs?: string;
  body: string;
}

export function studyText(parts: StudyParts): string {
  return [
    '---',
    'title: Test study',
    'project: Test project',
    'id: TEST-1',
    'revision: 1',
    'date: 2026-11-20',
    'engineer: { name: Test Engineer, licence: T-0, jurisdiction: Testland }',
    ...(parts.frontMatter ? [parts.frontMatter] : []),
    ...(parts.inputs ? ['inputs:', parts.inputs] : []),
    '---',
    parts.body,
  ].join('\n');
}

/** The study line on which `needle` first appears (1-based), so tests do not hard-code line numbers. */
export function lineOf(source: string, needle: string): number {
  const index = source.split('\n').findIndex((line) => line.includes(needle));
  if (index < 0) throw new Error(`"${needle}" is not in the study`);
  return index + 1;
}

export function runSource(
  source: string,
  options: { overrides?: InputOverride[]; typecheck?: boolean; file?: string; sensitivity?: boolean } = {},
): Promise<RunProduct> {
  return runStudy({
    file: options.file ?? 'test.study.md',
    source,
    overrides: options.overrides ?? [],
    typecheck: options.typecheck ?? false,
    ...(options.sensitivity ? { sensitivity: true } : {}),
    environment: TEST_ENVIRONMENT,
    stylesheet: TEST_STYLESHEET,
  });
}

/** The diagnostics a failing run produced; fails the test if the run succeeded or threw something else. */
export async function diagnosticsOf(run: Promise<unknown> | (() => unknown)): Promise<readonly Diagnostic[]> {
  try {
    await (typeof run === 'function' ? run() : run);
  } catch (error) {
    if (error instanceof StudyFailure) return error.diagnostics;
    throw error;
  }
  throw new Error('expected the study to fail, but it succeeded');
}
