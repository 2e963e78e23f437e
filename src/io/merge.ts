import { existsSync, realpathSync } from 'node:fs';
import { basename, resolve } from 'node:path';
import type { DiagramSet } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Provenance } from '../core/version.js';
import type { FeatureTable } from './feature-table.js';
import {
  checkInputFile,
  chooseFormat,
  type OutputFormat,
  pairRows,
  readDiagramsOutput,
  readFeaturesOutput,
  writeDiagramsOutput,
  writeFeaturesOutput,
} from './outputs.js';
import { provenancePath, readProvenance } from './provenance-file.js';
import {
  canonicalJson,
  PER_SAMPLE_OPTION_KEYS,
  type ShardedProvenance,
  type ShardRecord,
  shardContentFault,
  sharedProvenance,
} from './shard.js';

/**
 * Merging shards: `mergeShards` reads the shard outputs with their provenance sidecars, checks that they are
 * complete (shards 1..N each present), given once, disjoint (no sample in two shards, every sample of the
 * dataset in one), made from the same data and with the same command, version and options, then writes the
 * samples in their dataset order through the same writer an unsharded run uses (src/io/outputs.ts) — so the
 * merged file, and its sidecar, equal the unsharded run's byte for byte.
 */
/** What `mergeShards` did. */
export interface MergeSummary {
  out: string;
  format: OutputFormat;
  output: 'diagrams' | 'table';
  shards: number;
  samples: number;
}

interface ShardInput {
  file: string;
  provenance: ShardedProvenance;
  record: ShardRecord;
}

/** The first place where two JSON values differ, as `path: a vs b`, for the mismatch message. */
function firstDifference(a: unknown, b: unknown, path = ''): string | undefined {
  if (canonicalJson(a) === canonicalJson(b)) return undefined;
  const isObject = (v: unknown): v is Record<string, unknown> =>
    v !== null && typeof v === 'object' && !Array.isArray(v);
  if (isObject(a) && isObject(b)) {
    for (const key of [...new Set([...Object.keys(a), ...Object.keys(b)])].sort()) {
      const found = firstDifference(a[key], b[key], path === '' ? key : `${path}.${key}`);
      if (found !== undefined) return found;
    }
  }
  const show = (v: unknown): string => (v === undefined ? 'unset' : JSON.stringify(v));
  return `${path || 'provenance'} is ${show(a)} here but ${show(b)}`;
}

function listShards(indexes: number[], count: number): string {
  const shown = indexes.slice(0, 8).map((i) => `${i}/${count}`);
  return shown.join(', ') + (indexes.length > 8 ? ` and ${indexes.length - 8} more` : '');
}

function readShardInputs(files: readonly string[], out: string): ShardInput[] {
  if (files.length === 0)
    throw new UserError('no shard outputs given; list the files the --shard runs wrote');
  const outPath = resolve(out);
  const inputs: ShardInput[] = [];
  for (const file of files) {
    checkInputFile(file);
    if (realpathSync(file) === outPath || resolve(file) === outPath) {
      throw new UserError('--out names one of the shard files; write the merged file under another name', {
        file,
      });
    }
    if (!existsSync(provenancePath(file))) {
      throw new UserError(
        `has no provenance sidecar (${basename(provenancePath(file))}); merge needs each shard's output as landform wrote it — rerun that shard`,
        { file },
      );
    }
    const provenance = readProvenance(file) as ShardedProvenance;
    const record = provenance?.shard;
    if (record === undefined || typeof record.index !== 'number' || !Array.isArray(record.ordinals)) {
      throw new UserError(
        'was not written by a sharded run (its provenance has no shard record); give only outputs of --shard runs',
        {
          file,
        },
      );
    }
    const fault = shardContentFault(file, record);
    if (fault !== undefined) throw new UserError(fault, { file });
    inputs.push({ file, provenance, record });
  }
  return inputs;
}

