import { existsSync, realpathSync, statSync } from 'node:fs';
import { isAbsolute, join, relative, resolve, sep } from 'node:path';
import { UserError } from '../core/errors.js';
import { parseCsv, readTextFile, shown } from './csv.js';

/**
 * `labels.csv` of a folder dataset: header `file,label`, one row per sample file, paths relative to the folder.
 * A path must stay inside the folder: absolute paths, drive letters, `..` segments and symbolic links that lead
 * outside are refused, each with the line at fault.
 */
export interface LabelledFile {
  /** The path as written in labels.csv (forward slashes). */
  file: string;
  /** The resolved path on disk. */
  path: string;
  label: string;
  /** The sample id: the path without its extension. */
  id: string;
  /** The line of labels.csv naming it. */
  line: number;
}

export const LABELS_FILE = 'labels.csv';

/** Refuses a labels.csv path that could leave the folder; returns it with forward slashes. */
export function checkInsidePath(written: string, where: { file: string; line: number }): string {
  const path = written.replace(/\\/g, '/');
  if (path === '') throw new UserError('empty file name; every row needs a file', where);
  if (isAbsolute(written) || path.startsWith('/') || /^[a-zA-Z]:/.test(path)) {
    throw new UserError(
      `'${shown(written)}' is an absolute path; give paths relative to the dataset folder`,
      where,
    );
  }
  if (path.split('/').some((part) => part === '..')) {
    throw new UserError(
      `'${shown(written)}' leaves the dataset folder (..); keep every file inside the folder`,
      where,
    );
  }
  if (path.includes('\0'))
    throw new UserError(`'${shown(written)}' holds a NUL character; fix the file name`, where);
  return path;
}

export function readLabelsFile(folder: string): LabelledFile[] {
  const file = join(folder, LABELS_FILE);
  if (!existsSync(file)) {
    throw new UserError(
      `no ${LABELS_FILE} in the folder; write one with the header file,label and one row per sample file`,
      {
        file: folder,
      },
    );
  }
  const rows = parseCsv(readTextFile(file), file);
  if (rows.length === 0)
    throw new UserError('empty file; expected the header file,label and one row per sample file', { file });
  const header = rows[0].fields.map((f) => f.toLowerCase());
  const iFile = header.indexOf('file');
  const iLabel = header.indexOf('label');
  if (iFile < 0 || iLabel < 0) {
    throw new UserError(`the header must be file,label (got '${shown(rows[0].fields.join(','))}')`, {
      file,
      line: rows[0].line,
    });
  }
  if (rows.length === 1)
    throw new UserError('header only, no rows; list at least one sample file', { file, line: rows[0].line });
  const root = realpathSync(folder);
  const out: LabelledFile[] = [];
  const ids = new Map<string, number>();
  for (let r = 1; r < rows.length; r++) {
    const { fields, line } = rows[r];
    if (fields.length !== header.length) {
      throw new UserError(`has ${fields.length} fields, the header has ${header.length}; fix the row`, {
        file,
        line,
      });
    }
    const written = fields[iFile];
    const rel = checkInsidePath(written, { file, line });
    const path = resolve(folder, rel);
    let real: string;
    let isFile = false;
    try {
      real = realpathSync(path);
      isFile = statSync(real).isFile();
    } catch {
      throw new UserError(`'${shown(written)}' does not exist in ${folder}; fix the name or add the file`, {
        file,
        line,
      });
    }
    const inside = relative(root, real);
    if (inside === '' || inside.startsWith('..') || isAbsolute(inside) || inside.split(sep)[0] === '..') {
      throw new UserError(
        `'${shown(written)}' leads outside the dataset folder (a link?); keep every file inside the folder`,
        {
          file,
          line,
        },
      );
    }
    if (!isFile) throw new UserError(`'${shown(written)}' is a folder, not a file`, { file, line });
    const id = rel.replace(/\.[^./]*$/, '');
    const earlier = ids.get(id);
    if (earlier !== undefined) {
      throw new UserError(
        `'${shown(written)}' gives the sample id '${shown(id)}' again (first on line ${earlier}); list each sample once`,
        {
          file,
          line,
        },
      );
    }
    ids.set(id, line);
    out.push({ file: rel, path, label: fields[iLabel], id, line });
  }
  return out;
}
