// Type-checks all calculation blocks together against the block API, with every error mapped to its study line.
import { join } from 'node:path';
import type ts from 'typescript';
import { type Diagnostic, StudyFailure, excerptAround } from '../diagnostics/diagnostic.ts';
import type { Study } from '../study/model.ts';
import { KVARBOOK_ROOT } from './childBundle.ts';

const VIRTUAL_FILE = join(KVARBOOK_ROOT, '.kvarbook-study-check.ts');

interface Segment {
  /** 0-based line of the virtual file where the code starts. */
  virtualStart: number;
  lineCount: number;
  /** Study line and column of the segment's first character. */
  studyLine: number;
  studyColumn: number;
  /** Characters the virtual text adds before the study text on the first line. */
  prefixLength: number;
}

function compilerOptions(typescript: typeof ts): ts.CompilerOptions {
  return {
    target: typescript.ScriptTarget.ES2022,
    module: typescript.ModuleKind.ESNext,
    moduleResolution: typescript.ModuleResolutionKind.Bundler,
    lib: ['lib.es2022.d.ts'],
    types: [],
    strict: true,
    noEmit: true,
    skipLibCheck: true,
    allowImportingTsExtensions: true,
    noUnusedLocals: false,
  };
}

/** The block API's globals from blockGlobals.d.ts, and this study's inputs added to them. */
function preamble(study: Study): string {
  const globals = JSON.stringify(join(KVARBOOK_ROOT, 'src/execute/blockGlobals.d.ts'));
  const api = JSON.stringify(join(KVARBOOK_ROOT, 'src/execute/child/blockApi.ts'));
  const inputFields = study.inputs.map((input) => `    readonly ${input.name}: InputValue;`).join('\n');
  return [
    `/// <reference path=${globals} />`,
    `import type { InputValue } from ${api};`,
    `declare global {\n  interface KvarbookStudyInputs {\n${inputFields}\n  }\n}`,
  ].join('\n');
}

/** Inline values are checked too, each as an expression after the blocks it follows. */
export async function typecheckStudy(study: Study): Promise<void> {
  // The compiler is large; load it only when a study is checked.
  const { default: typescript } = await import('typescript');
  const options = compilerOptions(typescript);
  const segments: Segment[] = [];
  const parts: string[] = [preamble(study)];
  let line = parts[0]!.split('\n').length;
  const runnable = study.blocks.filter((block) => !block.options.noRun);
  const addInlines = (afterRunnableBlocks: number) => {
    for (const inline of study.inlines.filter((candidate) => candidate.afterRunnableBlocks === afterRunnableBlocks)) {
      const prefix = 'void (';
      segments.push({ virtualStart: line, lineCount: 1, studyLine: inline.at.line, studyColumn: (inline.at.column ?? 1) + 3, prefixLength: prefix.length });
      parts.push(`${prefix}${inline.expression.replace(/\n/g, ' ')});`);
      line += 1;
    }
  };
  addInlines(0);
  for (const [position, block] of runnable.entries()) {
    const code = block.code.endsWith('\n') ? block.code : `${block.code}\n`;
    parts.push(`// block at study line ${block.fenceLine}`);
    line += 1;
    const lineCount = code.split('\n').length - 1;
    segments.push({ virtualStart: line, lineCount, studyLine: block.firstCodeLine, studyColumn: 1, prefixLength: 0 });
    parts.push(code.slice(0, -1));
    line += lineCount;
    addInlines(position + 1);
  }
  parts.push('export {};');
  const text = parts.join('\n');

  const host = typescript.createCompilerHost(options, true);
  const readFile = host.readFile.bind(host);
  const getSourceFile = host.getSourceFile.bind(host);
  host.readFile = (fileName) => (fileName === VIRTUAL_FILE ? text : readFile(fileName));
  host.fileExists = ((original) => (fileName: string) => fileName === VIRTUAL_FILE || original(fileName))(host.fileExists.bind(host));
  host.getSourceFile = (fileName, languageVersion, onError, shouldCreate) =>
    fileName === VIRTUAL_FILE ? typescript.createSourceFile(fileName, text, languageVersion, true) : getSourceFile(fileName, languageVersion, onError, shouldCreate);
  const program = typescript.createProgram([VIRTUAL_FILE], options, host);
  const sourceFile = program.getSourceFile(VIRTUAL_FILE)!;
  const found = [...program.getSyntacticDiagnostics(sourceFile), ...program.getSemanticDiagnostics(sourceFile)];
  const diagnostics: Diagnostic[] = [];
  const seen = new Set<string>();
  for (const problem of found) {
    if (problem.start === undefined) continue;
    const position = sourceFile.getLineAndCharacterOfPosition(problem.start);
    const segment = segments.find((candidate) => position.line >= candidate.virtualStart && position.line < candidate.virtualStart + candidate.lineCount);
    if (!segment) continue;
    const studyLine = segment.studyLine + (position.line - segment.virtualStart);
    const key = `${problem.code}:${position.line}:${position.character}`;
    if (seen.has(key)) continue;
    seen.add(key);
    const column = position.line === segment.virtualStart ? Math.max(1, segment.studyColumn + position.character - segment.prefixLength) : position.character + 1;
    diagnostics.push({
      code: `type-${problem.code}`,
      message: typescript.flattenDiagnosticMessageText(problem.messageText, '\n  '),
      at: { file: study.file, line: studyLine, column },
      excerpt: excerptAround(study.source, studyLine, column),
      hint: 'the block API and solver are typed; run with --no-typecheck to skip this step while drafting',
    });
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
}