/** The checks of completeness, uniqueness, disjointness and sameness; throws the first failure as one line. */
function checkShards(inputs: ShardInput[]): void {
  const first = inputs[0];
  const count = first.record.count;
  const shared = canonicalJson(sharedProvenance(first.provenance));
  const byIndex = new Map<number, string>();
  for (const input of inputs) {
    const { record, file } = input;
    if (record.count !== count) {
      throw new UserError(
        `is shard ${record.index}/${record.count} but ${first.file} is of ${count} shards; merge shards of one run`,
        {
          file,
        },
      );
    }
    const earlier = byIndex.get(record.index);
    if (earlier !== undefined) {
      throw new UserError(`is shard ${record.index}/${count} again (also ${earlier}); give each shard once`, {
        file,
      });
    }
    byIndex.set(record.index, file);
    if (record.output !== first.record.output) {
      throw new UserError(
        `holds ${record.output} but ${first.file} holds ${first.record.output}; merge outputs of one command`,
        { file },
      );
    }
    if (canonicalJson(sharedProvenance(input.provenance)) !== shared) {
      const where = firstDifference(sharedProvenance(input.provenance), sharedProvenance(first.provenance));
      throw new UserError(
        `was made with different settings from ${first.file} (${where} there); rerun this shard with the same command and options`,
        { file },
      );
    }
    if (record.settings !== first.record.settings) {
      throw new UserError(
        `was made with different settings from ${first.file}; rerun this shard with the same command and options`,
        { file },
      );
    }
    if (
      record.total !== first.record.total ||
      record.dataset !== first.record.dataset ||
      record.assignment !== first.record.assignment
    ) {
      throw new UserError(
        `was made from different data than ${first.file} (dataset of ${record.total} vs ${first.record.total} samples, or changed content); rerun every shard on the same dataset`,
        { file },
      );
    }
    if (record.ids.length !== record.ordinals.length) {
      throw new UserError(
        'its shard record is damaged (ids and ordinals differ in length); rerun this shard',
        {
          file: provenancePath(file),
        },
      );
    }
  }
  const missing: number[] = [];
  for (let i = 1; i <= count; i++) if (!byIndex.has(i)) missing.push(i);
  if (missing.length > 0) {
    throw new UserError(
      `${missing.length === 1 ? 'shard' : 'shards'} ${listShards(missing, count)} ${missing.length === 1 ? 'is' : 'are'} missing (got ${inputs.length} of ${count}); run ${missing.length === 1 ? 'it' : 'them'} with --shard ${missing[0]}/${count}${missing.length > 1 ? ' …' : ''} and merge again`,
    );
  }
  const total = first.record.total;
  const owner = new Array<string | undefined>(total);
  const ownerOfId = new Map<string, string>();
  for (const { record, file } of inputs) {
    for (let k = 0; k < record.ordinals.length; k++) {
      const ordinal = record.ordinals[k];
      const id = record.ids[k];
      const other = ownerOfId.get(id) ?? (ordinal >= 0 && ordinal < total ? owner[ordinal] : undefined);
      if (other !== undefined) {
        throw new UserError(
          `sample '${id}' is also in ${other}; shards must not overlap — rerun both with the same shard count`,
          { file },
        );
      }
      if (!Number.isInteger(ordinal) || ordinal < 0 || ordinal >= total) {
        throw new UserError(
          `its shard record names position ${ordinal} in a dataset of ${total}; rerun this shard`,
          {
            file: provenancePath(file),
          },
        );
      }
      owner[ordinal] = file;
      ownerOfId.set(id, file);
    }
  }
  let absent = 0;
  for (let i = 0; i < total; i++) if (owner[i] === undefined) absent++;
  if (absent > 0) {
    throw new UserError(
      `${absent} of ${total} samples are in no shard; rerun every shard with the same dataset and shard count`,
    );
  }
}

/**
 * Merges shard outputs into `out` (format from its extension or `format`). Throws a one-line UserError when
 * the shards are incomplete, repeated, overlapping, from different data, or made with different settings.
 */
