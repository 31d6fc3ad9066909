// `kvarbook new`: start a study from a template in templates/, never overwriting an existing file; `--list` names the templates.
import { copyFileSync, constants, existsSync, readFileSync } from 'node:fs';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { parseStudy } from '../study/parse.ts';
import { templateFile, templateFileName, templateNames } from './templateFiles.ts';
import type { Terminal } from './terminal.ts';

/**
 * What a template is for, in one line, from the template itself: the first sentence of the paragraph under its
 * "Purpose" heading, or its title when it has none.
 */
export function templateSummary(name: string): string {
  const file = templateFileName(name);
  const study = parseStudy(file, readFileSync(templateFile(name), 'utf8'));
  const tokens = study.bodyTokens;
  const heading = tokens.findIndex((token, index) => token.type === 'heading_open' && /^purpose\b/i.test(tokens[index + 1]?.content ?? ''));
  const paragraph = heading < 0 ? -1 : tokens.findIndex((token, index) => index > heading && token.type === 'paragraph_open');
  const text = paragraph < 0 ? '' : (tokens[paragraph + 1]?.content ?? '').replace(/\s+/g, ' ').trim();
  const sentence = /^.*?[.!?](?=\s|$)/.exec(text)?.[0] ?? text;
  return sentence === '' ? study.meta.title : sentence;
}

export function listTemplates(terminal: Terminal): number {
  const names = templateNames();
  const width = Math.max(...names.map((name) => name.length));
  for (const name of names) terminal.say(`${name.padEnd(width)}  ${templateSummary(name)}`);
  return 0;
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
    copyFileSync(templateFile(template), file, constants.COPYFILE_EXCL);
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
