import { existsSync, readFileSync } from 'node:fs';
import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import type { Provenance } from '../core/version.js';
import { csvField, csvNumber, parseCsv, shown } from './csv.js';
import { formatNpy, readNpy } from './npy.js';
import { writeWithProvenance } from './provenance-file.js';
import { decodeUtf8 } from './utf8.js';

/**
 * A feature table: one row of named numeric features per sample. Written as
 *   csv: `sample,label,<name…>` — read back by `loadDataset` as a `table` dataset;
 *   npy: `<file>.npy` (float64, samples × features) beside `<base>.samples.csv` (`sample,label`, one row per
 *        array row, same order) and `<base>.columns.csv` (`column`, one feature name per line),
 * each with its `<file>.provenance.json`, all written in one atomic step.
 */
export interface FeatureTable {
  ids: readonly string[];
  labels: readonly string[];
  names: readonly string[];
  matrix: Matrix;
}

export type FeatureFormat = 'csv' | 'npy';

/** `features.npy` → `features.samples.csv`: the sample ids and labels of an array file. */
export function samplesSidecarPath(npyPath: string): string {
  return `${npyPath.replace(/\.npy$/i, '')}.samples.csv`;
}

/** `features.npy` → `features.columns.csv`: the column names of an array file. */
export function columnsSidecarPath(npyPath: string): string {
  return `${npyPath.replace(/\.npy$/i, '')}.columns.csv`;
}

function checkTable(table: FeatureTable): void {
  const { ids, labels, names, matrix } = table;
  if (ids.length !== matrix.rows || labels.length !== matrix.rows) {
    throw new Error(`feature table: ${matrix.rows} rows but ${ids.length} ids and ${labels.length} labels`);
  }
  if (names.length !== matrix.cols)
    throw new Error(`feature table: ${matrix.cols} columns but ${names.length} names`);
  if (matrix.data.length !== matrix.rows * matrix.cols)
    throw new Error('feature table: matrix data has the wrong length');
}

/** The CSV text of a feature table. */
export function formatFeatureCsv(table: FeatureTable): string {
  checkTable(table);
  const { ids, labels, names, matrix } = table;
  const parts: string[] = [['sample', 'label', ...names].map(csvField).join(',')];
  const cols = matrix.cols;
  for (let i = 0; i < matrix.rows; i++) {
    let line = `${csvField(ids[i])},${csvField(labels[i])}`;
    // Invariant: line holds row i's id, label and its first j values.
    for (let j = 0; j < cols; j++) line += `,${csvNumber(matrix.data[i * cols + j])}`;
    parts.push(line);
  }
  return parts.join('\n') + '\n';
}

/** The `sample,label` sidecar text for an array file. */
export function formatSamplesCsv(ids: readonly string[], labels: readonly string[]): string {
  const lines = ['sample,label'];
  for (let i = 0; i < ids.length; i++) lines.push(`${csvField(ids[i])},${csvField(labels[i])}`);
  return lines.join('\n') + '\n';
}

/** The `column` sidecar text naming the columns of an array file. */
export function formatColumnsCsv(names: readonly string[]): string {
  return ['column', ...names.map(csvField)].join('\n') + '\n';
}

/**
 * Writes a feature table (CSV, or NPY with its sidecars) and its provenance atomically; returns the paths
 * written, main file first.
 */
export function writeFeatureTable(
  path: string,
  table: FeatureTable,
  provenance: Provenance,
  format: FeatureFormat,
): string[] {
  const [main, ...extra] = featureTableFiles(path, table, format);
  writeWithProvenance(main.path, main.data, provenance, extra);
  return [main.path, ...extra.map((f) => f.path), `${path}.provenance.json`];
}

/** The files of a feature table (main file first, then the NPY sidecars), without the provenance. */
export function featureTableFiles(
  path: string,
  table: FeatureTable,
  format: FeatureFormat,
): Array<{ path: string; data: string | Uint8Array }> {
  checkTable(table);
  if (format === 'csv') return [{ path, data: formatFeatureCsv(table) }];
  return [
    { path, data: formatNpy([table.matrix.rows, table.matrix.cols], table.matrix.data) },
    { path: samplesSidecarPath(path), data: formatSamplesCsv(table.ids, table.labels) },
    { path: columnsSidecarPath(path), data: formatColumnsCsv(table.names) },
  ];
}

