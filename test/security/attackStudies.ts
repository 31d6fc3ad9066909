// A checker's machine in miniature for attack studies: a study folder, a canary file beside it, and a record of every file.
import { mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { Diagnostic } from '../../src/diagnostics/diagnostic.ts';
import { runStudy, type RunProduct } from '../../src/pipeline.ts';
import { scratchFolder } from '../support/cli.ts';
import { TEST_ENVIRONMENT, TEST_STYLESHEET, diagnosticsOf, studyText } from '../support/studies.ts';

export const CANARY_TEXT = 'checker secret: must never be read, changed or removed by a study\n';

export interface CheckerMachine {
  root: string;
  studyFolder: string;
  canaryPath: string;
  studyPath: string;
  /** Every file under the root with its size and content, to compare before and after a run. */
  snapshot(): Map<string, string>;
}

export function checkerMachine(): CheckerMachine {
  const root = scratchFolder('kvarbook-attack-');
  const studyFolder = join(root, 'study');
  mkdirSync(studyFolder);
  const canaryPath = join(root, 'canary.txt');
  writeFileSync(canaryPath, CANARY_TEXT);
  const studyPath = join(studyFolder, 'attack.study.md');
  const snapshot = () => {
    const files = new Map<string, string>();
    const walk = (folder: string) => {
      for (const name of readdirSync(folder)) {
        const path = join(folder, name);
        if (statSync(path).isDirectory()) walk(path);
        else files.set(relative(root, path), readFileSync(path, 'utf8'));
      }
    };
    walk(root);
    return files;
  };
  return { root, studyFolder, canaryPath, studyPath, snapshot };
}

export const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;

/** A study whose one block is `code`, written into the machine's study folder (so the child may read that folder only). */
export function attackStudy(machine: CheckerMachine, code: string, frontMatter = 'limits: { blockSeconds: 2, studySeconds: 20 }'): string {
  const source = studyText({ frontMatter, body: `# Attack\n\n${fence(code)}\n` });
  writeFileSync(machine.studyPath, source);
  return source;
}

export function runAttack(machine: CheckerMachine, source: string): Promise<RunProduct> {
  return runStudy({ file: machine.studyPath, source, overrides: [], typecheck: false, environment: TEST_ENVIRONMENT, stylesheet: TEST_STYLESHEET });
}

/** Runs the study, expects it to fail, and returns its first diagnostic. */
export async function firstProblem(machine: CheckerMachine, source: string): Promise<Diagnostic> {
  const [problem] = await diagnosticsOf(runAttack(machine, source));
  if (!problem) throw new Error('the study failed without a diagnostic');
  return problem;
}
