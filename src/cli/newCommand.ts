// `kvarbook new`: start a study from a template in templates/, never overwriting an existing file.
import { copyFileSync, constants, existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { KVARBOOK_ROOT } from '../installation.ts';
import type { Terminal } from './terminal.ts';

const TEMPLATE_SUFFIX = '.study.md';

export function templateNames(): string[] {
  return readdirSync(join(KVARBOOK_ROOT, 'templates'))
    .filter((name) => name.endsWith(TEMPLATE_SUFFIX))
    .map((name) => name.slice(0, -TEMPLATE_SUFFIX.length))
    .sort();
}

export function newCommand(template: string, file: string, terminal: Terminal): number {
  const names = templateNames();
  if (!names.includes(template)) {
    throw new StudyFailure([{ code: 'template-missing', message: `there is no template "${template}"`, hint: `templates: ${names.join(', ')}` }]);
  }
  if (existsSync(file)) {
    throw new StudyFailure([
      { code: 'new-exists', message: `${file} already exists; kvarbook new never overwrites a study`, hint: 'choose another file name' },
    ]);
  }
  try {
    copyFileSync(join(KVARBOOK_ROOT, 'templates', `${template}${TEMPLATE_SUFFIX}`), file, constants.COPYFILE_EXCL);
  } catch (error) {
    throw new StudyFailure([
      {
        code: 'new-unwritable',
        message: `cannot create ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`,
        hint: 'check that the folder exists and is writable',
      },
    ]);
  }
  terminal.say(`created ${file} from the "${template}" template`);
  return 0;
}
