// TypeScript blocks to scripts the child can run in one shared scope: esbuild strips types, acorn finds declarations.
import { transformSync, stop, type Message } from 'esbuild';
import { parse, type Node as AcornNode, type Pattern, type Program } from 'acorn';
import { TraceMap, originalPositionFor } from '@jridgewell/trace-mapping';
import { type Diagnostic, StudyFailure } from '../diagnostics/diagnostic.ts';
import type { DiagnosticCode } from '../diagnostics/codes.ts';
import type { CalcBlock, InlineExpression, Study } from '../study/model.ts';
import type { Declaration, DeclarationKind } from './protocol.ts';

/** Names the block API owns; a block declaring one would hide it from every later block. */
const RESERVED_NAMES = ['inputs', 'result', 'criterion', 'caution', 'table', 'caseTable', 'chart', 'figure', 'solver', 'charts', 'console'] as const;

export interface TranspiledBlock {
  blockIndex: number;
  script: string;
  declarations: Declaration[];
  /** Maps positions in esbuild's output back to the block's TypeScript. */
  traceMap: TraceMap;
  /** The edits between esbuild's output and `script` by script line, in column order, undone before the source map is consulted. */
  shifts: Map<number, ColumnShift[]>;
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
          hint: 'choose another name',
        });
      } else if (earlier && earlier !== block) {
        diagnostics.push({
          code: 'block-redeclared',
          message: `"${declaration.name}" is declared again; it was declared in the block at line ${earlier.fenceLine}`,
          at: { file: study.file, line: block.fenceLine },
          hint: 'blocks share one scope: give the new value its own name',
        });
      } else firstDeclaredAt.set(declaration.name, block);
    }
    out.push(transpiled);
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
  return out;
}

function esbuildDiagnostics(study: Study, firstLine: number, messages: Message[], code: DiagnosticCode): Diagnostic[] {
  return messages.map((message) => {
    const line = (message.location?.line ?? 1) + firstLine - 1;
    const column = (message.location?.column ?? 0) + 1;
    return {
      code,
      message: message.text,
      at: { file: study.file, line, column },
      hint: 'calculation blocks are TypeScript; check the syntax near the caret',
    };
  });
}

function transpileOne(study: Study, block: CalcBlock, diagnostics: Diagnostic[]): TranspiledBlock | undefined {
  let code: string;
  let map: string;
  try {
    const result = transformSync(block.code, {
      loader: 'ts',
      target: 'es2022',
      sourcemap: 'external',
      sourcefile: `block-${block.index}.ts`,
      supported: { 'top-level-await': true },
    });
    code = result.code;
    map = result.map;
  } catch (error) {
    diagnostics.push(...esbuildDiagnostics(study, block.firstCodeLine, (error as { errors?: Message[] }).errors ?? [], 'block-syntax'));
    return undefined;
  }
  let program: Program;
  try {
    program = parse(code, { ecmaVersion: 'latest', sourceType: 'module', allowAwaitOutsideFunction: true });
  } catch (error) {
    diagnostics.push({
      code: 'block-syntax',
      message: (error as Error).message,
      at: { file: study.file, line: block.fenceLine },
      hint: 'check the block syntax',
    });
    return undefined;
  }
  const traceMap = new TraceMap(map);
  const rewritten = rewriteTopLevel(program, code, (node, message, hint) => {
    // Positions only for the rare refusal: acorn's own line tracking would cost every block a third more.
    const start = lineAndColumn(lineStarts(code), node.start);
    const original = originalPositionFor(traceMap, { line: start.line, column: start.column });
    const line = (original.line ?? start.line) + block.firstCodeLine - 1;
    const column = (original.column ?? 0) + 1;
    diagnostics.push({
      code: 'block-module-syntax',
      message,
      at: { file: study.file, line, column },
      hint,
    });
  });
  if (!rewritten) return undefined;
  return {
    blockIndex: block.index,
    script: WRAPPER_START + rewritten.code + WRAPPER_END,
    declarations: rewritten.declarations,
    traceMap,
    shifts: rewritten.shifts,
    block,
  };
}

