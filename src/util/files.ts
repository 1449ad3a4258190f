import { closeSync, existsSync, fstatSync, linkSync, mkdirSync, openSync, readdirSync, readSync, realpathSync, renameSync, rmSync, statSync, writeFileSync, type Stats } from 'node:fs';
import { basename, dirname, extname, join, resolve, sep } from 'node:path';
import { UserError } from './errors.js';

// The one module that reads and writes the player's files. Reading is bounded: every file is
// measured first (or, for a device or a pipe, read in chunks) and refused above a maximum, so
// /dev/zero or a mistaken path cannot fill the memory. Writing goes through an output set: every
// output of a command is staged as a temporary file beside its target and renamed into place only
// when the whole command has succeeded; on any failure the temporaries are removed. diesis never
// replaces a file it was given to read, nor a file that is not of the kind it writes there.

const MiB = 1024 * 1024;

/** The largest file of each kind diesis reads. */
export const READ_LIMITS = { midi: 16 * MiB, text: 4 * MiB, wav: 1024 * MiB } as const;

const CHUNK = 64 * 1024;

function describeSize(bytes: number): string {
  return bytes >= MiB ? `${(bytes / MiB).toFixed(bytes >= 10 * MiB ? 0 : 1)} MB` : `${bytes} bytes`;
}

function errnoOf(error: unknown): string {
  return (error as NodeJS.ErrnoException).code ?? String(error);
}

/** Reads a file the user named, at most `maxBytes`; a failure is one line naming it. */
export function readInputFile(file: string, maxBytes: number = READ_LIMITS.midi): Uint8Array {
  let fd: number;
  try {
    fd = openSync(file, 'r');
  } catch (error) {
    const code = errnoOf(error);
    throw new UserError(code === 'ENOENT' ? `${file}: no such file` : code === 'EISDIR' ? `${file}: is a folder, not a file` : `${file}: cannot be read (${code})`);
  }
  try {
    const stats = fstatSync(fd);
    if (stats.isDirectory()) throw new UserError(`${file}: is a folder, not a file`);
    if (stats.isFile()) {
      if (stats.size > maxBytes) throw new UserError(`${file}: is ${describeSize(stats.size)}; diesis reads files of this kind up to ${describeSize(maxBytes)}`);
      const bytes = new Uint8Array(stats.size);
      let at = 0;
      while (at < bytes.length) {
        const n = readSync(fd, bytes, at, bytes.length - at, null);
        if (n === 0) break;
        at += n;
      }
      return at === bytes.length ? bytes : bytes.subarray(0, at);
    }
    // A device, a pipe or a socket: its size is unknown, so read in chunks up to the limit.
    const chunks: Uint8Array[] = [];
    let total = 0;
    for (;;) {
      const chunk = new Uint8Array(CHUNK);
      const n = readSync(fd, chunk, 0, CHUNK, null);
      if (n === 0) break;
      total += n;
      if (total > maxBytes) throw new UserError(`${file}: is not a regular file and gives more than ${describeSize(maxBytes)} (a device or an endless stream?); give a file`);
      chunks.push(chunk.subarray(0, n));
    }
    const bytes = new Uint8Array(total);
    let at = 0;
    for (const c of chunks) {
      bytes.set(c, at);
      at += c.length;
    }
    return bytes;
  } catch (error) {
    if (error instanceof UserError) throw error;
    throw new UserError(`${file}: cannot be read (${errnoOf(error)})`);
  } finally {
    closeSync(fd);
  }
}

/** Reads a text file the user named (UTF-8), at most `maxBytes`. */
export function readTextFile(file: string, maxBytes: number = READ_LIMITS.text): string {
  return new TextDecoder().decode(readInputFile(file, maxBytes));
}

/** What the file names in a folder are (sorted); a missing folder is one line. */
export function listFolder(dir: string): string[] {
  try {
    if (!statSync(dir).isDirectory()) throw new UserError(`${dir}: is a file, not a folder`);
    return readdirSync(dir).sort();
  } catch (error) {
    if (error instanceof UserError) throw error;
    const code = errnoOf(error);
    throw new UserError(code === 'ENOENT' ? `${dir}: no such folder` : `${dir}: cannot be read (${code})`);
  }
}

