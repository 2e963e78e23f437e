import { readFileSync } from 'node:fs';
import type { DiagramSet } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Dataset, DiagramSample, TableSample } from '../core/sample.js';
import type { Provenance } from '../core/version.js';
import {
  DiagramCollector,
  diagramsInFileOrder,
  FILTRATION_COLUMN,
  hasFiltrationTags,
} from './diagram-csv.js';
import type { FeatureTable } from './feature-table.js';
import { writeWithProvenance } from './provenance-file.js';

/**
 * Apache Arrow IPC files (the "file" format: magic `ARROW1`, schema, record batches, footer), which Python
 * (pyarrow), R (arrow) and Spark read directly. Two layouts:
 *
 *   diagrams: one row per persistence pair — sample: utf8, label: utf8, [filtration: utf8,] degree: int32,
 *             birth: float64, death: float64 (+Infinity for an essential class); rows in the order of the
 *             diagram CSV (samples in order, then `diagramsInFileOrder`, pairs in stored order). The
 *             filtration column is there only when diagrams carry filtration tags ('' = untagged).
 *   table:    one row per sample — sample: utf8, label: utf8, then one float64 column per feature name.
 *
 * No column is nullable. The schema's custom metadata carries `landform.kind` (`diagrams` or `table`) and
 * `landform.provenance` (the same JSON as the sidecar `<file>.provenance.json`, which is written too).
 * `apache-arrow` is loaded with `await import` only when a file is written or read.
 */

export const ARROW_KIND_KEY = 'landform.kind';
export const ARROW_PROVENANCE_KEY = 'landform.provenance';

type ArrowModule = typeof import('apache-arrow');

async function arrow(): Promise<ArrowModule> {
  return import('apache-arrow');
}

function metadata(kind: 'diagrams' | 'table', provenance: Provenance | undefined): Map<string, string> {
  const m = new Map<string, string>([[ARROW_KIND_KEY, kind]]);
  if (provenance !== undefined) m.set(ARROW_PROVENANCE_KEY, JSON.stringify(provenance));
  return m;
}

function ipcFile(
  A: ArrowModule,
  columns: Array<{ name: string; type: import('apache-arrow').DataType; data: import('apache-arrow').Data }>,
  rows: number,
  meta: Map<string, string>,
): Uint8Array {
  const fields = columns.map((c) => new A.Field(c.name, c.type, false));
  const schema = new A.Schema(fields, meta);
  const data = A.makeData({
    type: new A.Struct(fields),
    length: rows,
    nullCount: 0,
    children: columns.map((c) => c.data),
  });
  return A.tableToIPC(new A.Table(schema, [new A.RecordBatch(schema, data)]), 'file');
}

/** A utf8 column as one Data (offsets + bytes), so the file is always a single record batch. */
function utf8(A: ArrowModule, values: readonly string[]): import('apache-arrow').Data {
  const encoded = values.map((v) => Buffer.from(v, 'utf8'));
  const offsets = new Int32Array(values.length + 1);
  // Invariant: offsets[i] is the byte length of values[0..i) encoded as UTF-8.
  for (let i = 0; i < encoded.length; i++) offsets[i + 1] = offsets[i] + encoded[i].length;
  const bytes = new Uint8Array(offsets[values.length]);
  for (let i = 0; i < encoded.length; i++) bytes.set(encoded[i], offsets[i]);
  return A.makeData({
    type: new A.Utf8(),
    length: values.length,
    nullCount: 0,
    valueOffsets: offsets,
    data: bytes,
  });
}

