// Parse stage: study source text -> Study (front matter, inputs, calculation blocks, inline values), or located diagnostics.
import type { Token } from 'markdown-it';
import { LineCounter, parseDocument, isMap, isScalar, visit, type Document, type Pair } from 'yaml';
import { type Diagnostic, type SourceLocation, StudyFailure } from '../diagnostics/diagnostic.ts';
import { createMarkdown, INLINE_VALUE_TOKEN } from './markdown.ts';
import { readInputs } from './inputs.ts';
import { readMeta } from './meta.ts';
import { readSensitivity } from './sensitivity.ts';
import type { CalcBlock, InlineExpression, Study } from './model.ts';
import type { YamlPlace } from './yamlFields.ts';
import { sha256Hex } from '../seal/digest.ts';

const FENCE_LINE = /^---\s*$/;
/** The fence languages a calculation block is written in: an author who writes the name out means the same block. */
const CALC_LANGUAGES: readonly string[] = ['ts', 'typescript'];
const BLOCK_OPTION_WORDS = { 'hide-code': 'hideCode', 'no-run': 'noRun' } as const;

export function parseStudy(file: string, source: string): Study {
  const diagnostics: Diagnostic[] = [];
  const lines = source.split('\n');
  if (!FENCE_LINE.test(lines[0] ?? '')) {
    throw new StudyFailure([
      {
        code: 'front-matter-missing',
        message: 'the study must start with YAML front matter between two "---" lines',
        at: { file, line: 1, column: 1 },
        hint: 'begin the file with ---, the title, id, revision, date, engineer and inputs, then --- (see `kvarbook new blank`)',
      },
    ]);
  }
  const closing = lines.findIndex((line, index) => index > 0 && FENCE_LINE.test(line));
  if (closing < 0) {
    throw new StudyFailure([
      {
        code: 'front-matter-unclosed',
        message: 'the front matter is never closed with a "---" line',
        at: { file, line: 1, column: 1 },
        hint: 'add a line with only --- after the last front-matter key',
      },
    ]);
  }
  const yamlText = lines.slice(1, closing).join('\n');
  const yamlFirstLine = 2;
  const lineCounter = new LineCounter();
  const document = parseDocument(yamlText, { lineCounter, prettyErrors: false, uniqueKeys: true });
  const span = (from: number, to: number): SourceLocation => {
    const start = lineCounter.linePos(from);
    const end = lineCounter.linePos(to);
    return { file, line: start.line + yamlFirstLine - 1, column: start.col, endLine: end.line + yamlFirstLine - 1, endColumn: end.col };
  };
  const place: YamlPlace = {
    at(node, fallbackLine = yamlFirstLine) {
      const offset = node?.range?.[0];
      if (offset === undefined) return { file, line: fallbackLine };
      // The end of the node's value (not of a comment after it): a caret can span a scalar.
      return span(offset, node?.range?.[1] ?? offset);
    },
  };
  // The parser's later errors follow from its first (a missing quote also leaves a mapping unclosed): one mistake, one error.
  const [yamlError] = document.errors;
  if (yamlError) {
    const { line, col } = lineCounter.linePos(yamlError.pos[0]);
    throw new StudyFailure([
      {
        code: 'front-matter-yaml',
        message: `the front matter is not valid YAML: ${yamlError.message.split('\n')[0]}`,
        at: { file, line: line + yamlFirstLine - 1, column: col },
        hint: 'check indentation and quoting; a value with a colon needs quotes',
      },
    ]);
  }
  const commas = flowCommaProblems(document, yamlText, span);
  if (commas.length > 0) throw new StudyFailure(commas);
  if (!isMap(document.contents)) {
    throw new StudyFailure([
      {
        code: 'front-matter-shape',
        message: 'the front matter must be a YAML mapping of keys to values',
        at: { file, line: yamlFirstLine },
        hint: 'write one key per line, e.g. "title: Reactive compensation of ..."',
      },
    ]);
  }

  const meta = readMeta(document as Document.Parsed, place, diagnostics);
  const inputs = readInputs(document as Document.Parsed, place, diagnostics);
  const sensitivity = readSensitivity(document as Document.Parsed, place, diagnostics, inputs);

  const bodyFirstLine = closing + 2;
  const body = lines.slice(closing + 1).join('\n');
  const md = createMarkdown();
  const bodyTokens = md.parse(body, {});
  const { blocks, inlines } = collectBlocksAndInlines(file, lines, bodyTokens, bodyFirstLine, diagnostics);

  if (diagnostics.length > 0 || !meta) throw new StudyFailure(diagnostics);
  return {
    file,
    source,
    sourceSha256: sha256Hex(source),
    meta,
    inputs,
    ...(sensitivity ? { sensitivity } : {}),
    blocks,
    inlines,
    bodyTokens,
    bodyFirstLine,
  };
}

