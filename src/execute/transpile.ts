// TypeScript blocks to scripts the child can run in one shared scope: esbuild strips types, acorn finds declarations.
import { transformSync, type Message } from 'esbuild';
import { parse, type Node as AcornNode, type Pattern, type Program } from 'acorn';
import { TraceMap, originalPositionFor } from '@jridgewell/trace-mapping';
import { type Diagnostic, StudyFailure, excerptAround } from '../diagnostics/diagnostic.ts';
import type { CalcBlock, InlineExpression, Study } from '../study/model.ts';
import type { Declaration, DeclarationKind } from './protocol.ts';

/** Names the block API owns; a block declaring one would hide it from every later block. */
export const RESERVED_NAMES = ['inputs', 'result', 'criterion', 'caution', 'table', 'chart', 'figure', 'solver', 'charts', 'console'] as const;

export interface TranspiledBlock {
  blockIndex: number;
  script: string;
  declarations: Declaration[];
  /** Maps positions in esbuild's output back to the block's TypeScript. */
  traceMap: TraceMap;
  /** The edits between esbuild's output and `script`, undone before the source map is consulted. */
  shifts: ColumnShift[];
  block: CalcBlock;
}

export interface TranspiledInline {
  inlineId: number;
  script: string;
  inline: InlineExpression;
}

const WRAPPER_START = '(async function () { "use strict"; ';
const WRAPPER_END = '\n})()';

