// The files of one run as one set: written into a fresh folder and switched in with one rename, never through a link; earlier sets kept whole.
import { randomBytes } from 'node:crypto';
import {
  closeSync,
  fsyncSync,
  lstatSync,
  mkdirSync,
  openSync,
  readdirSync,
  readFileSync,
  readlinkSync,
  realpathSync,
  renameSync,
  rmSync,
  symlinkSync,
  unlinkSync,
  writeSync,
} from 'node:fs';
import { basename, dirname, isAbsolute, join, normalize, sep } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { processIsRunning } from './liveProcess.ts';
import { sha256Hex } from '../seal/digest.ts';

/*
 * <out>/TEST-1-r1.html          -> .kvarbook/TEST-1-r1/TEST-1-r1.html   (one link per file name; never changes)
 * <out>/.kvarbook/TEST-1-r1     -> sets/TEST-1-r1.<id>                  (the switch: replaced by one rename)
 * <out>/.kvarbook/sets/TEST-1-r1.<id>/      the files of one run, written once
 * <out>/.kvarbook/sets/.TEST-1-r1.<pid>.<id>.tmp/   a set still being written
 * <out>/superseded/TEST-1-r1-<tag>/        an earlier sealed set, whole
 * Reading <out>/TEST-1-r1.html follows both links, so every file name shows the same run at every moment.
 */
const STORE = '.kvarbook';
const SETS = 'sets';
export const SUPERSEDED = 'superseded';

export interface ReportFolder {
  out: string;
  /** `<study id>-r<revision>`: the stem of every file name of the set. */
  base: string;
  /** Every file name a set of this base may hold. */
  names: readonly string[];
}

export interface ReportSet {
  /** The set's folder; undefined for files left at the top of the folder by kvarbook before sets existed. */
  folder: string | undefined;
  /** File name to path, for the files the set holds. */
  files: Map<string, string>;
}

export type SealedTest = (set: ReportSet) => Promise<boolean>;

/**
 * Makes the output folder and its store, refusing any symbolic link on the way (a relative --out is
 * checked from the working directory down) or in the places kvarbook writes to, then tidies what a
 * killed run left: sets it never finished, and finished sets no switch points at, which are kept in
 * superseded/ when sealed.
 */
export async function openReportFolder(folder: ReportFolder, isSealed: SealedTest): Promise<void> {
  realFolderPath(folder.out);
  for (const path of [join(folder.out, STORE), join(folder.out, STORE, SETS)]) realFolder(path);
  const current = currentSetFolder(folder);
  const sets = join(folder.out, STORE, SETS);
  for (const name of readdirSync(sets)) {
    const path = join(sets, name);
    const unfinished = new RegExp(`^\\.${escapeRegExp(folder.base)}\\.(\\d+)\\.[a-z0-9]+\\.tmp$`).exec(name);
    if (unfinished) {
      if (!processIsRunning(Number(unfinished[1]))) rmSync(path, { recursive: true, force: true });
    } else if (isSetName(folder, name) && path !== current) {
      const orphan = setAt(path);
      if (await isSealed(orphan)) supersede(folder, orphan);
      else rmSync(path, { recursive: true, force: true });
    }
  }
  removeStaleLinkTemporaries(folder.out);
  removeStaleLinkTemporaries(join(folder.out, STORE));
}

/** The set the file names show now: a set folder, the files of an earlier layout, or none. */
export function currentSet(folder: ReportFolder): ReportSet {
  const current = currentSetFolder(folder);
  if (current !== undefined) return setAt(current);
  const files = new Map<string, string>();
  for (const name of folder.names) {
    const path = join(folder.out, name);
    const kind = entryKind(path);
    if (kind === 'file') files.set(name, path);
    else if (kind === 'link') ownLink(folder, name);
    else if (kind === 'other') throw notAFile(path);
  }
  return { folder: undefined, files };
}

/** A set being written: files go into a fresh folder that nothing shows until `publish`. */
export class PendingSet {
  readonly #folder: ReportFolder;
  readonly #id = randomBytes(6).toString('hex');
  readonly #temporary: string;
  readonly #names: string[] = [];