/**
 * In a `{ }` mapping a comma ends the value, so `{ value: 1,000 MW }` is valid YAML with a key "000 MW" and no value: the
 * study would fail on that key and on the value "1", far from the cause. A key without a value in a `{ }` mapping means
 * nothing in a study; each is reported once, as the comma it is, spanning the value as written.
 */
function flowCommaProblems(document: Document, yamlText: string, span: (from: number, to: number) => SourceLocation): Diagnostic[] {
  const problems: Diagnostic[] = [];
  visit(document, {
    Map(_, map) {
      if (!map.flow) return;
      const pairs = map.items as Pair[];
      const stray = (pair: Pair | undefined) => pair !== undefined && pair.value === null && isScalar(pair.key) && pair.key.range !== undefined;
      pairs.forEach((pair, index) => {
        // Several commas in one value ("1,000,000 MW") leave a run of stray keys: one problem, at the last.
        if (!stray(pair) || stray(pairs[index + 1]) || !isScalar(pair.key) || !pair.key.range) return;
        let first = index;
        while (stray(pairs[first - 1])) first -= 1;
        const previous = pairs[first - 1];
        // Where the value the comma cut short starts: the previous pair's value, else the stray key itself.
        const cut = previous && isScalar(previous.key) && isScalar(previous.value) && previous.value.range ? previous : undefined;
        const from = cut ? (cut.value as { range: [number, number] }).range[0] : (pairs[first]!.key as { range: [number, number] }).range[0];
        const written = yamlText.slice(from, pair.key.range[1]);
        const key = cut ? String((cut.key as { value: unknown }).value) : undefined;
        const quoted = key ? `${key}: "${written}"` : `"${written}"`;
        const unseparated = /^\d{1,3}(,\d{3})+(?!\d)/.test(written)
          ? ` (or write the number without the separator: ${written.replaceAll(',', '')})`
          : '';
        problems.push({
          code: 'front-matter-flow-comma',
          message: `the comma in "${written}" ends the value inside { }: YAML reads "${String(pair.key.value)}" as a key of its own`,
          at: span(from, pair.key.range[1]),
          hint: `inside { } a comma separates keys; put a value that holds a comma in quotes: ${quoted}${unseparated}`,
        });
      });
    },
  });
  return problems;
}

