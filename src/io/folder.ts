import { readFileSync } from 'node:fs';
import { extname } from 'node:path';
import { UserError } from '../core/errors.js';
import type { Dataset, Sample, SampleKind } from '../core/sample.js';
import { parseCsv, parseNumberField, readTextFile, shown } from './csv.js';
import { parsePgm, parsePng } from './image-file.js';
import { LABELS_FILE, type LabelledFile, readLabelsFile } from './labels-file.js';
import { parseNpy } from './npy.js';

/**
 * A folder dataset: one file per sample, listed with its label in `labels.csv` (`file,label`).
 *
 *   points     per-sample CSV (n rows × d columns, optional header) or .npy of shape n × d
 *   distances  per-sample square matrix, CSV or .npy; symmetric, zero diagonal, non-negative (within a tolerance)
 *   signal     per-sample .npy of one dimension, or a CSV of one column
 *   image      PNG (8/16-bit grey; colour → luminance), PGM (P2/P5), .npy h × w, or .npy d × h × w volumes
 *
 * Detection without `kind`: PNG/PGM files → image; .npy of rank 1 → signal, rank 3 → image volumes; 2-D
 * arrays and CSV matrices → distances when every one is square, symmetric with a zero diagonal, else points.
 */
export interface FolderOptions {
  kind?: SampleKind;
  onProgress?: (done: number, total: number) => void;
  /** Receives the note of detectKind when square matrices fail the distance checks (see distancesFallback). */
  onNote?: (message: string) => void;
}

/** Relative tolerance of the distance-matrix checks (common practice, no source). */
export const DISTANCE_TOLERANCE = 1e-9;

/** An array read from one sample file. `lines` gives the CSV line of each row (empty for binary files). */
interface SampleArray {
  shape: number[];
  data: Float64Array;
  lines: Int32Array;
  isImage: boolean;
}

const KNOWN_EXTENSIONS = new Set(['.png', '.pgm', '.npy', '.csv', '.txt']);

/** Reads a headerless-or-headed numeric CSV matrix (every row the same width). */
export function readMatrixCsv(file: string): SampleArray {
  const rows = parseCsv(readTextFile(file), file);
  let start = 0;
  if (rows.length > 0 && rows[0].fields.some((f) => f === '' || !Number.isFinite(Number(f)))) {
    // A first row with any field that is not a number is a header of column names.
    if (rows[0].fields.every((f) => !/^[+-]?(\d|\.\d)/.test(f))) start = 1;
  }
  if (rows.length === 0) throw new UserError('empty file; expected rows of numbers', { file });
  if (rows.length === start)
    throw new UserError('header only, no rows of numbers', { file, line: rows[0].line });
  const cols = rows[start].fields.length;
  const n = rows.length - start;
  const data = new Float64Array(n * cols);
  const lines = new Int32Array(n);
  for (let r = start; r < rows.length; r++) {
    const { fields, line } = rows[r];
    if (fields.length !== cols) {
      throw new UserError(
        `has ${fields.length} fields, the first row has ${cols}; every row needs the same number`,
        {
          file,
          line,
        },
      );
    }
    const i = r - start;
    lines[i] = line;
    for (let c = 0; c < cols; c++) {
      data[i * cols + c] = parseNumberField(fields[c], {
        file,
        line,
        column: start === 1 ? rows[0].fields[c] : String(c + 1),
      });
    }
  }
  return { shape: [n, cols], data, lines, isImage: false };
}

async function readSampleFile(entry: LabelledFile, labelsFile: string): Promise<SampleArray> {
  const extension = extname(entry.file).toLowerCase();
  if (!KNOWN_EXTENSIONS.has(extension)) {
    throw new UserError(
      `'${shown(entry.file)}' has an unknown file type '${shown(extension || '(none)')}'; use .csv, .npy, .png or .pgm`,
      { file: labelsFile, line: entry.line },
    );
  }
  if (extension === '.csv' || extension === '.txt') return readMatrixCsv(entry.path);
  const bytes = readFileSync(entry.path);
  if (extension === '.npy') {
    const array = parseNpy(bytes, entry.path);
    return { ...array, lines: new Int32Array(0), isImage: false };
  }
  const image = extension === '.png' ? await parsePng(bytes, entry.path) : parsePgm(bytes, entry.path);
  return { shape: image.shape, data: image.values, lines: new Int32Array(0), isImage: true };
}

/** The first fault of a square matrix as a distance matrix, or undefined when it is one. */
export function distanceFault(
  size: number,
  m: Float64Array,
  tolerance = DISTANCE_TOLERANCE,
): { row: number; message: string } | undefined {
  let scale = 0;
  for (let i = 0; i < m.length; i++) scale = Math.max(scale, Math.abs(m[i]));
  const tol = tolerance * Math.max(1, scale);
  // Invariant: rows before i passed every check against all columns.
  for (let i = 0; i < size; i++) {
    if (Math.abs(m[i * size + i]) > tol)
      return { row: i, message: `diagonal entry ${i + 1} is ${m[i * size + i]}, not 0` };
    for (let j = 0; j < size; j++) {
      const a = m[i * size + j];
      if (a < -tol) return { row: i, message: `entry (${i + 1}, ${j + 1}) is negative (${a})` };
      if (Math.abs(a - m[j * size + i]) > tol) {
        return {
          row: i,
          message: `not symmetric: entry (${i + 1}, ${j + 1}) is ${a} but (${j + 1}, ${i + 1}) is ${m[j * size + i]}`,
        };
      }
    }
  }
  return undefined;
}