/** The kinds of file diesis writes, how they are named, and how an existing one is recognised. */
export type OutputKind = 'midi' | 'wav' | 'log' | 'svg' | 'position';

const KINDS: Readonly<Record<OutputKind, { readonly label: string; readonly extensions: readonly string[]; readonly looksLike: (head: Uint8Array) => boolean }>> = {
  midi: { label: 'a Standard MIDI File (.mid)', extensions: ['.mid', '.midi', '.smf'], looksLike: (h) => ascii(h, 0, 4) === 'MThd' },
  wav: { label: 'a WAV file (.wav)', extensions: ['.wav', '.wave'], looksLike: (h) => ascii(h, 0, 4) === 'RIFF' && ascii(h, 8, 4) === 'WAVE' },
  log: { label: 'a JSON Lines log (.jsonl)', extensions: ['.jsonl', '.ndjson', '.log', '.txt'], looksLike: (h) => h.length === 0 || h[0] === 0x7b /* { */ },
  svg: { label: 'an SVG picture (.svg)', extensions: ['.svg'], looksLike: (h) => ascii(h, 0, 5) === '<?xml' || ascii(h, 0, 4) === '<svg' },
  position: { label: "a concert's place, kept by diesis (.position)", extensions: ['.position'], looksLike: (h) => ascii(h, 0, 11) === '{"diesis":"' },
};

/** Extensions of files diesis reads or that belong to other programs: never an output of another kind. */
const FOREIGN: Readonly<Record<string, string>> = {
  '.json': 'a JSON file (a tuning, a setup, a manifest)',
  '.sfz': 'an SFZ mapping',
  '.xml': 'a MusicXML score',
  '.musicxml': 'a MusicXML score',
  '.mxl': 'a MusicXML score',
  '.flac': 'an audio file',
  '.mp3': 'an audio file',
  '.ogg': 'an audio file',
  '.aif': 'an audio file',
  '.aiff': 'an audio file',
};

function ascii(bytes: Uint8Array, at: number, length: number): string {
  return String.fromCharCode(...bytes.subarray(at, at + length));
}

function kindOfExtension(ext: string): OutputKind | undefined {
  return (Object.keys(KINDS) as OutputKind[]).find((k) => KINDS[k].extensions.includes(ext));
}

/** The kind of file a name is for, when diesis knows its extension: ".mid" → "a Standard MIDI File (.mid)", ".json" → "a JSON file (…)". */
export function kindOfName(path: string): string | undefined {
  const ext = extname(path).toLowerCase();
  const kind = kindOfExtension(ext);
  return kind ? KINDS[kind].label : FOREIGN[ext];
}

function headOf(file: string): Uint8Array {
  const fd = openSync(file, 'r');
  try {
    const head = new Uint8Array(16);
    const n = readSync(fd, head, 0, head.length, 0);
    return head.subarray(0, n);
  } finally {
    closeSync(fd);
  }
}

/** The same file on disk: one real path, or one inode (a hard link). */
function sameFile(a: Stats, b: Stats): boolean {
  return a.dev === b.dev && a.ino === b.ino;
}

/**
 * Checks, before any work, that a file the command reads is not a folder (`diesis render .`), so
 * the first problem named is that one and not something about the outputs beside it; `what`
 * says what it should be ("a Standard MIDI File: the piece to render, as piece.mid"). A folder
 * given as `.` or a relative path is also named in full.
 */
export function refuseFolderInput(file: string, what: string): void {
  if (!statOrUndefined(file)?.isDirectory()) return;
  const full = resolve(file);
  throw new UserError(`${file === full ? file : `${file} (${full})`}: is a folder, not ${what}`);
}

function statOrUndefined(path: string): Stats | undefined {
  try {
    return statSync(path);
  } catch {
    return undefined;
  }
}

/** Is `inner` the folder `outer` or inside it? (Both resolved through links where they exist.) */
export function isWithin(inner: string, outer: string): boolean {
  const real = (p: string): string => {
    const absolute = resolve(p);
    try {
      return realpathSync(absolute);
    } catch {
      const parent = dirname(absolute);
      return parent === absolute ? absolute : join(real(parent), basename(absolute));
    }
  };
  const a = real(inner);
  const b = real(outer);
  return a === b || a.startsWith(b.endsWith(sep) ? b : b + sep);
}