function collectBlocksAndInlines(
  file: string,
  lines: string[],
  tokens: Token[],
  bodyFirstLine: number,
  diagnostics: Diagnostic[],
): { blocks: CalcBlock[]; inlines: InlineExpression[] } {
  const blocks: CalcBlock[] = [];
  const inlines: InlineExpression[] = [];
  let runnableSoFar = 0;
  // Inline content of table cells carries no line of its own: it lies on the line of its row.
  let lastLine = bodyFirstLine;
  // Where the last `{{` found on a line was, so that a second value on the same line gets its own column.
  const searchedTo = new Map<number, number>();
  for (const token of tokens) {
    if (token.map) lastLine = token.map[0] + bodyFirstLine;
    if (token.type === 'fence' && token.map) {
      const fenceLine = token.map[0] + bodyFirstLine;
      const [language, ...words] = token.info.trim().split(/\s+/);
      if (!CALC_LANGUAGES.includes(language?.toLowerCase() ?? '')) continue;
      checkFenceClosed(file, lines, token, fenceLine, bodyFirstLine, diagnostics);
      const options = { hideCode: false, noRun: false };
      for (const word of words) {
        const key = BLOCK_OPTION_WORDS[word as keyof typeof BLOCK_OPTION_WORDS];
        if (key) options[key] = true;
        else {
          diagnostics.push({
            code: 'block-option-unknown',
            message: `unknown calculation block option "${word}"`,
            at: { file, line: fenceLine, column: 1 },
            hint: `the options after \`${language}\` are: ${Object.keys(BLOCK_OPTION_WORDS).join(', ')}`,
          });
        }
      }
      blocks.push({ index: blocks.length, code: token.content, fenceLine, firstCodeLine: fenceLine + 1, options });
      if (!options.noRun) runnableSoFar += 1;
    } else if (token.type === 'inline' && token.children) {
      const paragraphLine = lastLine;
      // Lines are counted forward from the previous value, so a long paragraph is read once, not once per value.
      let countedTo = 0;
      let lineInParagraph = 0;
      for (const child of token.children) {
        if (child.type === 'image') {
          refuseImageSource(file, lines, child, paragraphLine, diagnostics);
          continue;
        }
        if (child.type !== INLINE_VALUE_TOKEN) continue;
        const offset = (child.meta as { offset: number }).offset;
        for (let index = token.content.indexOf('\n', countedTo); index >= 0 && index < offset; index = token.content.indexOf('\n', index + 1))
          lineInParagraph += 1;
        countedTo = Math.max(countedTo, offset);
        const line = paragraphLine + lineInParagraph;
        const lineText = lines[line - 1] ?? '';
        const found = lineText.indexOf('{{', searchedTo.get(line) ?? 0);
        searchedTo.set(line, found < 0 ? lineText.length : found + 2);
        const column = found + 1 || 1;
        const at = { file, line, column };
        if (child.content === '') {
          diagnostics.push({
            code: 'inline-empty',
            message: 'an inline value {{ }} has no expression',
            at,
            hint: 'write the expression to show between the braces, e.g. {{ chargingMvar }}',
          });
          continue;
        }
        child.meta = { ...(child.meta as object), id: inlines.length };
        inlines.push({ id: inlines.length, expression: child.content, at, afterRunnableBlocks: runnableSoFar });
      }
    }
  }
  return { blocks, inlines };
}

/** An image a report may show is carried in the study (a data: address); anything else would be loaded when the report is opened. */
const CARRIED_IMAGE = /^data:image\/(png|jpeg|gif|webp);/i;

function refuseImageSource(file: string, lines: string[], image: Token, paragraphLine: number, diagnostics: Diagnostic[]): void {
  const address = String(image.attrGet('src') ?? '');
  if (CARRIED_IMAGE.test(address)) return;
  // markdown-it percent-encodes the address; as written it may sit on a later line of the paragraph, or in a reference definition.
  const written = [address, readableAddress(address)].filter((text) => text !== '');
  const columnIn = (index: number) => Math.min(...written.map((text) => lines[index]!.indexOf(text)).filter((at) => at >= 0));
  const lineWith = (from: number, to: number) => {
    for (let index = from; index < to; index++) if (Number.isFinite(columnIn(index))) return index;
    return undefined;
  };
  const index = lineWith(paragraphLine - 1, Math.min(lines.length, paragraphLine + 50)) ?? lineWith(0, lines.length);
  const line = index === undefined ? paragraphLine : index + 1;
  diagnostics.push({
    code: 'markdown-image-source',
    message: `the image "${address}" would be loaded from outside the report when it is opened`,
    at: { file, line, column: index === undefined ? 1 : columnIn(index) + 1 },
    hint: 'a report is self-contained: embed the image as a data: address (data:image/png;base64,…), or draw it with chart()',
  });
}

function readableAddress(address: string): string {
  try {
    return decodeURI(address);
  } catch {
    return address;
  }
}

/** markdown-it lets an unclosed fence run to the end of the document; a study must not. */
function checkFenceClosed(file: string, lines: string[], token: Token, fenceLine: number, bodyFirstLine: number, diagnostics: Diagnostic[]): void {
  const lastLine = lines[(token.map as [number, number])[1] + bodyFirstLine - 2] ?? '';
  const marker = token.markup;
  if (!lastLine.trim().startsWith(marker) || (token.map as [number, number])[1] - (token.map as [number, number])[0] < 2) {
    diagnostics.push({
      code: 'fence-unclosed',
      message: `the calculation block opened at line ${fenceLine} is never closed`,
      at: { file, line: fenceLine, column: 1 },
      hint: `end the block with a line holding only ${marker}`,
    });
  }
}
