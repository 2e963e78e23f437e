import { statSync } from 'node:fs';
import { extname } from 'node:path';
import { UserError } from '../core/errors.js';
import type {
  Dataset,
  DiagramSample,
  ImageSample,
  PointSample,
  Sample,
  SampleKind,
  SignalSample,
  TableSample,
} from '../core/sample.js';
import { SAMPLE_KINDS } from '../core/sample.js';
import { loadArrayFile } from './array-file.js';
import { readTextFile, shown } from './csv.js';
import { DIAGRAM_CSV_HEADER, parseDiagramCsv } from './diagram-csv.js';
import { readCsvHeader, readSampleCsv, type SampleCsv } from './sample-csv.js';

/**
 * The one dataset loader every command uses.
 *
 * Kind detection for a CSV file (the first matching rule wins; `kind` forces a kind instead):
 *   1. the header holds `sample,label,degree,birth,death`      → diagrams
 *   2. the header is `sample,label,value`                       → signal (long: one value per row, rows in time order)
 *   3. `sample,label,<one or more numeric columns>`:
 *        some sample id appears on more than one row            → points (one point per row)
 *        every sample id appears once                           → table (one feature row per sample)
 * A wide signal CSV (`sample,label,v1,v2,…`, one row per sample) is read with `kind: 'signal'`; a point
 * cloud file where every cloud has a single point needs `kind: 'points'`. An image table (`sample,label`, then
 * the pixels row-major, one image per row) is read with `shape` (and `kind: 'image'`, which `shape` implies). A folder goes to `folder.ts`, a
 * `.npy` array to `array-file.ts`, an Arrow file (`.arrow`, `.feather`) to `arrow.ts`.
 */
export interface LoadOptions {
  /** Force the sample kind instead of detecting it. */
  kind?: SampleKind;
  /** Reports progress as (done, total), in bytes for files and in files for folders. */
  onProgress?: (done: number, total: number) => void;
  /** The shape of every image of an image table CSV: [rows, columns] or [depth, rows, columns]. */
  shape?: number[];
  /** Receives one-line notes on choices made while reading (a folder of square matrices read as points). */
  onNote?: (message: string) => void;
}

/** `28x28` or `DxHxW` (each a whole number ≥ 1) → the shape; a UserError otherwise. */
export function parseShape(text: string, option = '--shape'): number[] {
  const t = text.trim();
  if (!/^\d+(x\d+){1,2}$/i.test(t)) {
    throw new UserError(
      `${option} '${shown(text)}' must look like ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS, e.g. 28x28 or 16x32x32`,
    );
  }
  const shape = t.toLowerCase().split('x').map(Number);
  if (shape.some((n) => n < 1 || n > 1_000_000))
    throw new UserError(`${option} '${shown(text)}': every size must be from 1 to 1000000`);
  return shape;
}

/** Checks a `--kind` value. */
export function parseKind(text: string, option = '--kind'): SampleKind {
  if (!(SAMPLE_KINDS as readonly string[]).includes(text)) {
    throw new UserError(`${option} '${shown(text)}' is not known; choose from ${SAMPLE_KINDS.join(', ')}`);
  }
  return text as SampleKind;
}

export async function loadDataset(path: string, options: LoadOptions = {}): Promise<Dataset> {
  if (options.kind !== undefined) parseKind(options.kind, 'kind');
  let isFolder: boolean;
  try {
    const stat = statSync(path);
    isFolder = stat.isDirectory();
  } catch {
    throw new UserError('file not found; check the path', { file: path });
  }
  if (isFolder) {
    const { loadFolder } = await import('./folder.js');
    return loadFolder(path, options);
  }
  const extension = extname(path).toLowerCase();
  if (options.shape !== undefined && (isFolder || ['.npy', '.arrow', '.feather'].includes(extension))) {
    throw new UserError(
      '--shape applies to an image table CSV; a folder or array carries its own shapes — drop --shape',
      { file: path },
    );
  }
  if (extension === '.npy') return loadArrayFile(path, options);
  if (extension === '.arrow' || extension === '.feather') {
    // Arrow IPC files (diagrams or a feature table) carry their kind in the schema (src/io/arrow.ts).
    const { loadArrowDataset } = await import('./arrow.js');
    const dataset = await loadArrowDataset(path);
    if (options.kind !== undefined && options.kind !== dataset.kind) {
      throw new UserError(
        `is an Arrow ${dataset.kind} file, not ${options.kind}; drop --kind or give another file`,
        {
          file: path,
        },
      );
    }
    options.onProgress?.(1, 1);
    return dataset;
  }
  return loadCsvFile(path, options);
}

/** The kind a CSV header points to before the rows are read, or undefined when the rows must decide. */
export function kindFromHeader(header: readonly string[]): 'diagrams' | 'signal' | undefined {
  const lower = header.map((h) => h.trim().toLowerCase());
  if (DIAGRAM_CSV_HEADER.every((name) => lower.includes(name))) return 'diagrams';
  if (lower.length === 3 && lower[0] === 'sample' && lower[1] === 'label' && lower[2] === 'value')
    return 'signal';
  return undefined;
}

