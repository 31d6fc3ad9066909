// Sealed reports for the archive tests: a few small studies sealed once per test file by the engineer of sealWorkspace.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { kvarbookInProcess } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';
import { sealWorkspace, type SealWorkspace } from '../security/sealWorkspace.ts';

/** A study whose one figure comes from the solver (|3 + 4j| · scale), so that a changed solver moves it. */
export function archivedStudy(id: string, revision: number, extra: { line?: string; project?: string; date?: string; scale?: number } = {}): string {
  const text = studyText({
    frontMatter: extra.line ? `line: ${extra.line}` : undefined,
    body: `# Magnitude\n\n\`\`\`ts\nconst polar = solver.polarForm({ value: { re: 3, im: 4 } });\nresult("Magnitude", polar.magnitude * ${extra.scale ?? 1}, { unit: "kV" });\n\`\`\`\n`,
  });
  return text
    .replace('id: TEST-1', `id: ${id}`)
    .replace('revision: 1', `revision: ${revision}`)
    .replace('project: Test project', `project: ${extra.project ?? 'Test project'}`)
    .replace('date: 2026-11-20', `date: ${extra.date ?? '2026-11-20'}`);
}

export interface SealedSet {
  space: SealWorkspace;
  /** The sealed report's path by `<id>-r<revision>`. */
  reports: Record<string, string>;
}

/** Seals each study (file name → text) in one workspace, in this process; `build/<id>-r<rev>.html` and siblings. */
export async function sealStudies(studies: Record<string, string>): Promise<SealedSet> {
  const space = sealWorkspace('kvarbook-archive-');
  const reports: Record<string, string> = {};
  for (const [file, text] of Object.entries(studies)) {
    writeFileSync(join(space.folder, file), text);
    const sealed = await kvarbookInProcess(['run', file, '--seal'], space.folder, space.env);
    if (sealed.status !== 0) throw new Error(`sealing ${file} failed:\n${sealed.stderr}`);
    const id = /^id: (.+)$/m.exec(text)![1]!;
    const revision = /^revision: (\d+)$/m.exec(text)![1]!;
    reports[`${id}-r${revision}`] = join(space.folder, 'build', `${id}-r${revision}.html`);
  }
  return { space, reports };
}