function detectKind(arrays: SampleArray[]): SampleKind {
  if (arrays.every((a) => a.isImage)) return 'image';
  if (arrays.some((a) => a.isImage)) return 'image';
  const ranks = new Set(arrays.map((a) => a.shape.length));
  if (ranks.size === 1 && ranks.has(1)) return 'signal';
  if (ranks.size === 1 && ranks.has(3)) return 'image';
  const square = arrays.every(
    (a) =>
      a.shape.length === 2 && a.shape[0] === a.shape[1] && distanceFault(a.shape[0], a.data) === undefined,
  );
  return square ? 'distances' : 'points';
}

/**
 * Why a folder that looks like distance matrices was read as point clouds, or undefined when it does not look
 * like them. It looks like them when every array is a square 2-D matrix, or when some are valid distance
 * matrices; the note names the first file that is not one and the check it failed. A note rather than an
 * error: n points in n dimensions are a square matrix too, and a legitimate point cloud must stay readable
 * (`--kind distances` turns the fallback into the error, `--kind points` silences it).
 */
export function distancesFallback(
  entries: readonly LabelledFile[],
  arrays: readonly SampleArray[],
): string | undefined {
  const square = (a: SampleArray): boolean =>
    a.shape.length === 2 && a.shape[0] === a.shape[1] && a.shape[0] >= 2;
  let valid = 0;
  let first = -1;
  let reason = '';
  for (let k = 0; k < arrays.length; k++) {
    const a = arrays[k];
    if (!square(a)) {
      if (first < 0) {
        first = k;
        reason = `is ${a.shape.join(' × ')}, not square`;
      }
      continue;
    }
    const fault = distanceFault(a.shape[0], a.data);
    if (fault === undefined) valid++;
    else if (first < 0) {
      first = k;
      const line = a.lines.length > 0 ? ` (line ${a.lines[fault.row]})` : '';
      reason = `${fault.message}${line}`;
    }
  }
  if (first < 0) return undefined;
  const allSquare = arrays.every(square);
  if (!allSquare && valid === 0) return undefined;
  return `note: read as point clouds, not distance matrices: ${shown(entries[first].file)} ${reason}; give --kind distances to be refused with the reason, or --kind points to silence this`;
}

export async function loadFolder(folder: string, options: FolderOptions = {}): Promise<Dataset> {
  const labelsFile = `${folder.replace(/[\\/]+$/, '')}/${LABELS_FILE}`;
  const entries = readLabelsFile(folder);
  const arrays: SampleArray[] = [];
  for (let k = 0; k < entries.length; k++) {
    arrays.push(await readSampleFile(entries[k], labelsFile));
    options.onProgress?.(k + 1, entries.length);
  }
  const kind = options.kind ?? detectKind(arrays);
  if (options.kind === undefined && kind === 'points' && options.onNote) {
    const note = distancesFallback(entries, arrays);
    if (note !== undefined) options.onNote(note);
  }
  const samples: Sample[] = [];
  let dim = -1;
  let rank = -1;
  for (let k = 0; k < entries.length; k++) {
    const e = entries[k];
    const a = arrays[k];
    const file = e.path;
    const shapeText = `(${a.shape.join(', ')})`;
    const base = { id: e.id, label: e.label };
    if (kind === 'points') {
      if (a.shape.length !== 2)
        throw new UserError(
          `a point cloud must be a 2-D array (points × dimensions), this one is ${shapeText}`,
          { file },
        );
      if (a.shape[0] === 0) throw new UserError('has no points; a point cloud needs at least one', { file });
      if (dim === -1) dim = a.shape[1];
      if (a.shape[1] !== dim) {
        throw new UserError(
          `has ${a.shape[1]} dimensions but ${entries[0].file} has ${dim}; give every cloud the same`,
          { file },
        );
      }
      samples.push({ kind, ...base, dim, count: a.shape[0], coords: a.data });
    } else if (kind === 'distances') {
      if (a.shape.length !== 2 || a.shape[0] !== a.shape[1]) {
        throw new UserError(`a distance matrix must be square, this one is ${shapeText}`, { file });
      }
      const fault = distanceFault(a.shape[0], a.data);
      if (fault) {
        const line = a.lines.length > 0 ? a.lines[fault.row] : undefined;
        throw new UserError(
          `${fault.message}; a distance matrix must be symmetric, non-negative, with a zero diagonal`,
          {
            file,
            line,
          },
        );
      }
      samples.push({ kind, ...base, size: a.shape[0], matrix: a.data });
    } else if (kind === 'signal') {
      const flat = a.shape.length === 1 || (a.shape.length === 2 && (a.shape[0] === 1 || a.shape[1] === 1));
      if (!flat)
        throw new UserError(`a signal must be one column or a 1-D array, this one is ${shapeText}`, { file });
      samples.push({ kind, ...base, values: a.data });
    } else if (kind === 'image') {
      if (a.shape.length !== 2 && a.shape.length !== 3) {
        throw new UserError(
          `an image must be 2-D (height × width) or a 3-D volume, this one is ${shapeText}`,
          { file },
        );
      }
      if (rank === -1) rank = a.shape.length;
      if (a.shape.length !== rank) {
        throw new UserError(
          `is ${a.shape.length}-D but ${entries[0].file} is ${rank}-D; do not mix images and volumes`,
          { file },
        );
      }
      samples.push({ kind, ...base, shape: [...a.shape], values: a.data });
    } else {
      throw new UserError(
        `a ${kind} dataset is one CSV file (${kind === 'table' ? 'sample,label,<features>' : 'sample,label,degree,birth,death'}), not a folder; give that file`,
        { file: folder },
      );
    }
  }
  return { kind, source: folder, samples };
}
