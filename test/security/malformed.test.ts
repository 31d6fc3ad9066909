import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { MAX_STUDY_BYTES } from '../../src/cli/readStudy.ts';
import { type CliOutcome, kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { lineOf, studyText } from '../support/studies.ts';

const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;
const STUDY = 'bad.study.md';

interface MalformedCase {
  what: string;
  /** Writes the bad study (or whatever stands in for it) into the folder. */
  make: (folder: string) => string | undefined;
  /** The kvarbook arguments; a run of the bad study unless given. */
  args?: string[];
  code: string;
  /** The study line the diagnostic must name, found in the source by this text; omitted when no line applies. */
  lineOf?: string;
  /** A line number given outright, when the bad spot is not text that can be searched for. */
  line?: number;
  withColumn?: boolean;
}

const write = (source: string) => (folder: string) => {
  writeFileSync(join(folder, STUDY), source);
  return source;
};

const VALID_PREFIX = studyText({ body: 'Line one.\n' });
/** A newline, then "Cé " in Latin-1: 0xE9 alone is not UTF-8. */
const LATIN1_LINE = Buffer.from([0x0a, 0x43, 0xe9, 0x20, 0x0a]);

const CASES: MalformedCase[] = [
  {
    what: 'front matter that is not valid YAML',
    make: write(studyText({ frontMatter: 'checker: { name: [unclosed', body: 'x' })),
    code: 'front-matter-yaml',
    lineOf: 'checker:',
    withColumn: true,
  },
  { what: 'a study without front matter', make: write('# Just a heading\n'), code: 'front-matter-missing', line: 1 },
  { what: 'front matter that is never closed', make: write('---\ntitle: Open\n'), code: 'front-matter-unclosed', line: 1 },
  {
    what: 'an input in an unknown unit',
    make: write(studyText({ inputs: '  lineLength: 320 furlongz', body: 'x' })),
    code: 'input-',
    lineOf: 'furlongz',
  },
  {
    what: 'an input whose unit does not match its declared quantity',
    make: write(studyText({ inputs: '  lineLength: { value: 320 kV, quantity: length }', body: 'x' })),
    code: 'input-unit-mismatch',
    lineOf: '320 kV',
  },
  {
    what: 'an input outside its declared range',
    make: write(studyText({ inputs: '  lineLength: { value: 2000 km, min: 1 km, max: 1000 km }', body: 'x' })),
    code: 'input-out-of-range',
    lineOf: '2000 km',
  },
  {
    what: 'a result name recorded twice',
    make: write(studyText({ body: fence("result('Vr', 1);\nresult('Vr', 2);") })),
    code: 'block-result-duplicate',
    lineOf: "result('Vr', 2)",
    withColumn: true,
  },
  {
    what: 'a calculation block that is never closed',
    make: write(studyText({ body: `Text.\n\n\`\`\`ts\nconst open = 1;\n` })),
    code: 'fence-unclosed',
    lineOf: '```ts',
  },
  {
    what: 'a syntax error in a block',
    make: write(studyText({ body: fence('const broken = (1 + ;') })),
    code: 'block-syntax',
    lineOf: 'const broken',
    withColumn: true,
  },
  {
    what: 'a type error in a block',
    make: write(studyText({ body: fence("const lengthKm: number = 'three hundred';") })),
    args: ['run', STUDY],
    code: 'type-2322',
    lineOf: 'three hundred',
    withColumn: true,
  },
  {
    what: 'an inline value that refers to nothing',
    make: write(studyText({ body: `${fence('const defined = 1;')}\n\nShown: {{ undefinedName }}.` })),
    code: 'inline-undefined',
    lineOf: 'undefinedName',
    withColumn: true,
  },
  {
    what: 'a non-finite result',
    make: write(studyText({ body: fence("result('ratio', 0 / 0);") })),
    code: 'block-non-finite',
    lineOf: "result('ratio'",
    withColumn: true,
  },
  { what: 'a template that does not exist', make: () => undefined, args: ['new', 'nosuch', 'x.study.md'], code: 'template-missing' },
  { what: 'a study path that is a folder', make: (folder) => void mkdirSync(join(folder, STUDY)), code: 'study-not-file', line: 1 },
  {
    what: 'a study path that runs through a file',
    make: (folder) => void writeFileSync(join(folder, 'plain.txt'), 'x'),
    args: ['run', 'plain.txt/bad.study.md'],
    code: 'study-unreadable',
  },
  { what: 'a study file that does not exist', make: () => undefined, code: 'study-unreadable' },
  {
    what: 'a study that is not UTF-8',
    make: (folder) => void writeFileSync(join(folder, STUDY), Buffer.concat([Buffer.from(VALID_PREFIX), LATIN1_LINE])),
    code: 'study-not-utf8',
    // The Latin-1 "é" sits on the line after the valid text and the newline that opens the bad bytes.
    line: VALID_PREFIX.split('\n').length + 1,
  },
  { what: 'a study with NUL characters', make: write(studyText({ body: 'a\u0000b' })), code: 'study-binary', line: 1 },
  {
    what: 'a 50 MB study',
    make: (folder) => void writeFileSync(join(folder, STUDY), studyText({ body: 'x'.repeat(50 * 1024 * 1024) })),
    code: 'study-too-large',
    line: 1,
  },
];

/**
 * The cases run as a process of their own as well, one for each way a refusal reaches the edge: the parser, the
 * calculation process, the file system. The others run the same command line in this process (src/cli's main), which
 * prints and picks the exit code exactly as the executable does, without its seconds of start-up.
 */
const AS_PROCESS = new Set(['a study without front matter', 'a non-finite result', 'a study file that does not exist']);

function expectLocatedRefusal(testCase: MalformedCase, source: string | undefined, { status, stderr }: CliOutcome): void {
  expect(status).toBe(1);
  expect(stderr).toContain(`[${testCase.code}`);
  expect(stderr).toMatch(/error: \S.*\[/);
  expect(stderr).toContain('hint: ');
  expect(stderr).not.toMatch(/\n\s+at |kvarbook failed unexpectedly|\[internal\]/);
  const line = testCase.lineOf && source ? lineOf(source, testCase.lineOf) : testCase.line;
  if (line !== undefined) {
    const file = (testCase.args ?? ['run', STUDY])[1];
    expect(stderr).toContain(testCase.withColumn ? `${file}:${line}:` : `${file}:${line}`);
    if (testCase.withColumn) expect(stderr).toMatch(new RegExp(`${file!.replace('.', '\\.')}:${line}:\\d+: error`));
  }
}

describe('a malformed study on the command line', () => {
  it('is larger than the study size limit in the 50 MB case', () => {
    expect(50 * 1024 * 1024).toBeGreaterThan(MAX_STUDY_BYTES);
  });

  for (const testCase of CASES) {
    it(`gets a located error with a hint and exit code 1, never a stack trace: ${testCase.what}`, async () => {
      const folder = scratchFolder('kvarbook-malformed-');
      const source = testCase.make(folder);
      const args = testCase.args ?? ['run', STUDY, '--no-typecheck'];
      expectLocatedRefusal(testCase, source, await kvarbookInProcess(args, folder));
    });
  }

  for (const testCase of CASES.filter((each) => AS_PROCESS.has(each.what))) {
    it(`exits 1 from a process of its own with the same located error, never a stack trace: ${testCase.what}`, () => {
      const folder = scratchFolder('kvarbook-malformed-');
      const source = testCase.make(folder);
      expectLocatedRefusal(testCase, source, kvarbook(testCase.args ?? ['run', STUDY, '--no-typecheck'], folder));
    });
  }
});