  constructor(folder: ReportFolder) {
    this.#folder = folder;
    this.#temporary = join(folder.out, STORE, SETS, `.${folder.base}.${process.pid}.${this.#id}.tmp`);
    mkdirSync(this.#temporary);
  }

  write(name: string, content: string | Uint8Array): void {
    if (!this.#folder.names.includes(name)) throw new Error(`${name} is not a file of the set ${this.#folder.base}`);
    writeNewFile(join(this.#temporary, name), content);
    this.#names.push(name);
  }

  /**
   * Switches the file names to this set in one rename, then puts the previous set away: into
   * superseded/ when `keepPrevious` says so, else removed. Returns the superseded folder, if any.
   */
  publish(previous: ReportSet, keepPrevious: boolean): string | undefined {
    const { out, base } = this.#folder;
    const store = join(out, STORE);
    const finalName = `${base}.${this.#id}`;
    syncFolder(this.#temporary);
    renameSync(this.#temporary, join(store, SETS, finalName));
    syncFolder(join(store, SETS));
    let superseded: string | undefined;
    if (previous.folder === undefined && previous.files.size > 0) {
      // Files of the layout before sets: put away first (a moment with no report shown, never a mix).
      if (keepPrevious) superseded = supersede(this.#folder, previous);
      else for (const path of previous.files.values()) rmSync(path, { force: true });
    }
    // Links for the names this set brings, before the switch: until then they show nothing new.
    for (const name of this.#names) ensureOwnLink(this.#folder, name);
    replaceWithLink(join(store, base), `${SETS}/${finalName}`);
    syncFolder(store);
    // Names this set lacks now lead nowhere; their links go too.
    for (const name of this.#folder.names) {
      if (!this.#names.includes(name) && entryKind(join(out, name)) === 'link') unlinkSync(join(out, name));
    }
    if (previous.folder !== undefined) {
      if (keepPrevious) superseded = supersede(this.#folder, previous);
      else rmSync(previous.folder, { recursive: true, force: true });
    }
    syncFolder(out);
    return superseded;
  }

  /** Removes what was written; the folder shows what it showed before. */
  abandon(): void {
    rmSync(this.#temporary, { recursive: true, force: true });
  }
}

/**
 * Adds files to the set a report path shows (a counter-signature), never replacing one. Returns the
 * paths written; for a report outside any set, the files go beside it.
 */
export function addToSet(reportPath: string, files: { name: string; content: string | Uint8Array }[]): string[] {
  const real = realpathSync(reportPath);
  const setFolder = dirname(real);
  const inSet = basename(dirname(setFolder)) === SETS && basename(dirname(dirname(setFolder))) === STORE;
  const target = inSet ? setFolder : dirname(reportPath);
  const written: string[] = [];
  for (const file of files) {
    writeNewFile(join(target, file.name), file.content);
    written.push(join(dirname(reportPath), file.name));
  }
  if (inSet) {
    const out = dirname(dirname(dirname(setFolder)));
    const base = readdirSync(join(out, STORE)).find(
      (name) => entryKind(join(out, STORE, name)) === 'link' && realpathSync(join(out, STORE, name)) === setFolder,
    );
    if (base !== undefined) for (const file of files) ensureOwnLink({ out, base, names: [file.name] }, file.name);
  }
  return written;
}

function currentSetFolder(folder: ReportFolder): string | undefined {
  const link = join(folder.out, STORE, folder.base);
  const kind = entryKind(link);
  if (kind === 'none') return undefined;
  if (kind !== 'link') throw notAFile(link);
  const target = readlinkSync(link);
  if (!target.startsWith(`${SETS}/`) || !isSetName(folder, target.slice(SETS.length + 1))) throw foreignLink(link, target);
  const path = join(folder.out, STORE, target);
  if (entryKind(path) === 'none') return undefined;
  realFolder(path);
  return path;
}

function isSetName(folder: ReportFolder, name: string): boolean {
  return new RegExp(`^${escapeRegExp(folder.base)}\\.[a-z0-9]+$`).test(name);
}

/** The files of a set folder; anything in it that is not a plain file is refused. */
function setAt(path: string): ReportSet {
  const files = new Map<string, string>();
  for (const name of readdirSync(path)) {
    const file = join(path, name);
    if (entryKind(file) !== 'file') throw notAFile(file);
    files.set(name, file);
  }
  return { folder: path, files };
}

/** Moves a whole set into a superseded/ folder of its own: a fresh name each time, never merged. */
function supersede(folder: ReportFolder, set: ReportSet): string {
  const parent = join(folder.out, SUPERSEDED);
  realFolder(parent);
  const sealFile = set.files.get(`${folder.base}.seal.json`) ?? set.files.get(`${folder.base}.html`) ?? [...set.files.values()][0];
  const tag = sealFile ? sha256Hex(readFileSync(sealFile)).slice(0, 12) : 'empty';
  for (let attempt = 1; ; attempt += 1) {
    const destination = join(parent, `${folder.base}-${tag}${attempt > 1 ? `-${attempt}` : ''}`);
    try {
      if (set.folder !== undefined) {
        // A rename onto an existing folder fails unless it is empty; a superseded set never is.
        if (entryKind(destination) !== 'none') continue;
        renameSync(set.folder, destination);
      } else {
        mkdirSync(destination);
        for (const [name, path] of set.files) renameSync(path, join(destination, name));
      }
      return destination;
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      if (code !== 'EEXIST' && code !== 'ENOTEMPTY') throw error;
    }
  }
}

function ownLinkTarget(folder: ReportFolder, name: string): string {
  return `${STORE}/${folder.base}/${name}`;
}

/** A file name's link, made if missing; a link kvarbook did not make is refused. */
function ensureOwnLink(folder: ReportFolder, name: string): void {
  const path = join(folder.out, name);
  const kind = entryKind(path);
  if (kind === 'link') {
    ownLink(folder, name);
    return;
  }
  if (kind !== 'none') throw notAFile(path);
  replaceWithLink(path, ownLinkTarget(folder, name));
}

function ownLink(folder: ReportFolder, name: string): void {
  const path = join(folder.out, name);
  const target = readlinkSync(path);
  if (target !== ownLinkTarget(folder, name)) throw foreignLink(path, target);
}

/** A new link in a temporary name, renamed over `path`: the one step that changes what `path` shows. */
function replaceWithLink(path: string, target: string): void {
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.${randomBytes(4).toString('hex')}.link.tmp`);
  symlinkSync(target, temporary);
  renameSync(temporary, path);
}

function removeStaleLinkTemporaries(folder: string): void {
  for (const name of readdirSync(folder)) {
    const owner = /\.(\d+)\.[a-z0-9]+\.link\.tmp$/.exec(name)?.[1];
    if (name.startsWith('.') && owner !== undefined && !processIsRunning(Number(owner))) rmSync(join(folder, name), { force: true });
  }
}

/** Written in full and flushed; `wx` so nothing, not even a link planted in its place, is overwritten. */
function writeNewFile(path: string, content: string | Uint8Array): void {
  const descriptor = openSync(path, 'wx', 0o644);
  try {
    writeSync(descriptor, typeof content === 'string' ? Buffer.from(content, 'utf8') : content);
    fsyncSync(descriptor);
  } finally {
    closeSync(descriptor);
  }
}

function syncFolder(path: string): void {
  const descriptor = openSync(path, 'r');
  try {
    fsyncSync(descriptor);
  } finally {
    closeSync(descriptor);
  }
}

type EntryKind = 'none' | 'file' | 'folder' | 'link' | 'other';

function entryKind(path: string): EntryKind {
  try {
    const stat = lstatSync(path);
    return stat.isSymbolicLink() ? 'link' : stat.isFile() ? 'file' : stat.isDirectory() ? 'folder' : 'other';
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'ENOENT') return 'none';
    throw error;
  }
}

/** A folder kvarbook writes into: made if missing, refused if it is a link or not a folder. */
function realFolder(path: string): void {
  const kind = entryKind(path);
  if (kind === 'none') mkdirSync(path);
  else if (kind === 'link') throw linkOnTheWay(path);
  else if (kind !== 'folder') throw notAFile(path);
}

/** The output folder itself, and for a relative path every folder from the working directory down to it. */
function realFolderPath(out: string): void {
  if (isAbsolute(out)) {
    mkdirSync(dirname(out), { recursive: true });
    realFolder(out);
    return;
  }
  let path = '';
  for (const part of normalize(out).split(sep)) {
    if (part === '' || part === '.') continue;
    path = path ? join(path, part) : part;
    if (part !== '..') realFolder(path);
  }
}

function linkOnTheWay(path: string): StudyFailure {
  return new StudyFailure([
    {
      code: 'output-folder-link',
      message: `${path} is a symbolic link (to ${readlinkSync(path)}); kvarbook writes reports only into real folders, never through a link`,
      hint: 'remove the link, or name a real folder with --out',
    },
  ]);
}

function foreignLink(path: string, target: string): StudyFailure {
  return new StudyFailure([
    {
      code: 'output-folder-link',
      message: `${path} is a symbolic link to ${target}, which kvarbook did not make; it writes nothing through it`,
      hint: 'remove the link; kvarbook makes its own links inside the output folder only',
    },
  ]);
}

function notAFile(path: string): StudyFailure {
  return new StudyFailure([
    {
      code: 'output-folder-entry',
      message: `${path} is not what kvarbook keeps there (a plain file, or a folder it made)`,
      hint: 'move it out of the output folder',
    },
  ]);
}

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
