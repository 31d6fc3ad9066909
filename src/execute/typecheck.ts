// Type-checks all calculation blocks together against the block API, with every error mapped to its study line.
import { dirname, join, resolve, sep } from 'node:path';
import type ts from 'typescript';
import { type Diagnostic, StudyFailure } from '../diagnostics/diagnostic.ts';
import type { Study } from '../study/model.ts';
import { BLOCK_API_DECLARATIONS, KVARBOOK_ROOT, installedPath, partModule } from '../installation.ts';
import { type WorkerLimits, WorkerLimitError, openLimitedWorker } from './limitedWorker.ts';
import { HOST_STAGE_LIMITS } from './limits.ts';
import { sha256Hex } from '../seal/digest.ts';

/** What the type check reads of a study: plain data, so that it can be handed to the worker that runs the compiler. */
export type CheckedStudy = Pick<Study, 'file' | 'source' | 'inputs' | 'blocks' | 'inlines'>;

/** Outcomes of earlier checks, by a key that names exactly what was checked; kept by the edge. */
export interface TypecheckCache {
  read(studyKey: string): Diagnostic[] | undefined;
  write(studyKey: string, diagnostics: Diagnostic[]): void;
}

/**
 * What the check sees of a study, hashed: the same key means the same check, whose outcome can be reused. The file's
 * name is not part of it (a checker re-runs a sealed study from a scratch folder); a reused problem is placed in this file.
 */
export function checkedStudyKey(study: CheckedStudy): string {
  // Inputs and inline values carry their location, file name included: the name is left out wherever it is.
  return sha256Hex(JSON.stringify([study.source, study.inputs, study.blocks, study.inlines], (key, value) => (key === 'file' ? undefined : value)));
}

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

/** The block API's flat declarations, built from blockGlobals.d.ts by scripts/build.ts: the only file of kvarbook the check reads. */
const DECLARATIONS = installedPath(BLOCK_API_DECLARATIONS);

/** The block API's globals from the flat declarations, and this study's inputs added to them. */
function preamble(study: CheckedStudy): string {
  const declarations = JSON.stringify(DECLARATIONS);
  const inputFields = study.inputs.map((input) => `    readonly ${input.name}: InputValue;`).join('\n');
  return [
    `/// <reference path=${declarations} />`,
    `import type { Api } from ${declarations};`,
    'type InputValue = Api.InputValue;',
    `declare global {\n  interface KvarbookStudyInputs {\n${inputFields}\n  }\n}`,
  ].join('\n');
}

/**
 * The compiler runs in a limited worker: a study's types can make it work for a long time (deeply recursive or
 * combinatorial types), and that work must end at a deadline and a heap limit without taking the host with it.
 */
export async function typecheckStudy(study: Study, limits: WorkerLimits = HOST_STAGE_LIMITS.typecheck, cache?: TypecheckCache): Promise<void> {
  const checked: CheckedStudy = { file: study.file, source: study.source, inputs: study.inputs, blocks: study.blocks, inlines: study.inlines };
  const key = cache ? checkedStudyKey(checked) : '';
  const known = cache?.read(key);
  if (known) {
    if (known.length > 0)
      throw new StudyFailure(known.map((problem) => (problem.at ? { ...problem, at: { ...problem.at, file: study.file } } : problem)));
    return;
  }
  const worker = openLimitedWorker(partModule('typecheckWorker'), 'typecheckDiagnostics', limits);
  let diagnostics: Diagnostic[];
  try {
    diagnostics = (await worker.call(checked)) as Diagnostic[];
  } catch (error) {
    if (!(error instanceof WorkerLimitError)) throw error;
    const { callSeconds, heapMb } = limits;
    const line = study.blocks[0]?.fenceLine ?? 1;
    throw new StudyFailure([
      {
        code: 'typecheck-limit',
        message: `the type check of the blocks ${error.message} (it may take ${callSeconds} s and ${heapMb} MB)`,
        at: { file: study.file, line },
        hint: 'look for types that expand without end (recursive or combinatorial types); --no-typecheck skips the step while drafting',
      },
    ]);
  } finally {
    await worker.close();
  }
  cache?.write(key, diagnostics);
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
}