export function transpileBlocks(study: Study): TranspiledBlock[] {
  const diagnostics: Diagnostic[] = [];
  const firstDeclaredAt = new Map<string, CalcBlock>();
  const out: TranspiledBlock[] = [];
  for (const block of study.blocks) {
    if (block.options.noRun) continue;
    const transpiled = transpileOne(study, block, diagnostics);
    if (!transpiled) continue;
    for (const declaration of transpiled.declarations) {
      const earlier = firstDeclaredAt.get(declaration.name);
      if ((RESERVED_NAMES as readonly string[]).includes(declaration.name)) {
        diagnostics.push({
          code: 'block-reserved-name',
          message: `the block declares "${declaration.name}", a name the block API owns`,
          at: { file: study.file, line: block.fenceLine },
          excerpt: excerptAround(study.source, block.fenceLine),
          hint: 'choose another name',
        });
      } else if (earlier && earlier !== block) {
        diagnostics.push({
          code: 'block-redeclared',
          message: `"${declaration.name}" is declared again; it was declared in the block at line ${earlier.fenceLine}`,
          at: { file: study.file, line: block.fenceLine },
          excerpt: excerptAround(study.source, block.fenceLine),
          hint: 'blocks share one scope: give the new value its own name',
        });
      } else firstDeclaredAt.set(declaration.name, block);
    }
    out.push(transpiled);
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
  return out;
}

function esbuildDiagnostics(study: Study, firstLine: number, messages: Message[], code: string): Diagnostic[] {
  return messages.map((message) => {
    const line = (message.location?.line ?? 1) + firstLine - 1;
    const column = (message.location?.column ?? 0) + 1;
    return {
      code,
      message: message.text,
      at: { file: study.file, line, column },
      excerpt: excerptAround(study.source, line, column),
      hint: 'calculation blocks are TypeScript; check the syntax near the caret',
    };
  });
}

function transpileOne(study: Study, block: CalcBlock, diagnostics: Diagnostic[]): TranspiledBlock | undefined {
  let code: string;
  let map: string;
  try {
    const result = transformSync(block.code, { loader: 'ts', target: 'es2022', sourcemap: 'external', sourcefile: `block-${block.index}.ts`, supported: { 'top-level-await': true } });
    code = result.code;
    map = result.map;
  } catch (error) {
    diagnostics.push(...esbuildDiagnostics(study, block.firstCodeLine, (error as { errors?: Message[] }).errors ?? [], 'block-syntax'));
    return undefined;
  }
  let program: Program;
  try {
    program = parse(code, { ecmaVersion: 'latest', sourceType: 'module', allowAwaitOutsideFunction: true, locations: true });
  } catch (error) {
    diagnostics.push({ code: 'block-syntax', message: (error as Error).message, at: { file: study.file, line: block.fenceLine }, hint: 'check the block syntax' });
    return undefined;
  }
  const traceMap = new TraceMap(map);
  const rewritten = rewriteTopLevel(program, code, (node, message, hint) => {
    const original = originalPositionFor(traceMap, { line: node.loc!.start.line, column: node.loc!.start.column });
    const line = (original.line ?? node.loc!.start.line) + block.firstCodeLine - 1;
    const column = (original.column ?? 0) + 1;
    diagnostics.push({ code: 'block-module-syntax', message, at: { file: study.file, line, column }, excerpt: excerptAround(study.source, line, column), hint });
  });
  if (!rewritten) return undefined;
  return { blockIndex: block.index, script: WRAPPER_START + rewritten.code + WRAPPER_END, declarations: rewritten.declarations, traceMap, shifts: rewritten.shifts, block };
}

type Complaint = (node: AcornNode, message: string, hint: string) => void;

/** An edit made to one line of esbuild's output: from `column` on, the script is `delta` characters longer. */
interface ColumnShift {
  line: number;
  column: number;
  delta: number;
}

function lineAndColumn(code: string, offset: number): { line: number; column: number } {
  const before = code.slice(0, offset);
  const line = before.split('\n').length;
  return { line, column: offset - (before.lastIndexOf('\n') + 1) };
}

/**
 * Top-level declarations become assignments to the shared scope so that later blocks see them,
 * while the block itself runs inside an async function so that top-level await works.
 */
function rewriteTopLevel(
  program: Program,
  code: string,
  complain: Complaint,
): { code: string; declarations: Declaration[]; shifts: ColumnShift[] } | undefined {
  const declarations: Declaration[] = [];
  const edits: { start: number; end: number; text: string }[] = [];
  const exported: string[] = [];
  let ok = true;
  for (const statement of program.body) {
    switch (statement.type) {
      case 'ImportDeclaration':
        complain(statement, 'a calculation block cannot import modules', 'the solver, charts and the block API are already available as globals (solver.…, charts.…, result, table, …)');
        ok = false;
        break;
      case 'ExportNamedDeclaration':
      case 'ExportDefaultDeclaration':
      case 'ExportAllDeclaration':
        complain(statement, 'a calculation block cannot export', 'names declared at the top of a block are visible to every later block already');
        ok = false;
        break;
      case 'VariableDeclaration': {
        const kind = statement.kind === 'using' || statement.kind === 'await using' ? 'const' : (statement.kind as DeclarationKind);
        const first = statement.declarations[0];
        if (!first) break;
        // Keep the text between declarators as it is, so lines (and most columns) stay where the source map says.
        edits.push({ start: statement.start, end: first.start, text: '(' });
        for (const declarator of statement.declarations) {
          for (const name of patternNames(declarator.id)) declarations.push({ name, kind });
          if (!declarator.init) edits.push({ start: declarator.id.end, end: declarator.id.end, text: ' = undefined' });
        }
        const hasSemicolon = code[statement.end - 1] === ';';
        edits.push({ start: hasSemicolon ? statement.end - 1 : statement.end, end: statement.end, text: ');' });
        break;
      }
      case 'FunctionDeclaration':
        if (statement.id) {
          declarations.push({ name: statement.id.name, kind: 'function' });
          exported.push(statement.id.name);
        }
        break;
      case 'ClassDeclaration':
        if (statement.id) {
          declarations.push({ name: statement.id.name, kind: 'class' });
          edits.push({ start: statement.start, end: statement.start, text: `${statement.id.name} = ` });
          edits.push({ start: statement.end, end: statement.end, text: ';' });
        }
        break;
      default:
        break;
    }
  }
  if (!ok) return undefined;
  let rewritten = code;
  // From the back; at one offset the replacement goes first so that an insertion there ends up before it (`x = undefined);`).
  for (const edit of [...edits].sort((a, b) => b.start - a.start || b.end - a.end)) {
    rewritten = rewritten.slice(0, edit.start) + edit.text + rewritten.slice(edit.end);
  }
  // Function declarations are hoisted inside the wrapper; publish them to the shared scope before anything runs.
  const publish = exported.map((name) => `globalThis[${JSON.stringify(name)}] = ${name};`).join(' ');
  const shifts: ColumnShift[] = [{ line: 1, column: 0, delta: WRAPPER_START.length + publish.length }];
  for (const edit of edits) {
    const { line, column } = lineAndColumn(code, edit.start);
    shifts.push({ line, column, delta: edit.text.length - (edit.end - edit.start) });
  }
  return { code: publish + rewritten, declarations, shifts };
}

function patternNames(pattern: Pattern): string[] {
  switch (pattern.type) {
    case 'Identifier':
      return [pattern.name];
    case 'ObjectPattern':
      return pattern.properties.flatMap((property) => (property.type === 'RestElement' ? patternNames(property.argument) : patternNames(property.value)));
    case 'ArrayPattern':
      return pattern.elements.flatMap((element) => (element ? patternNames(element) : []));
    case 'RestElement':
      return patternNames(pattern.argument);
    case 'AssignmentPattern':
      return patternNames(pattern.left);
    default:
      return [];
  }
}

export function transpileInlines(study: Study): TranspiledInline[] {
  const diagnostics: Diagnostic[] = [];
  const out: TranspiledInline[] = [];
  for (const inline of study.inlines) {
    try {
      const { code } = transformSync(`(${inline.expression})`, { loader: 'ts', target: 'es2022' });
      const expression = code.trim().replace(/;$/, '');
      out.push({ inlineId: inline.id, script: `(async function () { "use strict"; return ${expression}; })()`, inline });
    } catch (error) {
      const first = (error as { errors?: Message[] }).errors?.[0];
      diagnostics.push({
        code: 'inline-syntax',
        message: `the inline value {{ ${inline.expression} }} is not an expression${first ? `: ${first.text}` : ''}`,
        at: inline.at,
        excerpt: excerptAround(study.source, inline.at.line, inline.at.column),
        hint: 'write a single expression between the braces, e.g. {{ chargingMvar }}',
      });
    }
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
  return out;
}

/** A position in a transpiled block's script, as a study line and column. */
export function studyPositionOf(block: TranspiledBlock, scriptLine: number, scriptColumn: number): { line: number; column: number } {
  let column0 = scriptColumn - 1;
  const lineShifts = block.shifts.filter((shift) => shift.line === scriptLine).sort((a, b) => a.column - b.column);
  let applied = 0;
  for (const shift of lineShifts) {
    if (column0 - applied - shift.delta >= shift.column) applied += shift.delta;
  }
  column0 = Math.max(0, column0 - applied);
  const original = originalPositionFor(block.traceMap, { line: scriptLine, column: column0 });
  if (original.line === null) return { line: block.block.firstCodeLine + Math.max(0, scriptLine - 1), column: 1 };
  return { line: original.line + block.block.firstCodeLine - 1, column: (original.column ?? 0) + 1 };
}