/** The Arrow IPC bytes of diagram sets (the diagrams layout above). */
export async function formatDiagramArrow(
  sets: readonly DiagramSet[],
  provenance?: Provenance,
): Promise<Uint8Array> {
  const A = await arrow();
  let rows = 0;
  for (const set of sets) for (const d of set.diagrams) rows += d.births.length;
  const tagged = hasFiltrationTags(sets);
  const samples: string[] = new Array(rows);
  const labels: string[] = new Array(rows);
  const tags: string[] = tagged ? new Array(rows) : [];
  const degree = new Int32Array(rows);
  const birth = new Float64Array(rows);
  const death = new Float64Array(rows);
  let r = 0;
  // Invariant: rows [0, r) hold the pairs of the sets and diagrams already visited, in CSV order.
  for (const set of sets) {
    for (const d of diagramsInFileOrder(set)) {
      for (let i = 0; i < d.births.length; i++, r++) {
        samples[r] = set.sample;
        labels[r] = set.label;
        if (tagged) tags[r] = d.filtration ?? '';
        degree[r] = d.degree;
        birth[r] = d.births[i];
        death[r] = d.deaths[i];
      }
    }
  }
  return ipcFile(
    A,
    [
      { name: 'sample', type: new A.Utf8(), data: utf8(A, samples) },
      { name: 'label', type: new A.Utf8(), data: utf8(A, labels) },
      ...(tagged ? [{ name: FILTRATION_COLUMN, type: new A.Utf8(), data: utf8(A, tags) }] : []),
      { name: 'degree', type: new A.Int32(), data: A.makeVector(degree).data[0] },
      { name: 'birth', type: new A.Float64(), data: A.makeVector(birth).data[0] },
      { name: 'death', type: new A.Float64(), data: A.makeVector(death).data[0] },
    ],
    rows,
    metadata('diagrams', provenance),
  );
}

/** The Arrow IPC bytes of a feature table (the table layout above). */
export async function formatFeatureArrow(table: FeatureTable, provenance?: Provenance): Promise<Uint8Array> {
  const A = await arrow();
  const { rows, cols, data } = table.matrix;
  if (table.ids.length !== rows || table.labels.length !== rows || table.names.length !== cols) {
    throw new Error(
      `formatFeatureArrow: ${table.ids.length} ids, ${table.labels.length} labels, ${table.names.length} names for a ${rows}×${cols} matrix`,
    );
  }
  const columns = [
    { name: 'sample', type: new A.Utf8() as import('apache-arrow').DataType, data: utf8(A, table.ids) },
    { name: 'label', type: new A.Utf8() as import('apache-arrow').DataType, data: utf8(A, table.labels) },
  ];
  for (let j = 0; j < cols; j++) {
    const column = new Float64Array(rows);
    // Invariant: column[0..i) holds matrix entries (0..i, j) of the row-major matrix.
    for (let i = 0; i < rows; i++) column[i] = data[i * cols + j];
    columns.push({ name: table.names[j], type: new A.Float64(), data: A.makeVector(column).data[0] });
  }
  return ipcFile(A, columns, rows, metadata('table', provenance));
}

/** Writes diagram sets as an Arrow file with its provenance sidecar, in one atomic step. */
export async function writeDiagramArrow(
  file: string,
  sets: readonly DiagramSet[],
  provenance: Provenance,
): Promise<void> {
  writeWithProvenance(file, await formatDiagramArrow(sets, provenance), provenance);
}

/** Writes a feature table as an Arrow file with its provenance sidecar, in one atomic step. */
export async function writeFeatureArrow(
  file: string,
  table: FeatureTable,
  provenance: Provenance,
): Promise<void> {
  writeWithProvenance(file, await formatFeatureArrow(table, provenance), provenance);
}

/** What an Arrow file written by landform holds. */
export type ArrowContent =
  | { kind: 'diagrams'; sets: DiagramSet[]; provenance?: Provenance }
  | { kind: 'table'; table: FeatureTable; provenance?: Provenance };

function readBytes(file: string): Uint8Array {
  try {
    return new Uint8Array(readFileSync(file));
  } catch (error) {
    const code = (error as { code?: string }).code;
    if (code === 'EISDIR') throw new UserError('is a folder, not a file; give a file', { file });
    throw new UserError('file not found; check the path', { file });
  }
}