async function loadCsvFile(file: string, options: LoadOptions): Promise<Dataset> {
  const first = await readCsvHeader(file);
  if (first === undefined) {
    throw new UserError('empty file; expected a header such as sample,label,x,y and one row per value', {
      file,
    });
  }
  const detected = kindFromHeader(first.fields);
  const kind = options.kind ?? (options.shape !== undefined ? 'image' : detected);
  if (kind === 'diagrams') return loadDiagramCsv(file, options);
  if (kind === 'distances') {
    throw new UserError(
      'a distances dataset is a folder of per-sample files with labels.csv, not one CSV; give the folder',
      { file },
    );
  }
  if (options.shape !== undefined && kind !== 'image') {
    throw new UserError(
      `--shape applies to image tables, but the kind is ${kind}; drop --shape or use --kind image`,
      {
        file,
      },
    );
  }
  if (kind === 'image' && options.shape === undefined) {
    throw new UserError(
      'an image CSV holds one image per row (sample,label, then the pixels row by row); give its shape with --shape ROWSxCOLUMNS (e.g. 28x28), or give a folder of per-sample files with labels.csv',
      { file },
    );
  }
  if (kind === 'image')
    checkImageHeader(first.fields.length - 2, options.shape as number[], file, first.line);
  const csv = await readSampleCsv(file, { onProgress: options.onProgress });
  if (kind === 'image') return imagesFromCsv(csv, options.shape as number[]);
  const chosen: SampleKind = kind ?? (csv.samples.some((s) => s.rows > 1) ? 'points' : 'table');
  switch (chosen) {
    case 'points':
      return pointsFromCsv(csv);
    case 'table':
      return tableFromCsv(csv);
    case 'signal':
      return signalFromCsv(csv);
    default:
      throw new Error(`unreachable kind ${chosen}`);
  }
}

function loadDiagramCsv(file: string, options: LoadOptions): Dataset<DiagramSample> {
  const text = readTextFile(file);
  options.onProgress?.(text.length, text.length);
  const sets = parseDiagramCsv(text, file);
  return {
    kind: 'diagrams',
    source: file,
    samples: sets.map((s) => ({ kind: 'diagrams', id: s.sample, label: s.label, diagrams: s.diagrams })),
  };
}

function pointsFromCsv(csv: SampleCsv): Dataset<PointSample> {
  const dim = csv.columns.length;
  return {
    kind: 'points',
    source: csv.file,
    samples: csv.samples.map((s) => ({
      kind: 'points',
      id: s.id,
      label: s.label,
      dim,
      count: s.rows,
      coords: s.values,
    })),
  };
}

function tableFromCsv(csv: SampleCsv): Dataset<TableSample> {
  for (const s of csv.samples) {
    if (s.rows > 1) {
      throw new UserError(
        `sample '${shown(s.id)}' appears again (first on line ${s.firstLine}); a table has one row per sample — use --kind points for point clouds`,
        { file: csv.file, line: s.secondLine },
      );
    }
  }
  return {
    kind: 'table',
    source: csv.file,
    columns: csv.columns,
    samples: csv.samples.map((s) => ({ kind: 'table', id: s.id, label: s.label, values: s.values })),
  };
}

/** Refuses an image table header whose pixel columns do not match the shape (before the rows are read). */
function checkImageHeader(columns: number, shape: number[], file: string, line: number): void {
  const pixels = shape.reduce((a, b) => a * b, 1);
  if (columns !== pixels) {
    throw new UserError(
      `has ${columns} pixel columns after sample,label, but --shape ${shape.join('x')} needs ${pixels}; check --shape or the header`,
      { file, line },
    );
  }
}

/**
 * An image table: one image per row, its pixels row-major after `sample,label` (for a volume, plane after
 * plane). The header must have exactly the shape's pixel count of value columns; a row with another count is
 * refused by the reader with its line.
 */
function imagesFromCsv(csv: SampleCsv, shape: number[]): Dataset<ImageSample> {
  for (const s of csv.samples) {
    if (s.rows > 1) {
      throw new UserError(
        `sample '${shown(s.id)}' appears again (first on line ${s.firstLine}); an image table has one row per image`,
        { file: csv.file, line: s.secondLine },
      );
    }
  }
  return {
    kind: 'image',
    source: csv.file,
    samples: csv.samples.map((s) => ({
      kind: 'image',
      id: s.id,
      label: s.label,
      shape: [...shape],
      values: s.values,
    })),
  };
}

function signalFromCsv(csv: SampleCsv): Dataset<SignalSample> {
  if (csv.columns.length > 1) {
    // Wide layout: one row per sample, the value columns in time order.
    for (const s of csv.samples) {
      if (s.rows > 1) {
        throw new UserError(
          `sample '${shown(s.id)}' appears again (first on line ${s.firstLine}); a wide signal CSV has one row per sample — for one value per row use the header sample,label,value`,
          { file: csv.file, line: s.secondLine },
        );
      }
    }
  }
  return {
    kind: 'signal',
    source: csv.file,
    samples: csv.samples.map((s) => ({ kind: 'signal', id: s.id, label: s.label, values: s.values })),
  };
}

/** Narrows a dataset to one kind, or throws the user error saying which kind the command needs. */
export function expectKind<K extends SampleKind>(
  dataset: Dataset,
  kinds: readonly K[],
  what = 'this command',
): Dataset<Extract<Sample, { kind: K }>> {
  if (!(kinds as readonly SampleKind[]).includes(dataset.kind)) {
    throw new UserError(
      `is a ${dataset.kind} dataset, but ${what} needs ${kinds.join(' or ')}; check the file or force the kind with --kind`,
      { file: dataset.source },
    );
  }
  return dataset as Dataset<Extract<Sample, { kind: K }>>;
}