/**
 * Checks that `path` may be written as `kind` for `option` (`-o`, `--wav`…): its folder exists, it
 * is not a folder, not one of `inputs`, not named as another kind of file, and if it exists it is
 * already a file of that kind (so only what diesis could have written is replaced).
 */
export function checkOutputPath(option: string, path: string, kind: OutputKind, inputs: readonly string[] = []): void {
  const spec = KINDS[kind];
  const ext = extname(path).toLowerCase();
  const foreign = spec.extensions.includes(ext) ? undefined : kindOfName(path);
  if (foreign) throw new UserError(`${option} ${path}: a "${ext}" name is for ${foreign}, but ${option} writes ${spec.label}; give a name ending in ${spec.extensions[0]}`, 2);
  const target = statOrUndefined(path);
  for (const input of inputs) {
    const given = statOrUndefined(input);
    if (resolve(input) === resolve(path) || (target && given && sameFile(target, given))) {
      throw new UserError(`${option} ${path}: that is an input of this command; diesis never replaces a file it reads (give another name)`, 2);
    }
    if (given?.isDirectory() && isWithin(path, input)) {
      throw new UserError(`${option} ${path}: that is inside ${input}, an input folder of this command; write somewhere else`, 2);
    }
  }
  const folder = dirname(resolve(path));
  const parent = statOrUndefined(folder);
  if (!parent) throw new UserError(`${option} ${path}: the folder ${dirname(path)} does not exist`);
  if (!parent.isDirectory()) throw new UserError(`${option} ${path}: ${dirname(path)} is not a folder`);
  if (!target) return;
  if (target.isDirectory()) throw new UserError(`${option} ${path}: is a folder; give a file name, as in ${join(path, `take${spec.extensions[0]}`)}`);
  if (!target.isFile()) throw new UserError(`${option} ${path}: is not a regular file; diesis writes only files`);
  if (target.size > 0 && !spec.looksLike(headOf(path))) {
    throw new UserError(`${option} ${path}: exists and is not ${spec.label}; diesis does not replace a file it did not write (move it, or give another name)`);
  }
}

interface Staged {
  readonly target: string;
  readonly temporary: string;
}

let serial = 0;

/** A temporary name in the target's own folder, so the final rename never crosses file systems. */
function temporaryBeside(target: string): string {
  return join(dirname(target), `.${basename(target)}.diesis-${process.pid}-${++serial}.tmp`);
}

/**
 * The outputs of one command, written together or not at all. `claim` checks a path before any
 * work is done, `stage` writes its bytes to a temporary file beside it, `commit` renames every
 * staged file into place, `abort` removes them. `runWithOutputs` does all of this around a command.
 */
export class OutputSet {
  private readonly claimed = new Map<string, OutputKind>();
  private readonly staged: Staged[] = [];
  private done = false;

  constructor(private readonly inputs: readonly string[]) {}

  /** Checks an output path now, before the command does its work. */
  claim(option: string, path: string, kind: OutputKind): void {
    const key = resolve(path);
    if (this.claimed.has(key)) throw new UserError(`${option} ${path}: another output of this command already writes there`, 2);
    checkOutputPath(option, path, kind, this.inputs);
    this.claimed.set(key, kind);
  }

  /** Writes a claimed output's bytes to its temporary file. */
  stage(path: string, bytes: Uint8Array): void {
    if (this.done) throw new Error('output set already committed or aborted');
    if (!this.claimed.has(resolve(path))) throw new Error(`output ${path} was not claimed`);
    const temporary = temporaryBeside(path);
    this.staged.push({ target: path, temporary });
    try {
      writeFileSync(temporary, bytes, { flag: 'wx' });
    } catch (error) {
      throw new UserError(`${path}: cannot be written (${errnoOf(error)})`);
    }
  }