/** Reads the `sample,label` sidecar of an array file: one entry per array row. */
export function readSamplesSidecar(
  file: string,
  expectedRows: number,
  arrayFile: string,
): { ids: string[]; labels: string[] } {
  if (!existsSync(file)) {
    throw new UserError(
      `no sample list beside it; write ${file} with the header sample,label and one row per array row`,
      { file: arrayFile },
    );
  }
  const rows = parseCsv(decodeUtf8(readFileSync(file), file), file);
  if (rows.length === 0) throw new UserError('empty file; expected the header sample,label', { file });
  const header = rows[0].fields.map((f) => f.toLowerCase());
  if (header[0] !== 'sample' || header[1] !== 'label' || header.length !== 2) {
    throw new UserError(`the header must be sample,label (got '${shown(rows[0].fields.join(','))}')`, {
      file,
      line: rows[0].line,
    });
  }
  const ids: string[] = [];
  const labels: string[] = [];
  const seen = new Map<string, number>();
  for (let r = 1; r < rows.length; r++) {
    const { fields, line } = rows[r];
    if (fields.length !== 2)
      throw new UserError(`has ${fields.length} fields, expected sample,label`, { file, line });
    if (fields[0] === '') throw new UserError('empty sample id; every row needs one', { file, line });
    const earlier = seen.get(fields[0]);
    if (earlier !== undefined) {
      throw new UserError(
        `sample '${shown(fields[0])}' appears twice (first on line ${earlier}); ids must be unique`,
        { file, line },
      );
    }
    seen.set(fields[0], line);
    ids.push(fields[0]);
    labels.push(fields[1]);
  }
  if (ids.length !== expectedRows) {
    throw new UserError(
      `lists ${ids.length} samples but ${arrayFile} has ${expectedRows} rows; give one row per array row`,
      {
        file,
      },
    );
  }
  return { ids, labels };
}

/** Reads the `column` sidecar, or undefined when there is none. */
export function readColumnsSidecar(file: string, expected: number): string[] | undefined {
  if (!existsSync(file)) return undefined;
  const rows = parseCsv(decodeUtf8(readFileSync(file), file), file);
  if (rows.length === 0 || rows[0].fields[0]?.toLowerCase() !== 'column') {
    throw new UserError("the header must be 'column', then one feature name per line", {
      file,
      line: rows[0]?.line,
    });
  }
  const names = rows.slice(1).map((r) => r.fields[0] ?? '');
  if (names.length !== expected) {
    throw new UserError(
      `names ${names.length} columns but the array has ${expected}; give one name per column`,
      { file },
    );
  }
  return names;
}

/** Reads a feature table written by `writeFeatureTable` in either format. */
export async function readFeatureTable(path: string): Promise<FeatureTable> {
  if (/\.npy$/i.test(path)) {
    const array = readNpy(path);
    if (array.shape.length !== 2) {
      throw new UserError(
        `a feature array must be 2-D (samples × features), this one has shape (${array.shape.join(', ')})`,
        {
          file: path,
        },
      );
    }
    const [rows, cols] = array.shape;
    const { ids, labels } = readSamplesSidecar(samplesSidecarPath(path), rows, path);
    const names = readColumnsSidecar(columnsSidecarPath(path), cols) ?? defaultColumnNames(cols);
    return { ids, labels, names, matrix: { rows, cols, data: array.data } };
  }
  const { loadDataset } = await import('./load.js');
  const dataset = await loadDataset(path, { kind: 'table' });
  const samples = dataset.samples as Array<{ id: string; label: string; values: Float64Array }>;
  const names = dataset.columns ?? [];
  const data = new Float64Array(samples.length * names.length);
  for (let i = 0; i < samples.length; i++) data.set(samples[i].values, i * names.length);
  return {
    ids: samples.map((s) => s.id),
    labels: samples.map((s) => s.label),
    names,
    matrix: { rows: samples.length, cols: names.length, data },
  };
}

export function defaultColumnNames(count: number): string[] {
  return Array.from({ length: count }, (_, i) => `f${i + 1}`);
}
