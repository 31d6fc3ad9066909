// Where kvarbook's study templates are and what they are called; light enough for the command line's start-up.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { KVARBOOK_ROOT } from '../installation.ts';

const TEMPLATE_SUFFIX = '.study.md';

export function templateNames(): string[] {
  return readdirSync(join(KVARBOOK_ROOT, 'templates'))
    .filter((name) => name.endsWith(TEMPLATE_SUFFIX))
    .map((name) => name.slice(0, -TEMPLATE_SUFFIX.length))
    .sort();
}

export function templateFile(name: string): string {
  return join(KVARBOOK_ROOT, 'templates', `${name}${TEMPLATE_SUFFIX}`);
}

export function templateFileName(name: string): string {
  return `${name}${TEMPLATE_SUFFIX}`;
}