  /** Renames every staged file into place. */
  commit(): void {
    this.done = true;
    for (const { target, temporary } of this.staged) {
      try {
        renameSync(temporary, target);
      } catch (error) {
        this.removeTemporaries();
        throw new UserError(`${target}: cannot be written (${errnoOf(error)})`);
      }
    }
    this.staged.length = 0;
  }

  /** Removes every staged temporary file; nothing is replaced. */
  abort(): void {
    this.done = true;
    this.removeTemporaries();
  }

  private removeTemporaries(): void {
    for (const { temporary } of this.staged.splice(0)) rmSync(temporary, { force: true });
  }
}

/** Runs `work` with an output set; its outputs are committed only if it returns. */
export function runWithOutputs<T>(inputs: readonly string[], work: (outputs: OutputSet) => T): T {
  const outputs = new OutputSet(inputs);
  try {
    const result = work(outputs);
    outputs.commit();
    return result;
  } catch (error) {
    outputs.abort();
    throw error;
  }
}

/** Writes one file through a temporary file and a rename (for a single output outside a command's set). */
export function writeOutputFile(option: string, file: string, kind: OutputKind, bytes: Uint8Array, inputs: readonly string[] = []): void {
  runWithOutputs(inputs, (outputs) => {
    outputs.claim(option, file, kind);
    outputs.stage(file, bytes);
  });
}

/**
 * A folder written whole: its files are made in a temporary folder beside it and moved into place
 * at the end (`replacing` lists the files of an earlier set there that may be replaced; anything
 * else in the folder stays).
 */
export function writeFolder(outDir: string, replacing: readonly string[], fill: (put: (name: string, bytes: Uint8Array | string) => void) => void): void {
  const parent = dirname(resolve(outDir));
  const temporary = join(parent, `.${basename(outDir)}.diesis-${process.pid}-${++serial}.tmp`);
  mkdirSync(temporary, { recursive: true });
  const written: string[] = [];
  try {
    fill((name, bytes) => {
      if (name.includes('/') || name.includes('\\')) throw new Error(`not a plain file name: ${name}`);
      writeFileSync(join(temporary, name), bytes);
      written.push(name);
    });
  } catch (error) {
    rmSync(temporary, { recursive: true, force: true });
    throw error;
  }
  try {
    if (!existsSync(outDir)) {
      renameSync(temporary, outDir);
      return;
    }
    // An earlier set: remove exactly its files, then move the new ones in.
    for (const name of replacing) rmSync(join(outDir, name), { force: true });
    for (const name of written) renameSync(join(temporary, name), join(outDir, name));
    rmSync(temporary, { recursive: true, force: true });
  } catch (error) {
    rmSync(temporary, { recursive: true, force: true });
    throw new UserError(`${outDir}: cannot be written (${errnoOf(error)})`);
  }
}

/**
 * Writes a text file the player has agreed diesis may write (a setup `ports --learn` adds a control
 * to), through a temporary file beside it. `create` never replaces anything: the file is linked
 * into place, which fails if one appeared there meanwhile. `replace` renames over an existing file
 * the player said may be changed (its mode is kept).
 */
export function writeAgreedText(path: string, text: string, how: 'create' | 'replace'): void {
  const folder = statOrUndefined(dirname(resolve(path)));
  if (!folder?.isDirectory()) throw new UserError(`${path}: the folder ${dirname(path)} does not exist`);
  const existing = statOrUndefined(path);
  if (how === 'create' && existing) throw new UserError(`${path}: exists already; diesis does not replace a file it was not told it may change`);
  if (how === 'replace' && !existing?.isFile()) throw new UserError(`${path}: is not a file diesis can change`);
  const target = how === 'replace' ? realpathSync(path) : path; // through a link, the file it names is the one changed
  const temporary = temporaryBeside(target);
  try {
    writeFileSync(temporary, text, { flag: 'wx', mode: existing ? existing.mode & 0o777 : 0o644 });
    if (how === 'create') {
      linkSync(temporary, target);
      rmSync(temporary, { force: true });
    } else renameSync(temporary, target);
  } catch (error) {
    rmSync(temporary, { force: true });
    throw new UserError(errnoOf(error) === 'EEXIST' ? `${path}: exists already; diesis does not replace a file it was not told it may change` : `${path}: cannot be written (${errnoOf(error)})`);
  }
}
