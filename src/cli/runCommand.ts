// `kvarbook run`: one study to its report files, written atomically; a failed run leaves earlier reports as they were.
import { join } from 'node:path';
import { parseOverrideArguments } from '../study/inputs.ts';
import { runStudy, type RunProduct } from '../pipeline.ts';
import { UNSEALED_NOTICE, assembleReport, criteriaStatus } from '../report/html.ts';
import { writeFilesAtomically, type PendingFile } from '../output/atomicWrite.ts';
import { installationFacts } from './environment.ts';
import { readStudyFile } from './readStudy.ts';
import type { Terminal } from './terminal.ts';

export interface RunOptions {
  out: string;
  set: string[];
  typecheck: boolean;
}

export function reportBaseName(product: RunProduct): string {
  const { meta } = product.run.study;
  return `${meta.id}-r${meta.revision}`;
}

/** The canonical text of results.json: two-space indented, keys in the order the document builds them. */
export function resultsJsonText(product: RunProduct): string {
  return `${JSON.stringify(product.results, null, 2)}\n`;
}

export async function produceStudy(studyPath: string, options: RunOptions, terminal: Terminal): Promise<RunProduct> {
  const source = readStudyFile(studyPath);
  return runStudy({
    file: studyPath,
    source,
    overrides: parseOverrideArguments(options.set),
    typecheck: options.typecheck,
    environment: installationFacts(),
    hooks: {
      onBlockStart: (block, position, count) => terminal.progress(`block ${position + 1}/${count} (line ${block.block.fenceLine})`),
    },
  });
}

export async function runCommand(studyPath: string, options: RunOptions, terminal: Terminal): Promise<number> {
  const product = await produceStudy(studyPath, options, terminal);
  const base = join(options.out, reportBaseName(product));
  const files: PendingFile[] = [
    { path: `${base}.html`, content: assembleReport(product.report, UNSEALED_NOTICE) },
    { path: `${base}.results.json`, content: resultsJsonText(product) },
  ];
  writeFilesAtomically(files);
  terminal.progressDone();
  const criteria = product.results.criteria;
  const failed = criteria.filter((criterion) => !criterion.passed).length;
  terminal.say(`report: ${base}.html`);
  terminal.say(`results: ${base}.results.json`);
  terminal.say(`criteria: ${criteriaStatus(failed, criteria.length)}`);
  return 0;
}