/** Reads an Arrow IPC file in either layout; anything else gets a one-line error naming the file. */
export async function parseArrow(bytes: Uint8Array, file: string): Promise<ArrowContent> {
  const A = await arrow();
  let table: import('apache-arrow').Table;
  try {
    table = A.tableFromIPC(bytes);
  } catch (error) {
    throw new UserError(
      `not a readable Arrow IPC file (${String((error as Error).message ?? error).split('\n')[0]})`,
      { file },
    );
  }
  const meta = table.schema.metadata;
  let provenance: Provenance | undefined;
  const provenanceText = meta.get(ARROW_PROVENANCE_KEY);
  if (provenanceText !== undefined) {
    try {
      provenance = JSON.parse(provenanceText) as Provenance;
    } catch {
      throw new UserError(`its ${ARROW_PROVENANCE_KEY} metadata is not valid JSON; recompute the file`, {
        file,
      });
    }
  }
  const names = table.schema.fields.map((f) => f.name);
  const kind =
    meta.get(ARROW_KIND_KEY) ??
    (['degree', 'birth', 'death'].every((n) => names.includes(n)) ? 'diagrams' : 'table');
  const text = (name: string): string[] => {
    const column = table.getChild(name);
    if (column === null)
      throw new UserError(`has no column '${name}'; an Arrow ${kind} file needs it`, { file });
    const out: string[] = new Array(table.numRows);
    let i = 0;
    for (const v of column) out[i++] = v === null || v === undefined ? '' : String(v);
    return out;
  };
  const numbers = (name: string): Float64Array => {
    const column = table.getChild(name);
    if (column === null)
      throw new UserError(`has no column '${name}'; an Arrow ${kind} file needs it`, { file });
    const out = new Float64Array(table.numRows);
    let i = 0;
    for (const v of column) out[i++] = v === null || v === undefined ? Number.NaN : Number(v);
    return out;
  };
  const sample = text('sample');
  const label = text('label');
  if (kind === 'diagrams') {
    const degree = numbers('degree');
    const birth = numbers('birth');
    const death = numbers('death');
    const tags = names.includes(FILTRATION_COLUMN) ? text(FILTRATION_COLUMN) : undefined;
    const collector = new DiagramCollector();
    for (let r = 0; r < table.numRows; r++) {
      if (!(death[r] >= birth[r]) || !Number.isFinite(birth[r])) {
        throw new UserError(`row ${r}: pair (${birth[r]}, ${death[r]}) is not a valid persistence pair`, {
          file,
        });
      }
      const tag = tags === undefined || tags[r] === '' ? undefined : tags[r];
      collector.add(sample[r], collector.labelOf(sample[r]) ?? label[r], tag, degree[r], birth[r], death[r]);
    }
    const sets = collector.finish();
    return { kind: 'diagrams', sets, provenance };
  }
  const featureNames = names.filter((n) => n !== 'sample' && n !== 'label');
  const rows = table.numRows;
  const cols = featureNames.length;
  const data = new Float64Array(rows * cols);
  featureNames.forEach((name, j) => {
    const column = numbers(name);
    for (let i = 0; i < rows; i++) data[i * cols + j] = column[i];
  });
  return {
    kind: 'table',
    table: { ids: sample, labels: label, names: featureNames, matrix: { rows, cols, data } },
    provenance,
  };
}

export async function readArrow(file: string): Promise<ArrowContent> {
  return parseArrow(readBytes(file), file);
}

/** Reads the diagram sets of an Arrow file, or the one-line error when it holds a feature table. */
export async function readDiagramArrow(file: string): Promise<DiagramSet[]> {
  const content = await readArrow(file);
  if (content.kind !== 'diagrams')
    throw new UserError('holds a feature table, not diagrams; give a diagrams file', { file });
  return content.sets;
}

/** Reads the feature table of an Arrow file, or the one-line error when it holds diagrams. */
export async function readFeatureArrow(file: string): Promise<FeatureTable> {
  const content = await readArrow(file);
  if (content.kind !== 'table')
    throw new UserError('holds diagrams, not a feature table; give a feature file', { file });
  return content.table;
}

/**
 * An Arrow file as a dataset, for the loader: a diagrams file becomes a `diagrams` dataset, a feature table a
 * `table` dataset (columns = feature names), so `evaluate` and `train` can read Arrow outputs directly.
 */
export async function loadArrowDataset(file: string): Promise<Dataset> {
  const content = await readArrow(file);
  if (content.kind === 'diagrams') {
    return {
      kind: 'diagrams',
      source: file,
      samples: content.sets.map(
        (s): DiagramSample => ({ kind: 'diagrams', id: s.sample, label: s.label, diagrams: s.diagrams }),
      ),
    };
  }
  const { ids, labels, names, matrix } = content.table;
  const seen = new Set<string>();
  const samples = ids.map((id, i): TableSample => {
    if (seen.has(id))
      throw new UserError(`sample '${id}' appears on two rows; a feature table has one row per sample`, {
        file,
      });
    seen.add(id);
    return {
      kind: 'table',
      id,
      label: labels[i],
      values: matrix.data.slice(i * matrix.cols, (i + 1) * matrix.cols),
    };
  });
  return { kind: 'table', source: file, columns: [...names], samples };
}