type Complaint = (node: AcornNode, message: string, hint: string) => void;

/** An edit made to one line of esbuild's output: from `column` on, the script is `delta` characters longer. */
interface ColumnShift {
  line: number;
  column: number;
  delta: number;
}

/** Offsets where each line of `code` starts, so that any offset finds its line by binary search. */
function lineStarts(code: string): number[] {
  const starts = [0];
  for (let index = code.indexOf('\n'); index >= 0; index = code.indexOf('\n', index + 1)) starts.push(index + 1);
  return starts;
}

function lineAndColumn(starts: readonly number[], offset: number): { line: number; column: number } {
  let low = 0;
  let high = starts.length - 1;
  while (low < high) {
    const middle = (low + high + 1) >> 1;
    if (starts[middle]! <= offset) low = middle;
    else high = middle - 1;
  }
  return { line: low + 1, column: offset - starts[low]! };
}

/**
 * Top-level declarations become assignments to the shared scope so that later blocks see them,
 * while the block itself runs inside an async function so that top-level await works.
 */
function rewriteTopLevel(
  program: Program,
  code: string,
  complain: Complaint,
): { code: string; declarations: Declaration[]; shifts: Map<number, ColumnShift[]> } | undefined {
  const declarations: Declaration[] = [];
  const edits: { start: number; end: number; text: string }[] = [];
  const exported: string[] = [];
  let ok = true;
  for (const statement of program.body) {
    switch (statement.type) {
      case 'ImportDeclaration':
        complain(
          statement,
          'a calculation block cannot import modules',
          'the solver, charts and the block API are already available as globals (solver.…, charts.…, result, table, …)',
        );
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
  // One pass from the front, in the order the edits were made; at one offset an insertion made first stays first (`x = undefined);`).
  const ordered = edits.map((edit, order) => ({ ...edit, order })).sort((a, b) => a.start - b.start || a.order - b.order);
  const pieces: string[] = [];
  let cursor = 0;
  for (const edit of ordered) {
    pieces.push(code.slice(cursor, edit.start), edit.text);
    cursor = edit.end;
  }
  pieces.push(code.slice(cursor));
  // Function declarations are hoisted inside the wrapper; publish them to the shared scope before anything runs.
  const publish = exported.map((name) => `globalThis[${JSON.stringify(name)}] = ${name};`).join(' ');
  const shifts = new Map<number, ColumnShift[]>([[1, [{ line: 1, column: 0, delta: WRAPPER_START.length + publish.length }]]]);
  const starts = lineStarts(code);
  for (const edit of ordered) {
    const { line, column } = lineAndColumn(starts, edit.start);
    const onLine = shifts.get(line) ?? [];
    onLine.push({ line, column, delta: edit.text.length - (edit.end - edit.start) });
    shifts.set(line, onLine);
  }
  // Columns ascend within a line already (edits are in offset order), except for the wrapper's shift at column 0, which comes first.
  return { code: publish + pieces.join(''), declarations, shifts };
}

function patternNames(pattern: Pattern): string[] {
  switch (pattern.type) {
    case 'Identifier':
      return [pattern.name];
    case 'ObjectPattern':
      return pattern.properties.flatMap((property) =>
        property.type === 'RestElement' ? patternNames(property.argument) : patternNames(property.value),
      );
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

const INLINE_NAME = '__kvarbookInline';

/**
 * All inline values are stripped of their types in one esbuild call (one call each would cost a round trip per
 * value): each becomes `__kvarbookInlineN = (expression);` on lines of its own, and acorn reads the JavaScript of
 * each back out of esbuild's output. A text that is not exactly one expression is refused.
 */
export function transpileInlines(study: Study): TranspiledInline[] {
  if (study.inlines.length === 0) return [];
  const startLines: number[] = [];
  let line = 1;
  const combined = study.inlines
    .map((inline, index) => {
      startLines.push(line);
      line += inline.expression.split('\n').length + 1;
      return `${INLINE_NAME}${index} = (${inline.expression}\n);`;
    })
    .join('\n');
  let code: string;
  try {
    code = transformSync(combined, { loader: 'ts', target: 'es2022' }).code;
  } catch (error) {
    const errors = (error as { errors?: Message[] }).errors ?? [];
    const failing = new Set(errors.map((message) => inlineAtLine(startLines, message.location?.line ?? 1)));
    throw new StudyFailure(
      [...failing].map((index) =>
        inlineSyntax(study.inlines[index]!, errors.find((message) => inlineAtLine(startLines, message.location?.line ?? 1) === index)?.text),
      ),
    );
  }
  const statements = parse(code, { ecmaVersion: 'latest', sourceType: 'module', allowAwaitOutsideFunction: true }).body;
  // Each inline value must be exactly one statement; extra statements mean that a text closed its parenthesis and
  // went on (`x); other(`), and they count against the value they follow.
  const scripts = new Map<number, string>();
  const statementCounts = new Map<number, number>();
  let current: number | undefined;
  for (const statement of statements) {
    const index = assignedInline(statement);
    if (index !== undefined && !scripts.has(index)) {
      const right = (statement as unknown as { expression: { right: AcornNode } }).expression.right;
      scripts.set(index, code.slice(right.start, right.end));
      current = index;
    }
    const owner = current ?? 0;
    statementCounts.set(owner, (statementCounts.get(owner) ?? 0) + 1);
  }
  const diagnostics: Diagnostic[] = [];
  const out: TranspiledInline[] = [];
  study.inlines.forEach((inline, index) => {
    const script = scripts.get(index);
    if (script === undefined || statementCounts.get(index) !== 1) diagnostics.push(inlineSyntax(inline, 'it is not a single expression'));
    else out.push({ inlineId: inline.id, script: `(async function () { "use strict"; return ${script}; })()`, inline });
  });
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
  return out;
}

/** Which inline value a line of the combined text belongs to. */
function inlineAtLine(startLines: readonly number[], line: number): number {
  let low = 0;
  let high = startLines.length - 1;
  while (low < high) {
    const middle = (low + high + 1) >> 1;
    if (startLines[middle]! <= line) low = middle;
    else high = middle - 1;
  }
  return low;
}

function assignedInline(statement: AcornNode): number | undefined {
  const expression = (statement as { expression?: { type: string; operator?: string; left?: { type: string; name?: string } } }).expression;
  if (statement.type !== 'ExpressionStatement' || expression?.type !== 'AssignmentExpression' || expression.operator !== '=') return undefined;
  const name = expression.left?.type === 'Identifier' ? expression.left.name : undefined;
  return name?.startsWith(INLINE_NAME) ? Number(name.slice(INLINE_NAME.length)) : undefined;
}

function inlineSyntax(inline: InlineExpression, detail: string | undefined): Diagnostic {
  return {
    code: 'inline-syntax',
    message: `the inline value {{ ${inline.expression} }} is not an expression${detail ? `: ${detail}` : ''}`,
    at: inline.at,
    hint: 'write a single expression between the braces, e.g. {{ chargingMvar }}',
  };
}

/** A position in a transpiled block's script, as a study line and column. */
export function studyPositionOf(block: TranspiledBlock, scriptLine: number, scriptColumn: number): { line: number; column: number } {
  let column0 = scriptColumn - 1;
  const lineShifts = block.shifts.get(scriptLine) ?? [];
  let applied = 0;
  for (const shift of lineShifts) {
    if (column0 - applied - shift.delta >= shift.column) applied += shift.delta;
  }
  column0 = Math.max(0, column0 - applied);
  const original = originalPositionFor(block.traceMap, { line: scriptLine, column: column0 });
  if (original.line === null) return { line: block.block.firstCodeLine + Math.max(0, scriptLine - 1), column: 1 };
  return { line: original.line + block.block.firstCodeLine - 1, column: (original.column ?? 0) + 1 };
}

/** esbuild's synchronous calls keep a worker and its service process (about 100 MB) until stopped; a run stops them once it has transpiled. */
export function releaseTranspiler(): void {
  void stop();
}
