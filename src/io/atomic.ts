import { randomBytes } from 'node:crypto';
import { mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

/**
 * Writes through a temporary name in the same folder, then renames: a reader never sees a half-written
 * file, and a failed run leaves nothing behind.
 */
export function temporaryName(path: string): string {
  return join(
    dirname(path),
    `.landform-tmp-${basename(path)}-${process.pid}-${randomBytes(4).toString('hex')}`,
  );
}

export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  mkdirSync(dirname(path), { recursive: true });
  const tmp = temporaryName(path);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (error) {
    rmSync(tmp, { force: true });
    throw error;
  }
}

/**
 * Writes several files as one unit: all are written to temporary names first and renamed only when every
 * one has been written. If anything fails, the temporary files are removed.
 */
export function writeFilesAtomic(files: Array<{ path: string; data: string | Uint8Array }>): void {
  const done: Array<{ tmp: string; path: string }> = [];
  try {
    for (const file of files) {
      mkdirSync(dirname(file.path), { recursive: true });
      const tmp = temporaryName(file.path);
      done.push({ tmp, path: file.path });
      writeFileSync(tmp, file.data);
    }
    for (const { tmp, path } of done) renameSync(tmp, path);
  } catch (error) {
    for (const { tmp } of done) rmSync(tmp, { force: true });
    throw error;
  }
}

/**
 * Builds a folder of outputs atomically: `build` fills a temporary folder beside `dir`; on success the old
 * `dir` (if any) is replaced by it, on failure the temporary folder is removed.
 */
export async function writeFolderAtomic(
  dir: string,
  build: (tmpDir: string) => Promise<void> | void,
): Promise<void> {
  mkdirSync(dirname(dir), { recursive: true });
  const tmp = temporaryName(dir);
  mkdirSync(tmp, { recursive: true });
  try {
    await build(tmp);
    rmSync(dir, { recursive: true, force: true });
    renameSync(tmp, dir);
  } catch (error) {
    rmSync(tmp, { recursive: true, force: true });
    throw error;
  }
}
