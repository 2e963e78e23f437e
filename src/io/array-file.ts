import { existsSync } from 'node:fs';
import { UserError } from '../core/errors.js';
import type { Dataset, Sample, SampleKind } from '../core/sample.js';
import {
  columnsSidecarPath,
  defaultColumnNames,
  readColumnsSidecar,
  readSamplesSidecar,
  samplesSidecarPath,
} from './feature-table.js';
import { readNpy } from './npy.js';

/**
 * A whole dataset in one `.npy` array whose first axis is the sample, with `<base>.samples.csv`
 * (`sample,label`, one row per array row) beside it. Detection by the array's rank (a `kind` forces):
 *   2-D samples × length   → signal; table when `<base>.columns.csv` names the columns
 *   3-D samples × h × w    → image (2-D frames); with kind points: samples × points × dim;
 *                            with kind distances: samples × n × n
 *   4-D samples × d × h × w → image (3-D volumes)
 */
export function loadArrayFile(
  file: string,
  options: { kind?: SampleKind; onProgress?: (done: number, total: number) => void },
): Dataset {
  const array = readNpy(file);
  const { shape, data } = array;
  if (shape.length < 2) {
    throw new UserError(
      `a dataset array needs one row per sample (2-D or more), this one has shape (${shape.join(', ')}); reshape it to samples × values`,
      { file },
    );
  }
  const n = shape[0];
  const { ids, labels } = readSamplesSidecar(samplesSidecarPath(file), n, file);
  const inner = shape.slice(1);
  const stride = inner.reduce((a, b) => a * b, 1);
  const slice = (i: number): Float64Array => data.slice(i * stride, (i + 1) * stride);
  const hasColumns = existsSync(columnsSidecarPath(file));
  const kind: SampleKind = options.kind ?? (shape.length === 2 ? (hasColumns ? 'table' : 'signal') : 'image');
  const wrong = (need: string): never => {
    throw new UserError(`a ${kind} array must be ${need}, this one has shape (${shape.join(', ')})`, {
      file,
    });
  };
  const samples: Sample[] = [];
  let columns: string[] | undefined;
  if (kind === 'signal') {
    if (shape.length !== 2) wrong('2-D (samples × length)');
    for (let i = 0; i < n; i++) samples.push({ kind, id: ids[i], label: labels[i], values: slice(i) });
  } else if (kind === 'table') {
    if (shape.length !== 2) wrong('2-D (samples × features)');
    columns = readColumnsSidecar(columnsSidecarPath(file), shape[1]) ?? defaultColumnNames(shape[1]);
    for (let i = 0; i < n; i++) samples.push({ kind, id: ids[i], label: labels[i], values: slice(i) });
  } else if (kind === 'image') {
    if (shape.length !== 3 && shape.length !== 4)
      wrong('3-D (samples × height × width) or 4-D (samples × depth × height × width)');
    for (let i = 0; i < n; i++)
      samples.push({ kind, id: ids[i], label: labels[i], shape: [...inner], values: slice(i) });
  } else if (kind === 'points') {
    if (shape.length !== 3) wrong('3-D (samples × points × dimensions)');
    for (let i = 0; i < n; i++) {
      samples.push({ kind, id: ids[i], label: labels[i], dim: shape[2], count: shape[1], coords: slice(i) });
    }
  } else if (kind === 'distances') {
    if (shape.length !== 3 || shape[1] !== shape[2]) wrong('3-D (samples × n × n)');
    for (let i = 0; i < n; i++)
      samples.push({ kind, id: ids[i], label: labels[i], size: shape[1], matrix: slice(i) });
  } else {
    throw new UserError(
      'a diagrams dataset is a diagram CSV (sample,label,degree,birth,death), not an array; give that file',
      {
        file,
      },
    );
  }
  options.onProgress?.(n, n);
  return { kind, source: file, samples, ...(columns ? { columns } : {}) };
}
