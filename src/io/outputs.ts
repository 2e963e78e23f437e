import { readFileSync, statSync } from 'node:fs';
import { extname } from 'node:path';
import type { DiagramSet } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Provenance } from '../core/version.js';
import { formatDiagramArrow, formatFeatureArrow, readArrow } from './arrow.js';
import { parseCsv } from './csv.js';
import { formatDiagramCsv, parseDiagramCsv } from './diagram-csv.js';
import { type FeatureTable, featureTableFiles, readFeatureTable } from './feature-table.js';
import { writeWithProvenance } from './provenance-file.js';
import { sealShardContent } from './shard.js';

/**
 * Output formats of the per-sample commands: the writers and readers that `diagrams`, `vectorize` and
 * `merge` share.
 *
 * Diagrams: the diagram CSV (the contract of src/io/diagram-csv.ts) or Arrow. Features: the feature CSV, NPY
 * with its sidecars (src/io/feature-table.ts), or Arrow (src/io/arrow.ts). The format follows the file's
 * extension (`.arrow` → Arrow, `.npy` → NPY, anything else → CSV) unless `--format` names one; a `--format`
 * that contradicts the extension is refused rather than guessed.

 */
export type OutputFormat = 'csv' | 'npy' | 'arrow';

export const OUTPUT_FORMATS: readonly OutputFormat[] = ['csv', 'npy', 'arrow'];

/** The format a file name implies. */
export function formatFromPath(file: string): OutputFormat {
  const ext = extname(file).toLowerCase();
  if (ext === '.arrow') return 'arrow';
  if (ext === '.npy') return 'npy';
  return 'csv';
}

/**
 * The output format from `--format` (when given) and the file name; `allowed` lists what the output kind can
 * be written as (diagrams: csv, arrow).
 */
export function chooseFormat(
  out: string,
  formatOption: string | undefined,
  allowed: readonly OutputFormat[],
): OutputFormat {
  const implied = formatFromPath(out);
  if (formatOption === undefined) {
    if (!allowed.includes(implied)) {
      throw new UserError(
        `cannot write ${implied.toUpperCase()} here; name the output .${allowed.join(' or .')}`,
        { file: out },
      );
    }
    return implied;
  }
  if (!(allowed as readonly string[]).includes(formatOption)) {
    throw new UserError(`--format '${formatOption}' is not known here; choose from ${allowed.join(', ')}`);
  }
  const format = formatOption as OutputFormat;
  const ext = extname(out).toLowerCase();
  const contradicts =
    (format === 'csv' && (ext === '.arrow' || ext === '.npy')) || (format !== 'csv' && implied !== format);
  if (contradicts) {
    throw new UserError(
      `--format ${format} but the file is named ${ext || 'without an extension'}; name it .${format} or drop --format`,
      {
        file: out,
      },
    );
  }
  return format;
}

/** Writes diagram sets with their provenance sidecar (CSV or Arrow), atomically. */
export async function writeDiagramsOutput(
  file: string,
  sets: readonly DiagramSet[],
  provenance: Provenance,
  format: OutputFormat = formatFromPath(file),
): Promise<void> {
  if (format === 'npy')
    throw new UserError('diagrams cannot be written as NPY; name the output .csv or .arrow', { file });
  const data = format === 'arrow' ? await formatDiagramArrow(sets, provenance) : formatDiagramCsv(sets);
  writeWithProvenance(
    file,
    data,
    sealShardContent(provenance, [{ path: file, data }], { rows: pairRows(sets), samples: sets.length }),
  );
}

/** Writes a feature table with its provenance sidecar (CSV, NPY with sidecars, or Arrow), atomically. */
export async function writeFeaturesOutput(
  file: string,
  table: FeatureTable,
  provenance: Provenance,
  format: OutputFormat = formatFromPath(file),
): Promise<void> {
  const files =
    format === 'arrow'
      ? [{ path: file, data: await formatFeatureArrow(table, provenance) }]
      : featureTableFiles(file, table, format);
  const counts = { rows: table.matrix.rows, samples: table.matrix.rows };
  writeWithProvenance(file, files[0].data, sealShardContent(provenance, files, counts), files.slice(1));
}

/** A shard or output file to read must exist and be a file. */
export function checkInputFile(file: string): void {
  let stat: ReturnType<typeof statSync>;
  try {
    stat = statSync(file);
  } catch {
    throw new UserError('file not found; check the path', { file });
  }
  if (!stat.isFile()) throw new UserError('is a folder, not a file; give a shard output file', { file });
}

/** Reads diagram sets from a diagram CSV (a header-only file is an empty shard) or an Arrow file. */
export async function readDiagramsOutput(file: string): Promise<DiagramSet[]> {
  checkInputFile(file);
  if (formatFromPath(file) === 'arrow') {
    const content = await readArrow(file);
    if (content.kind !== 'diagrams') throw new UserError('holds a feature table, not diagrams', { file });
    return content.sets;
  }
  if (formatFromPath(file) === 'npy')
    throw new UserError('is an NPY array, not diagrams; give diagram CSV or Arrow files', { file });
  const text = readFileSync(file, 'utf8');
  const rows = parseCsv(text, file);
  if (rows.length === 1) return [];
  return parseDiagramCsv(text, file);
}

/** Reads a feature table from CSV (a header-only file is an empty shard), NPY with sidecars, or Arrow. */
export async function readFeaturesOutput(file: string): Promise<FeatureTable> {
  checkInputFile(file);
  const format = formatFromPath(file);
  if (format === 'arrow') {
    const content = await readArrow(file);
    if (content.kind !== 'table') throw new UserError('holds diagrams, not a feature table', { file });
    return content.table;
  }
  if (format === 'csv') {
    const rows = parseCsv(readFileSync(file, 'utf8'), file);
    if (rows.length === 1) {
      const names = rows[0].fields.slice(2);
      return {
        ids: [],
        labels: [],
        names,
        matrix: { rows: 0, cols: names.length, data: new Float64Array(0) },
      };
    }
  }
  return readFeatureTable(file);
}

/** Persistence pairs over all diagrams of all samples: the row count of a diagram output. */
export function pairRows(sets: readonly DiagramSet[]): number {
  let rows = 0;
  for (const set of sets) for (const d of set.diagrams) rows += d.births.length;
  return rows;
}
