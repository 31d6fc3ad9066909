// Parse stage: study source text -> Study (front matter, inputs, calculation blocks, inline values), or located diagnostics.
import type { Token } from 'markdown-it';
import { LineCounter, parseDocument, isMap, type Document } from 'yaml';
import { type Diagnostic, StudyFailure } from '../diagnostics/diagnostic.ts';
import { createMarkdown, INLINE_VALUE_TOKEN } from './markdown.ts';
import { readInputs } from './inputs.ts';
import { readMeta } from './meta.ts';
import { readSensitivity } from './sensitivity.ts';
import type { CalcBlock, InlineExpression, Study } from './model.ts';
import type { YamlPlace } from './yamlFields.ts';
import { sha256Hex } from '../seal/digest.ts';

const FENCE_LINE = /^---\s*$/;
const CALC_LANGUAGE = 'ts';
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
  const place: YamlPlace = {
    at(node, fallbackLine = yamlFirstLine) {
      const offset = node?.range?.[0];
      if (offset === undefined) return { file, line: fallbackLine };
      const { line, col } = lineCounter.linePos(offset);
      // The end of the node's value (not of a comment after it): a caret can span a scalar.
      const end = lineCounter.linePos(node?.range?.[1] ?? offset);
      return { file, line: line + yamlFirstLine - 1, column: col, endLine: end.line + yamlFirstLine - 1, endColumn: end.col };
    },
  };
  for (const error of document.errors) {
    const { line, col } = lineCounter.linePos(error.pos[0]);
    const studyLine = line + yamlFirstLine - 1;
    diagnostics.push({
      code: 'front-matter-yaml',
      message: `the front matter is not valid YAML: ${error.message.split('\n')[0]}`,
      at: { file, line: studyLine, column: col },
      hint: 'check indentation and quoting; a value with a colon needs quotes',
    });
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
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
      if (language !== CALC_LANGUAGE) continue;
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
            hint: `the options after \`ts\` are: ${Object.keys(BLOCK_OPTION_WORDS).join(', ')}`,
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