/** Every type problem of the study's blocks and inline values, each at its study line; inline values are checked as expressions after the blocks they follow. */
export async function typecheckDiagnostics(study: CheckedStudy): Promise<Diagnostic[]> {
  // The compiler is large; load it only when a study is checked.
  const { default: typescript } = await import('typescript');
  const options = compilerOptions(typescript);
  const segments: Segment[] = [];
  const parts: string[] = [preamble(study)];
  let line = parts[0]!.split('\n').length;
  const runnable = study.blocks.filter((block) => !block.options.noRun);
  const inlinesAfter = new Map<number, CheckedStudy['inlines']>();
  for (const inline of study.inlines) {
    const group = inlinesAfter.get(inline.afterRunnableBlocks);
    if (group) group.push(inline);
    else inlinesAfter.set(inline.afterRunnableBlocks, [inline]);
  }
  const addInlines = (afterRunnableBlocks: number) => {
    for (const inline of inlinesAfter.get(afterRunnableBlocks) ?? []) {
      const prefix = 'void (';
      segments.push({
        virtualStart: line,
        lineCount: 1,
        studyLine: inline.at.line,
        studyColumn: (inline.at.column ?? 1) + 3,
        prefixLength: prefix.length,
      });
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

  const parsed = typescript.createSourceFile(VIRTUAL_FILE, text, options.target ?? typescript.ScriptTarget.ES2022, true);
  const studyAt = (position: ts.LineAndCharacter) => {
    const segment = segmentAt(segments, position.line);
    if (!segment) return undefined;
    const studyLine = segment.studyLine + (position.line - segment.virtualStart);
    const column =
      position.line === segment.virtualStart ? Math.max(1, segment.studyColumn + position.character - segment.prefixLength) : position.character + 1;
    return { line: studyLine, column };
  };
  // Before the compiler resolves anything: a study that names another file is refused, and no file is read.
  const refused = moduleRefusals(typescript, parsed, text, studyAt, study);
  if (refused.length > 0) return refused;

  const program = typescript.createProgram([VIRTUAL_FILE], options, confinedHost(typescript, options, parsed));
  const sourceFile = program.getSourceFile(VIRTUAL_FILE)!;
  const found = [...program.getSyntacticDiagnostics(sourceFile), ...program.getSemanticDiagnostics(sourceFile)];
  const diagnostics: Diagnostic[] = [];
  const seen = new Set<string>();
  for (const problem of found) {
    if (problem.start === undefined) continue;
    const position = sourceFile.getLineAndCharacterOfPosition(problem.start);
    const mapped = studyAt(position);
    if (!mapped) continue;
    const { line: studyLine, column } = mapped;
    const key = `${problem.code}:${position.line}:${position.character}`;
    if (seen.has(key)) continue;
    seen.add(key);
    diagnostics.push({
      code: `type-${problem.code}`,
      message: typescript.flattenDiagnosticMessageText(problem.messageText, '\n  '),
      at: { file: study.file, line: studyLine, column },
      hint: 'the block API and solver are typed; run with --no-typecheck to skip this step while drafting',
    });
  }
  return diagnostics;
}

/** The segment holding a line of the virtual file; segments are in line order, so a binary search finds it. */
function segmentAt(segments: readonly Segment[], line: number): Segment | undefined {
  let low = 0;
  let high = segments.length - 1;
  while (low <= high) {
    const middle = (low + high) >> 1;
    const segment = segments[middle]!;
    if (line < segment.virtualStart) high = middle - 1;
    else if (line >= segment.virtualStart + segment.lineCount) low = middle + 1;
    else return segment;
  }
  return undefined;
}

const MODULE_REFUSED_HINT =
  'a calculation block sees only the study and the block API: inputs, result, table, chart, solver.… and charts.… are globals, so nothing needs importing';

/** Every place in the study's code that would make the compiler look for another file: imports, import types, references. */
function moduleRefusals(
  typescript: typeof ts,
  sourceFile: ts.SourceFile,
  text: string,
  studyAt: (position: ts.LineAndCharacter) => { line: number; column: number } | undefined,
  study: CheckedStudy,
): Diagnostic[] {
  const refusals: Diagnostic[] = [];
  const refuse = (position: number, what: string) => {
    const at = studyAt(sourceFile.getLineAndCharacterOfPosition(position));
    if (!at) return;
    refusals.push({
      code: 'type-module-refused',
      message: `the type check refuses ${what}: it reads no file but the study and the block API's declarations`,
      at: { file: study.file, ...at },
      hint: MODULE_REFUSED_HINT,
    });
  };
  const named = (specifier: ts.Node | undefined) =>
    specifier && typescript.isStringLiteralLike(specifier) ? `the module ${JSON.stringify(specifier.text)}` : 'a module';
  const visit = (node: ts.Node): void => {
    if (typescript.isImportDeclaration(node) || typescript.isExportDeclaration(node)) {
      if (node.moduleSpecifier) refuse(node.getStart(sourceFile), named(node.moduleSpecifier));
    } else if (typescript.isImportEqualsDeclaration(node) && typescript.isExternalModuleReference(node.moduleReference)) {
      refuse(node.getStart(sourceFile), named(node.moduleReference.expression));
    } else if (typescript.isImportTypeNode(node)) {
      const literal = typescript.isLiteralTypeNode(node.argument) ? node.argument.literal : undefined;
      refuse(node.getStart(sourceFile), named(literal));
    } else if (typescript.isCallExpression(node) && node.expression.kind === typescript.SyntaxKind.ImportKeyword) {
      refuse(node.getStart(sourceFile), named(node.arguments[0]));
    } else if (typescript.isModuleDeclaration(node) && typescript.isStringLiteral(node.name)) {
      // An augmentation of a module by name makes the compiler resolve that name.
      refuse(node.getStart(sourceFile), named(node.name));
    }
    typescript.forEachChild(node, visit);
  };
  typescript.forEachChild(sourceFile, visit);
  // Triple-slash directives are comments to the parser; each one would name a file, a type package or a library.
  const lines = text.split('\n');
  lines.forEach((line, index) => {
    const directive = /^(\s*)\/\/\/\s*<(reference|amd-module|amd-dependency)\b/.exec(line);
    if (directive) refuse(sourceFile.getPositionOfLineAndCharacter(index, directive[1]!.length), `the directive "${line.trim()}"`);
  });
  return refusals.sort((a, b) => a.at!.line - b.at!.line || (a.at!.column ?? 0) - (b.at!.column ?? 0));
}

/**
 * A compiler host that sees only the study (in memory), TypeScript's own library files and the block API's flat
 * declarations: every other path on the checker's machine does not exist for it.
 */
function confinedHost(typescript: typeof ts, options: ts.CompilerOptions, studyFile: ts.SourceFile): ts.CompilerHost {
  const host = typescript.createCompilerHost(options, true);
  const libraryFolder = resolve(dirname(typescript.getDefaultLibFilePath(options))) + sep;
  const declarations = resolve(DECLARATIONS);
  const declarationsFolder = dirname(declarations) + sep;
  const visible = (fileName: string): boolean => {
    const path = resolve(fileName);
    return path === VIRTUAL_FILE || path === declarations || path.startsWith(libraryFolder);
  };
  const folderVisible = (folder: string): boolean => {
    const path = resolve(folder) + sep;
    return [libraryFolder, declarationsFolder].some((allowed) => path.startsWith(allowed) || allowed.startsWith(path));
  };
  const { readFile, fileExists, getSourceFile, directoryExists, getDirectories, realpath } = host;
  host.readFile = (fileName) => (resolve(fileName) === VIRTUAL_FILE ? studyFile.text : visible(fileName) ? readFile.call(host, fileName) : undefined);
  host.fileExists = (fileName) => visible(fileName) && (resolve(fileName) === VIRTUAL_FILE || fileExists.call(host, fileName));
  host.getSourceFile = (fileName, languageVersion, onError, shouldCreate) => {
    if (resolve(fileName) === VIRTUAL_FILE) return studyFile;
    return visible(fileName) ? getSourceFile.call(host, fileName, languageVersion, onError, shouldCreate) : undefined;
  };
  host.directoryExists = (folder) => folderVisible(folder) && (directoryExists?.call(host, folder) ?? true);
  host.getDirectories = (folder) => (folderVisible(folder) ? (getDirectories?.call(host, folder) ?? []) : []);
  // Following a link could lead out of the visible folders; paths are taken as they are.
  host.realpath = (path) => (visible(path) && realpath ? realpath.call(host, path) : path);
  return host;
}