export async function mergeShards(
  files: readonly string[],
  out: string,
  options: { format?: string; onProgress?: (done: number, total: number) => void } = {},
): Promise<MergeSummary> {
  const inputs = readShardInputs(files, out);
  checkShards(inputs);
  const first = inputs[0];
  const output = first.record.output;
  const format = chooseFormat(
    out,
    options.format,
    output === 'diagrams' ? ['csv', 'arrow'] : ['csv', 'npy', 'arrow'],
  );
  const total = first.record.total;
  const { shard: _shard, ...rest } = first.provenance;
  const merged: Provenance = { ...rest, options: combineOptions(inputs) };
  const ordinalOf = (input: ShardInput): Map<string, number> => {
    const m = new Map<string, number>();
    input.record.ids.forEach((id, k) => {
      m.set(id, input.record.ordinals[k]);
    });
    return m;
  };

  if (output === 'diagrams') {
    const slots = new Array<DiagramSet | undefined>(total);
    let done = 0;
    for (const input of inputs) {
      const ordinals = ordinalOf(input);
      const read = await readDiagramsOutput(input.file);
      checkCounts(input, read.length, pairRows(read));
      for (const set of read) {
        const ordinal = ordinals.get(set.sample);
        if (ordinal === undefined) {
          throw new UserError(
            `holds sample '${set.sample}', which its shard record does not list; rerun this shard`,
            { file: input.file },
          );
        }
        slots[ordinal] = set;
      }
      options.onProgress?.(++done, inputs.length);
    }
    // A sample with no pairs has no rows; it is absent from the shard file and from the unsharded file alike.
    const sets = slots.filter((s): s is DiagramSet => s !== undefined);
    await writeDiagramsOutput(out, sets, merged, format);
    return { out, format, output, shards: inputs.length, samples: total };
  }

  let names: readonly string[] | undefined;
  let namesFrom = '';
  const rowOf = new Array<{ table: FeatureTable; row: number } | undefined>(total);
  let done = 0;
  for (const input of inputs) {
    const table = await readFeaturesOutput(input.file);
    checkCounts(input, table.ids.length, table.ids.length);
    if (names === undefined) {
      names = table.names;
      namesFrom = input.file;
    } else if (canonicalJson(table.names) !== canonicalJson(names)) {
      throw new UserError(
        `has other feature columns than ${namesFrom}; rerun the shards with the same options`,
        { file: input.file },
      );
    }
    const ordinals = ordinalOf(input);
    table.ids.forEach((id, row) => {
      const ordinal = ordinals.get(id);
      if (ordinal === undefined) {
        throw new UserError(`holds sample '${id}', which its shard record does not list; rerun this shard`, {
          file: input.file,
        });
      }
      rowOf[ordinal] = { table, row };
    });
    if (table.ids.length !== input.record.ids.length) {
      throw new UserError(
        `holds ${table.ids.length} rows but its shard record lists ${input.record.ids.length} samples; rerun this shard`,
        {
          file: input.file,
        },
      );
    }
    options.onProgress?.(++done, inputs.length);
  }
  const cols = names?.length ?? 0;
  const data = new Float64Array(total * cols);
  const ids: string[] = new Array(total);
  const labels: string[] = new Array(total);
  for (let i = 0; i < total; i++) {
    const entry = rowOf[i]!;
    ids[i] = entry.table.ids[entry.row];
    labels[i] = entry.table.labels[entry.row];
    data.set(entry.table.matrix.data.subarray(entry.row * cols, (entry.row + 1) * cols), i * cols);
  }
  await writeFeaturesOutput(
    out,
    { ids, labels, names: names ?? [], matrix: { rows: total, cols, data } },
    merged,
    format,
  );
  return { out, format, output, shards: inputs.length, samples: total };
}

/** The samples and rows read from a shard must be those its writer recorded. */
function checkCounts(input: ShardInput, samples: number, rows: number): void {
  const content = input.record.content;
  if (content === undefined) return;
  if (samples !== content.samples || rows !== content.rows) {
    throw new UserError(
      `holds ${samples} samples in ${rows} rows but ${content.samples} samples in ${content.rows} rows were written; rerun this shard`,
      { file: input.file },
    );
  }
}

/**
 * The merged run's options: the first shard's, without `shard` and `force`, and with every per-sample summary
 * (`PER_SAMPLE_OPTION_KEYS`) combined over the shards — the largest value, and the per-sample values in the
 * dataset's order — as the unsharded run records it.
 */
function combineOptions(inputs: readonly ShardInput[]): Record<string, unknown> {
  const options = inputs[0].provenance.options ?? {};
  const kept: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(options)) {
    if (key === 'shard' || key === 'force') continue;
    kept[key] = PER_SAMPLE_OPTION_KEYS.includes(key) ? combineSummary(inputs, key) : value;
  }
  return kept;
}

function combineSummary(inputs: readonly ShardInput[], key: string): unknown {
  const total = inputs[0].record.total;
  const byOrdinal = new Array<[string, number] | undefined>(total);
  let largest = 0;
  for (const input of inputs) {
    const summary = input.provenance.options?.[key] as
      | { largest?: number; perSample?: Record<string, number> }
      | undefined;
    if (summary === undefined || typeof summary !== 'object') continue;
    if (typeof summary.largest === 'number' && summary.largest > largest) largest = summary.largest;
    const ordinals = new Map(input.record.ids.map((id, k) => [id, input.record.ordinals[k]]));
    for (const [id, value] of Object.entries(summary.perSample ?? {})) {
      const ordinal = ordinals.get(id);
      if (ordinal !== undefined) byOrdinal[ordinal] = [id, value];
    }
  }
  const perSample: Record<string, number> = {};
  for (const entry of byOrdinal) if (entry !== undefined) perSample[entry[0]] = entry[1];
  return { largest, perSample };
}
