// `kvarbook key`: make an engineer's signing key, and show the public identity others put in their trust folder.
import { writeFileSync } from 'node:fs';
import { createSigningKey } from '../seal/keys.ts';
import { type StoredKey, exportIdentity, loadDefaultKey, saveKey } from '../seal/keystore.ts';
import { SealError } from '../seal/errors.ts';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { homeFolders } from './homeFolders.ts';
import { readPassphrase } from './passphrase.ts';
import type { Terminal } from './terminal.ts';
import type { Person } from '../study/model.ts';

export interface KeyNewOptions {
  name: string;
  licence: string;
  jurisdiction: string;
  keys: string;
}

export async function keyNewCommand(options: KeyNewOptions, terminal: Terminal): Promise<number> {
  const passphrase = await readPassphrase('Passphrase for the new signing key (at least 12 characters): ');
  const key = createSigningKey({ name: options.name, licence: options.licence, jurisdiction: options.jurisdiction, passphrase });
  const { keyPath, identityPath } = saveKey(options.keys, key);
  terminal.say(`signing key: ${keyPath} (encrypted, mode 0600; never share it)`);
  terminal.say(`public identity: ${identityPath} (share it with checkers)`);
  terminal.say(`fingerprint: ${key.identity.fingerprint}`);
  return 0;
}

export async function keyShowCommand(options: { keys: string; out?: string }, terminal: Terminal): Promise<number> {
  const identity = exportIdentity(loadDefaultKey(options.keys).identity);
  if (options.out) {
    writeFileSync(options.out, identity, { flag: 'wx' });
    terminal.say(`public identity written to ${options.out}`);
  } else process.stdout.write(identity);
  return 0;
}

/** A word as a POSIX shell reads it back unchanged: bare when it holds only safe characters, else in single quotes. */
function shellWord(word: string): string {
  return /^[\w.,:@%+=/-]+$/.test(word) ? word : `'${word.replaceAll("'", "'\\''")}'`;
}

/** The `kvarbook key new` line that makes `person` a signing key in `keysFolder`, to paste as it stands (placeholders for what is not known). */
export function keyNewCommandLine(person: Person | undefined, keysFolder: string): string {
  const words = ['kvarbook', 'key', 'new', '--name', person ? shellWord(person.name) : '<name>'];
  words.push('--licence', person?.licence ? shellWord(person.licence) : '<licence>');
  words.push('--jurisdiction', person?.jurisdiction ? shellWord(person.jurisdiction) : '<jurisdiction>');
  if (keysFolder !== homeFolders().keys) words.push('--keys', shellWord(keysFolder));
  return words.join(' ');
}

/** The default key of `keysFolder`; a folder without one is refused with the command that makes `person` one. */
export function loadDefaultKeyOf(person: Person | undefined, keysFolder: string): StoredKey {
  try {
    return loadDefaultKey(keysFolder);
  } catch (error) {
    if (!(error instanceof SealError) || error.code !== 'seal-no-default-key') throw error;
    const whose = person ? `the signing key of ${person.name}` : 'your signing key';
    throw new StudyFailure([{ ...error.diagnostics[0]!, hint: `make ${whose} first: ${keyNewCommandLine(person, keysFolder)}` }]);
  }
}
