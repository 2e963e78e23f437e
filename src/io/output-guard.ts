import { existsSync, lstatSync, readdirSync, realpathSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve, sep } from 'node:path';
import { UserError } from '../core/errors.js';
import { ASIDE_PREFIX, FOLDER_MARKER, LOCK_PREFIX, TEMP_PREFIX } from './atomic.js';

/**
 * The one check every command makes on where it will write, before it computes anything, so that an output
 * never destroys data:
 *
 * - the output may not be one of the inputs, nor lie inside an input folder, nor (for a folder output)
 *   contain an input — compared by resolved real paths, so links and `..` do not hide a collision;
 * - a symbolic link, device, FIFO or socket at the output path is refused (an atomic write would replace
 *   the link or the special file by a regular file): give the real path of a regular file or folder;
 * - a folder output that exists, is not empty and was not made by landform (no `.landform-output.json`
 *   marker, and not only the names the command itself writes) is refused unless `force` is set, in which
 *   case it is replaced as a whole.
 */
export interface OutputCheckOptions {
  /** The output is a folder (`train --save`, `evaluate --out`) rather than a file. */
  folder?: boolean;
  /** Replace a non-empty folder landform did not make (`--force`). */
  force?: boolean;
  /** The option naming the output, for messages (default `--out`). */
  option?: string;
  /**
   * Names a folder written by an earlier landform (before the marker existed) may hold: a folder holding
   * only these counts as landform's.
   */
  known?: readonly string[];
  /** Other files written beside the output (sidecars): checked for collisions and special files too. */
  sidecars?: readonly string[];
  /**
   * The command writes named files into the folder and leaves the rest (`demo`, `datasets`) instead of
   * replacing the folder as a whole; only the refusal's wording changes.
   */
  addsFiles?: boolean;
}

/** The real path `path` will have: the real path of its nearest existing ancestor plus the rest. */
export function realOutputPath(path: string): string {
  const absolute = resolve(path);
  const rest: string[] = [];
  let head = absolute;
  for (;;) {
    try {
      const real = realpathSync(head);
      return rest.length === 0 ? real : join(real, ...rest.reverse());
    } catch {
      const parent = dirname(head);
      if (parent === head) return absolute;
      rest.push(basename(head));
      head = parent;
    }
  }
}

function inside(child: string, folder: string): boolean {
  const base = folder.endsWith(sep) ? folder : folder + sep;
  return child.startsWith(base);
}

function lstatOrUndefined(path: string): ReturnType<typeof lstatSync> | undefined {
  try {
    return lstatSync(path);
  } catch {
    return undefined;
  }
}

function checkSpecial(path: string, option: string): ReturnType<typeof lstatSync> | undefined {
  const stat = lstatOrUndefined(path);
  if (stat === undefined) return undefined;
  if (stat.isSymbolicLink()) {
    throw new UserError(
      `${option} is a symbolic link; landform does not write through links (the link would be replaced by a file) — give the path it points to, or another name`,
      { file: path },
    );
  }
  if (stat.isCharacterDevice() || stat.isBlockDevice() || stat.isFIFO() || stat.isSocket()) {
    const what = stat.isFIFO() ? 'a FIFO' : stat.isSocket() ? 'a socket' : 'a device';
    throw new UserError(
      `${option} is ${what}, not a regular file; landform writes only regular files and folders — give a file path`,
      { file: path },
    );
  }
  return stat;
}

/** True when a folder was made by landform: it has the marker, or holds only names in `known`. */
export function madeByLandform(dir: string, known: readonly string[] = []): boolean {
  if (existsSync(join(dir, FOLDER_MARKER))) return true;
  const names = readdirSync(dir);
  return names.length > 0 && known.length > 0 && names.every((n) => known.includes(n));
}

/** Refuses an output path that would destroy data (see above); returns nothing when it is safe. */
export function checkOutputPath(
  out: string,
  inputs: readonly (string | undefined)[],
  options: OutputCheckOptions = {},
): void {
  const option = options.option ?? '--out';
  const stat = checkSpecial(out, option);
  for (const sidecar of options.sidecars ?? []) checkSpecial(sidecar, `${option}'s sidecar`);
  const name = basename(resolve(out));
  if ([TEMP_PREFIX, ASIDE_PREFIX, LOCK_PREFIX].some((p) => name.startsWith(p)) || name === FOLDER_MARKER) {
    throw new UserError(`${option} uses a name landform keeps for its own temporary files; choose another`, {
      file: out,
    });
  }
  if (options.folder) {
    if (stat && !stat.isDirectory())
      throw new UserError(`${option} names a folder, but this is a file; give a folder path`, { file: out });
  } else if (stat?.isDirectory()) {
    throw new UserError(`${option} names a file, but this is a folder; give a file name inside it`, {
      file: out,
    });
  }
  const realOut = realOutputPath(out);
  const realSidecars = (options.sidecars ?? []).map(realOutputPath);
  for (const input of inputs) {
    if (input === undefined || !existsSync(input)) continue;
    const realIn = realpathSync(input);
    const inputIsFolder = statSync(realIn).isDirectory();
    for (const written of [realOut, ...realSidecars]) {
      if (written === realIn) {
        throw new UserError(
          `${option} is the input ${input}; writing would replace it — write to another path`,
          { file: out },
        );
      }
      if (inputIsFolder && inside(written, realIn)) {
        throw new UserError(
          `${option} is inside the input folder ${input}; write outside it so the input stays as it is`,
          { file: out },
        );
      }
    }
    if (options.folder && inside(realIn, realOut)) {
      throw new UserError(
        `${option} contains the input ${input}; replacing the folder would delete it — write to another folder`,
        { file: out },
      );
    }
  }
  if (options.folder && stat?.isDirectory() && !options.force) {
    if (readdirSync(out).length > 0 && !madeByLandform(out, options.known)) {
      throw new UserError(
        options.addsFiles
          ? `${option} is a folder that landform did not make and it is not empty; choose a new or empty folder, or add --force to write into it (files of the same names will be replaced)`
          : `${option} is a folder that landform did not make and it is not empty; choose a new or empty folder, or add --force to replace it as a whole (its files will be deleted)`,
        { file: out },
      );
    }
  }
}

/**
 * The files written beside a data file `out`: its provenance sidecar and, for NPY, the sample and column
 * lists. Pass them as `sidecars` so they get the same checks.
 */
export function fileOutputSidecars(out: string, format?: 'csv' | 'npy' | 'arrow' | 'json'): string[] {
  const sidecars = [`${out}.provenance.json`];
  if (format === 'npy' || (format === undefined && /\.npy$/i.test(out))) {
    const stem = out.replace(/\.npy$/i, '');
    sidecars.push(`${stem}.samples.csv`, `${stem}.columns.csv`);
  }
  return sidecars;
}

/** `checkOutputPath` for a data file and its sidecars (diagrams, features, landscapes, predictions…). */
export function checkFileOutput(
  out: string,
  inputs: readonly (string | undefined)[],
  format?: 'csv' | 'npy' | 'arrow' | 'json',
): void {
  checkOutputPath(out, inputs, { sidecars: fileOutputSidecars(out, format) });
}
