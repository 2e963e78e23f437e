import type { PointSample, SignalSample, TableSample } from '../core/sample.js';
import { csvField, csvNumber } from './csv.js';

/**
 * Text writers for the CSV sample layouts `loadDataset` reads; each reads back to the same samples.
 * Numbers use the shortest text that reads back to the same double.
 */

/** Points, long layout: `sample,label,x1,…,xd`, one row per point, samples one after another. */
export function formatPointsCsv(samples: readonly PointSample[], names?: readonly string[]): string {
  const dim = samples[0]?.dim ?? 2;
  const columns = names ?? defaultCoordinateNames(dim);
  const parts: string[] = [['sample', 'label', ...columns].map(csvField).join(',')];
  for (const s of samples) {
    if (s.dim !== dim)
      throw new Error(`formatPointsCsv: sample ${s.id} has ${s.dim} dimensions, the first has ${dim}`);
    const prefix = `${csvField(s.id)},${csvField(s.label)}`;
    for (let i = 0; i < s.count; i++) {
      let line = prefix;
      // Invariant: line holds the prefix and the first j coordinates of point i.
      for (let j = 0; j < dim; j++) line += `,${csvNumber(s.coords[i * dim + j])}`;
      parts.push(line);
    }
  }
  return parts.join('\n') + '\n';
}

/** x, y, z for up to three dimensions, then x1 … xd. */
export function defaultCoordinateNames(dim: number): string[] {
  if (dim <= 3) return ['x', 'y', 'z'].slice(0, dim);
  return Array.from({ length: dim }, (_, i) => `x${i + 1}`);
}

/**
 * Signals: `long` is `sample,label,value` with one value per row in time order; `wide` is
 * `sample,label,v1,…,vn`, one row per sample (all signals must then have the same length).
 */
export function formatSignalCsv(samples: readonly SignalSample[], layout: 'long' | 'wide' = 'long'): string {
  if (layout === 'long') {
    const parts: string[] = ['sample,label,value'];
    for (const s of samples) {
      const prefix = `${csvField(s.id)},${csvField(s.label)},`;
      for (let t = 0; t < s.values.length; t++) parts.push(prefix + csvNumber(s.values[t]));
    }
    return parts.join('\n') + '\n';
  }
  const length = samples[0]?.values.length ?? 0;
  const header = ['sample', 'label'];
  for (let t = 1; t <= length; t++) header.push(`v${t}`);
  const parts = [header.join(',')];
  for (const s of samples) {
    if (s.values.length !== length) {
      throw new Error(
        `formatSignalCsv: wide layout needs equal lengths; ${s.id} has ${s.values.length}, not ${length}`,
      );
    }
    parts.push([csvField(s.id), csvField(s.label), ...Array.from(s.values, csvNumber)].join(','));
  }
  return parts.join('\n') + '\n';
}

/** A table: `sample,label,<columns>`, one row per sample. */
export function formatTableCsv(samples: readonly TableSample[], columns: readonly string[]): string {
  const parts: string[] = [['sample', 'label', ...columns].map(csvField).join(',')];
  for (const s of samples) {
    if (s.values.length !== columns.length) {
      throw new Error(`formatTableCsv: ${s.id} has ${s.values.length} values for ${columns.length} columns`);
    }
    parts.push([csvField(s.id), csvField(s.label), ...Array.from(s.values, csvNumber)].join(','));
  }
  return parts.join('\n') + '\n';
}

/** `file,label` rows for a folder dataset. */
export function formatLabelsCsv(rows: ReadonlyArray<{ file: string; label: string }>): string {
  return ['file,label', ...rows.map((r) => `${csvField(r.file)},${csvField(r.label)}`)].join('\n') + '\n';
}
