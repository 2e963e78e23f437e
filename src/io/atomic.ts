import { randomBytes } from 'node:crypto';
import {
  existsSync,
  lstatSync,
  mkdirSync,
  readdirSync,
  readFileSync,
  renameSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs';
import { hostname } from 'node:os';
import { basename, dirname, join } from 'node:path';
import { UserError } from '../core/errors.js';
import { version } from '../core/version.js';

/**
 * Every output goes through this module. The rules it keeps:
 *
 * - A file is written under a temporary name in its own folder (`.landform-tmp-<name>-<pid>-<hex>`) and
 *   renamed into place: a reader never sees a half-written file.
 * - Several files of one result (a data file and its sidecars) are all written first and renamed only when
 *   every one is complete, while this process holds the output's lock, so two runs cannot interleave them.
 * - A folder (a model, an evaluation) is built complete under a temporary name, then swapped in: the old
 *   folder is renamed aside to `.landform-old-<name>`, the new one renamed in, the old one removed. A run
 *   killed inside the swap leaves either the aside folder and no folder (the old one is put back) or both
 *   (the aside one is removed); the next write to that folder finishes the job before anything else.
 * - Locks: `.landform-lock-<name>` beside the output, created exclusively, holding the pid and host. A lock
 *   whose pid is no longer running on this host is stale and taken over; a live one is waited for.
 * - Leftover temporary files and folders of killed runs are removed by the next write into the same folder
 *   when their process (the pid in the name) is no longer running, or when they are more than a day old
 *   (a pid can be reused).
 * - A folder made by landform carries a marker file, `.landform-output.json`; commands refuse to replace a
 *   non-empty folder without it unless asked to (`--force`).
 */
export const TEMP_PREFIX = '.landform-tmp-';
export const ASIDE_PREFIX = '.landform-old-';
export const LOCK_PREFIX = '.landform-lock-';
export const FOLDER_MARKER = '.landform-output.json';

/**
 * How long a lock held by a live process is waited for before the write is refused: long enough for another
 * evaluate to finish its report (it holds the lock while rendering), short enough to end a hung wait.
 */
export const LOCK_WAIT_MS = 5 * 60_000;
/** Temporary leftovers older than this are removed even if a process with their pid runs. */
const LEFTOVER_AGE_MS = 24 * 3600 * 1000;

/** The temporary name of `path` for this process: in the same folder, so the final rename is atomic. */
export function temporaryName(path: string): string {
  return join(
    dirname(path),
    `${TEMP_PREFIX}${basename(path)}-${process.pid}-${randomBytes(4).toString('hex')}`,
  );
}

/** The lock file of an output path. */
export function lockPath(path: string): string {
  return join(dirname(path), `${LOCK_PREFIX}${basename(path)}`);
}

/** Where a folder's previous version waits during a swap. */
export function asidePath(dir: string): string {
  return join(dirname(dir), `${ASIDE_PREFIX}${basename(dir)}`);
}

const FULL_CODES = new Set(['ENOSPC', 'EDQUOT', 'EFBIG']);

/**
 * A write that failed for a reason of the machine (disk full, quota, I/O) becomes one line naming the final
 * file, not the temporary one; other errors keep their own mapping, with the final path when they had none.
 */
export function writeFailure(path: string, error: unknown): unknown {
  const e = error as NodeJS.ErrnoException;
  if (typeof e?.code !== 'string') return error;
  if (FULL_CODES.has(e.code))
    return new UserError('cannot write: disk full (or over quota); free some space or write elsewhere', {
      file: path,
    });
  if (e.code === 'EIO')
    return new UserError('cannot write: input/output error on the device', { file: path });
  if (typeof e.path !== 'string' || basename(e.path).startsWith(TEMP_PREFIX)) e.path = path;
  return error;
}

/** True when `pid` is a running process (of any user) on this machine. */
export function processRunning(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function sleepSync(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

interface LockHolder {
  pid: number;
  host: string;
}

function readHolder(lock: string): LockHolder | undefined {
  try {
    const parsed = JSON.parse(readFileSync(lock, 'utf8')) as Partial<LockHolder>;
    if (typeof parsed.pid === 'number' && typeof parsed.host === 'string')
      return { pid: parsed.pid, host: parsed.host };
  } catch {
    // unreadable or half-written: decided by its age below
  }
  return undefined;
}

/** Whether a lock file is held by a live run: its pid runs on this host (another host's lock counts as live). */
function lockIsLive(lock: string): { live: boolean; holder?: LockHolder } {
  const holder = readHolder(lock);
  if (holder === undefined) {
    // A run creates the file and writes its pid at once; an empty file younger than 5 s may be that moment.
    try {
      return { live: Date.now() - statSync(lock).mtimeMs < 5000 };
    } catch {
      return { live: false };
    }
  }
  if (holder.host !== hostname()) return { live: true, holder };
  return { live: holder.pid === process.pid || processRunning(holder.pid), holder };
}

/**
 * Takes the lock of output `path` and returns its release. A lock of a process that no longer runs is taken
 * over; a live one is waited for (polling every 100 ms) up to `waitMs`, then the write is refused.
 */
export function acquireOutputLock(path: string, options: { waitMs?: number } = {}): () => void {
  const lock = lockPath(path);
  mkdirSync(dirname(lock), { recursive: true });
  const deadline = Date.now() + (options.waitMs ?? LOCK_WAIT_MS);
  const body = `${JSON.stringify({ pid: process.pid, host: hostname() })}\n`;
  for (;;) {
    try {
      writeFileSync(lock, body, { flag: 'wx' });
      let released = false;
      return () => {
        if (released) return;
        released = true;
        const holder = readHolder(lock);
        if (holder?.pid === process.pid && holder.host === hostname()) rmSync(lock, { force: true });
      };
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw writeFailure(lock, error);
    }
    const { live, holder } = lockIsLive(lock);
    if (!live) {
      rmSync(lock, { force: true });
      continue;
    }
    if (Date.now() >= deadline) {
      const who = holder ? `process ${holder.pid} on ${holder.host}` : 'another process';
      throw new UserError(
        `another landform run (${who}) is writing this output; wait for it to finish, or delete ${lock} if that run is gone`,
        { file: path },
      );
    }
    sleepSync(100);
  }
}

/**
 * Removes `.landform-tmp-*` leftovers in `folder` whose process no longer runs, or that are older than a
 * day. Our own (this pid's) are left alone: they belong to writes in progress.
 */
export function cleanLeftovers(folder: string): string[] {
  let names: string[];
  try {
    names = readdirSync(folder);
  } catch {
    return [];
  }
  const removed: string[] = [];
  for (const name of names) {
    if (!name.startsWith(TEMP_PREFIX)) continue;
    const m = /-(\d+)-[0-9a-f]{8}$/.exec(name);
    const pid = m ? Number(m[1]) : Number.NaN;
    if (pid === process.pid) continue;
    const path = join(folder, name);
    let old = false;
    try {
      old = Date.now() - lstatSync(path).mtimeMs > LEFTOVER_AGE_MS;
    } catch {
      continue;
    }
    if (Number.isNaN(pid) ? !old : processRunning(pid) && !old) continue;
    rmSync(path, { recursive: true, force: true });
    removed.push(path);
  }
  return removed;
}

/**
 * Finishes a folder swap that a killed run left half done: the aside folder goes back when the folder is
 * missing (the new one never arrived), and is removed when the folder is there (the new one did). Call with
 * the folder's lock held.
 */
export function recoverFolderSwap(dir: string): 'restored' | 'finished' | undefined {
  const aside = asidePath(dir);
  if (!existsSync(aside)) return undefined;
  if (!existsSync(dir)) {
    renameSync(aside, dir);
    return 'restored';
  }
  rmSync(aside, { recursive: true, force: true });
  return 'finished';
}

export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  writeFilesAtomic([{ path, data }]);
}

/**
 * Writes several files as one unit: all are written to temporary names first and renamed only when every
 * one has been written, under the lock of the first path. If anything fails, the temporary files are
 * removed.
 */
export function writeFilesAtomic(files: Array<{ path: string; data: string | Uint8Array }>): void {
  if (files.length === 0) return;
  const done: Array<{ tmp: string; path: string }> = [];
  let release: (() => void) | undefined;
  const cleaned = new Set<string>();
  try {
    for (const file of files) {
      const folder = dirname(file.path);
      mkdirSync(folder, { recursive: true });
      if (!cleaned.has(folder)) {
        cleaned.add(folder);
        cleanLeftovers(folder);
      }
      const tmp = temporaryName(file.path);
      done.push({ tmp, path: file.path });
      try {
        writeFileSync(tmp, file.data);
      } catch (error) {
        throw writeFailure(file.path, error);
      }
    }
    if (files.length > 1) release = acquireOutputLock(files[0].path);
    for (const { tmp, path } of done) renameSync(tmp, path);
  } catch (error) {
    for (const { tmp } of done) rmSync(tmp, { force: true });
    throw error;
  } finally {
    release?.();
  }
}

/** The marker a folder written by landform carries (no clock: the same run writes the same bytes). */
export function folderMarker(command?: string): string {
  return `${JSON.stringify({ kind: 'landform.output-folder', format: 1, landform: version(), ...(command ? { command } : {}) })}\n`;
}

export interface FolderWriteOptions {
  /** The command that writes the folder, recorded in its marker. */
  command?: string;
  /** False when the caller already holds the folder's lock (`acquireOutputLock(dir)`). */
  lock?: boolean;
}

/**
 * Builds a folder of outputs and commits it as a whole: `build` fills a temporary folder beside `dir`; on
 * success the old `dir` (if any) is swapped out for it (see the top of this file), on failure the temporary
 * folder is removed and `dir` is untouched.
 */
export async function writeFolderAtomic(
  dir: string,
  build: (tmpDir: string) => Promise<void> | void,
  options: FolderWriteOptions = {},
): Promise<void> {
  const parent = dirname(dir);
  mkdirSync(parent, { recursive: true });
  const release = options.lock === false ? undefined : acquireOutputLock(dir);
  try {
    recoverFolderSwap(dir);
    cleanLeftovers(parent);
    const existing = lstatOrUndefined(dir);
    if (existing && (!existing.isDirectory() || existing.isSymbolicLink()))
      throw new UserError('is not a folder; give a folder path (or remove what is there)', { file: dir });
    const tmp = temporaryName(dir);
    mkdirSync(tmp);
    try {
      await build(tmp);
      writeFileSync(join(tmp, FOLDER_MARKER), folderMarker(options.command));
    } catch (error) {
      rmSync(tmp, { recursive: true, force: true });
      throw writeFailure(dir, error);
    }
    const aside = asidePath(dir);
    if (existing) renameSync(dir, aside);
    renameSync(tmp, dir);
    if (existing) rmSync(aside, { recursive: true, force: true });
  } finally {
    release?.();
  }
}

function lstatOrUndefined(path: string): ReturnType<typeof lstatSync> | undefined {
  try {
    return lstatSync(path);
  } catch {
    return undefined;
  }
}
