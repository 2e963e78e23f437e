import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import { UserError } from '../core/errors.js';
import type { Sample } from '../core/sample.js';
import { type Provenance, version } from '../core/version.js';
import { columnsSidecarPath, samplesSidecarPath } from './feature-table.js';
import { provenancePath, readProvenance } from './provenance-file.js';

/**
 * Shards: one slice of a dataset's samples, so that the expensive per-sample step (diagrams, vectors) runs as
 * N independent jobs on a batch scheduler that a cluster already has, and `landform merge` joins the pieces.
 *
 * Numbering: on the command line a shard is `--shard I/N` with I counted from 1 (`1/3`, `2/3`, `3/3`), the way
 * people say "part 2 of 3". Internally and in scheduler variables that count from 0 we convert once, here.
 *
 * Assignment: sample `id` goes to shard `fnv1a32(utf8(id)) mod N` + 1, where fnv1a32 is the 32-bit FNV-1a hash
 * (offset basis 2166136261, prime 16777619) over the id's UTF-8 bytes. It depends on the id alone — not on
 * the dataset's order, its size or the machine — so reruns and retries give the same split, and adding
 * samples to a dataset moves no existing sample to another shard.
 *
 * Canonical order: every sharded output records, in its provenance sidecar, each sample's ordinal (0-based
 * position) in the whole dataset as the loader read it. The merge writes samples in that order, which is the
 * order an unsharded run writes, so the merged file equals the unsharded file byte for byte.
 */

/** A shard as the user counts it: `index` from 1 to `count`. */
export interface Shard {
  index: number;
  count: number;
}

/** Where a shard came from, for the message the command prints. */
export type ShardSource = 'option' | 'slurm' | 'kubernetes';

export interface ResolvedShard {
  shard: Shard;
  source: ShardSource;
  /** One line saying which shard this is and why, e.g. `shard 2/7 (from SLURM_ARRAY_TASK_ID=2)`. */
  description: string;
}

/** Environment variable of our own giving the shard count of a Kubernetes Indexed Job (its `completions`). */
export const SHARD_COUNT_VARIABLE = 'LANDFORM_SHARD_COUNT';

/** The name of the assignment rule, recorded in every shard's provenance. */
export const SHARD_ASSIGNMENT = 'fnv1a32-mod';

/** 32-bit FNV-1a of the UTF-8 bytes of `text`, as an unsigned integer. */
export function fnv1a32(text: string): number {
  const bytes = Buffer.from(text, 'utf8');
  let hash = 0x811c9dc5;
  // Invariant: `hash` is the FNV-1a hash of bytes[0..i), kept as an unsigned 32-bit value.
  for (let i = 0; i < bytes.length; i++) {
    hash ^= bytes[i];
    hash = Math.imul(hash, 0x01000193) >>> 0;
  }
  return hash >>> 0;
}

/** The shard (1-based) that sample `id` belongs to among `count` shards. */
export function shardOf(id: string, count: number): number {
  return (fnv1a32(id) % count) + 1;
}

/** Parses `I/N` (1 ≤ I ≤ N); the error says what a shard looks like. */
export function parseShard(text: string, option = '--shard'): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!m)
    throw new UserError(`${option} '${text}' must look like I/N, e.g. 2/7 for the second of seven shards`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || count > 1_000_000) {
    throw new UserError(`${option} '${text}': the shard count N must be from 1 to 1000000`);
  }
  if (index < 1 || index > count) {
    throw new UserError(
      `${option} '${text}': shards count from 1, so I must be from 1 to ${count} (1/${count} … ${count}/${count})`,
    );
  }
  return { index, count };
}

export function formatShard(shard: Shard): string {
  return `${shard.index}/${shard.count}`;
}

function wholeNumber(env: Record<string, string | undefined>, name: string): number | undefined {
  const text = env[name];
  if (text === undefined || text.trim() === '') return undefined;
  if (!/^\s*\d+\s*$/.test(text)) {
    throw new UserError(
      `environment variable ${name}='${text}' is not a whole number; fix the job script or pass --shard I/N`,
    );
  }
  return Number(text);
}

/**
 * Which shard this process is: from `--shard I/N` when given (`none` turns sharding off even inside a job
 * array), else from a Slurm job array, else from a Kubernetes Indexed Job, else none (undefined).
 *
 * Slurm: element `SLURM_ARRAY_TASK_ID` of `SLURM_ARRAY_TASK_COUNT`; arrays may start at any index and step, so
 * the shard is `(ID − SLURM_ARRAY_TASK_MIN) / SLURM_ARRAY_TASK_STEP + 1` (MIN 0 and STEP 1 when unset). A list
 * of ids that is not one evenly stepped range (`--array=1,4,9`) is refused: pass `--shard` instead.
 * Kubernetes: `JOB_COMPLETION_INDEX` counts from 0; the count is not in the pod's environment, so it comes
 * from `LANDFORM_SHARD_COUNT` (set it to the job's `completions`); without that variable the pod is not
 * sharded, since an indexed job may be indexing something else.
 */
export function resolveShard(
  optionText: string | undefined,
  env: Record<string, string | undefined> = process.env,
): ResolvedShard | undefined {
  if (optionText !== undefined) {
    if (optionText.trim().toLowerCase() === 'none') return undefined;
    const shard = parseShard(optionText);
    return { shard, source: 'option', description: `shard ${formatShard(shard)}` };
  }
  const taskId = wholeNumber(env, 'SLURM_ARRAY_TASK_ID');
  if (taskId !== undefined) {
    const count = wholeNumber(env, 'SLURM_ARRAY_TASK_COUNT');
    if (count === undefined || count < 1) {
      throw new UserError(
        'SLURM_ARRAY_TASK_ID is set but SLURM_ARRAY_TASK_COUNT is not; run inside a Slurm job array or pass --shard I/N',
      );
    }
    const min = wholeNumber(env, 'SLURM_ARRAY_TASK_MIN') ?? 0;
    const step = wholeNumber(env, 'SLURM_ARRAY_TASK_STEP') ?? 1;
    const offset = taskId - min;
    if (step < 1 || offset < 0 || offset % step !== 0 || offset / step >= count) {
      throw new UserError(
        `Slurm array task ${taskId} (min ${min}, step ${step}, count ${count}) is not on one evenly stepped range; use --array=A-B or pass --shard I/N`,
      );
    }
    const shard = { index: offset / step + 1, count };
    return {
      shard,
      source: 'slurm',
      description: `shard ${formatShard(shard)} (from SLURM_ARRAY_TASK_ID=${taskId})`,
    };
  }
  const completion = wholeNumber(env, 'JOB_COMPLETION_INDEX');
  // An indexed job without our count variable may index something else (a CI runner, say): not a shard.
  const count = wholeNumber(env, SHARD_COUNT_VARIABLE);
  if (completion !== undefined && count !== undefined) {
    if (count < 1 || completion >= count) {
      throw new UserError(
        `JOB_COMPLETION_INDEX=${completion} does not fit ${SHARD_COUNT_VARIABLE}=${count}; indexes run from 0 to ${SHARD_COUNT_VARIABLE}−1`,
      );
    }
    const shard = { index: completion + 1, count };
    return {
      shard,
      source: 'kubernetes',
      description: `shard ${formatShard(shard)} (from JOB_COMPLETION_INDEX=${completion})`,
    };
  }
  return undefined;
}

/** The positions (0-based, in dataset order) of the samples that belong to `shard`. */
export function shardOrdinals(ids: readonly string[], shard: Shard): number[] {
  const out: number[] = [];
  for (let i = 0; i < ids.length; i++) if (shardOf(ids[i], shard.count) === shard.index) out.push(i);
  return out;
}

/**
 * The file a shard writes: `<stem>.shard-<I>-of-<N><ext>`, I zero-padded to the width of N so that a listing
 * sorts in shard order (`diagrams.shard-03-of-12.csv`). Every element of a job array runs the same command
 * line, so the shard's name is derived from `--out` rather than given per element.
 */
export function shardFileName(out: string, shard: Shard): string {
  const ext = extname(out);
  const stem = basename(out, ext);
  const width = String(shard.count).length;
  return join(
    dirname(out),
    `${stem}.shard-${String(shard.index).padStart(width, '0')}-of-${shard.count}${ext}`,
  );
}

/** What a shard writes into its provenance: enough for the merge to check completeness and order. */
export interface ShardRecord {
  /** 1-based shard index and the shard count. */
  index: number;
  count: number;
  /** The assignment rule (`fnv1a32-mod`). */
  assignment: string;
  /** What the file holds: diagrams (one row per pair) or a feature table (one row per sample). */
  output: 'diagrams' | 'table';
  /** Number of samples in the whole dataset. */
  total: number;
  /** SHA-256 over every sample of the whole dataset (ids, labels, values), so shards of different data don't merge. */
  dataset: string;
  /** SHA-256 of the settings known before computing, with the version: a rerun with the same digest is a no-op. */
  settings: string;
  /** This shard's sample ids in dataset order, and their 0-based positions in the whole dataset. */
  ids: string[];
  ordinals: number[];
  /**
   * What the shard's files held when written (added by the writer, not part of the plan): the data rows
   * (diagram pairs, or table rows), the samples with rows, and each file's size and SHA-256. The merge
   * checks them, so a truncated or altered shard is refused.
   */
  content?: ShardContent;
}

export interface ShardContent {
  rows: number;
  samples: number;
  /** Size and SHA-256 of the data file and, for NPY, of its sample and column lists, by role. */
  files: Partial<Record<ShardFileRole, { bytes: number; sha256: string }>>;
}

/** The files of a shard output: the data file, and the sample and column lists beside an NPY file. */
export type ShardFileRole = 'data' | 'samples' | 'columns';

const ROLES: readonly ShardFileRole[] = ['data', 'samples', 'columns'];

/** Where a file of `role` sits for the data file `file` (so a shard may be moved or renamed whole). */
function rolePath(file: string, role: ShardFileRole): string {
  if (role === 'samples') return samplesSidecarPath(file);
  if (role === 'columns') return columnsSidecarPath(file);
  return file;
}

function sizeAndHash(data: string | Uint8Array): { bytes: number; sha256: string } {
  const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
  return { bytes: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex') };
}

/**
 * The provenance with the content of the files about to be written added to its shard record (unchanged
 * when it has none). `files` are the data file, then for NPY its sample and column lists (the order
 * `featureTableFiles` gives), not the provenance itself.
 */
export function sealShardContent(
  provenance: Provenance,
  files: ReadonlyArray<{ path: string; data: string | Uint8Array }>,
  counts: { rows: number; samples: number },
): Provenance {
  const record = (provenance as ShardedProvenance).shard;
  if (record === undefined) return provenance;
  const listed: ShardContent['files'] = {};
  files.forEach((file, k) => {
    listed[ROLES[k]] = sizeAndHash(file.data);
  });
  return { ...provenance, shard: { ...record, content: { ...counts, files: listed } } } as ShardedProvenance;
}

/**
 * Checks a shard's files against the content its record lists; returns what is wrong, or undefined. `file`
 * is the shard's data file.
 */
export function shardContentFault(file: string, record: ShardRecord): string | undefined {
  const content = record.content;
  if (content === undefined || typeof content.files !== 'object' || content.files?.data === undefined)
    return 'its sidecar records no size and checksum of the data (written by another landform version); rerun this shard';
  for (const role of ROLES) {
    const expected = content.files[role];
    if (expected === undefined) continue;
    const path = rolePath(file, role);
    let bytes: Buffer;
    try {
      bytes = readFileSync(path);
    } catch {
      return `${path} is missing; rerun this shard`;
    }
    const found = sizeAndHash(bytes);
    const name = basename(path);
    if (found.bytes !== expected.bytes)
      return `${name} holds ${found.bytes} bytes but ${expected.bytes} were written (truncated or changed); rerun this shard`;
    if (found.sha256 !== expected.sha256)
      return `${name} was changed after it was written (its SHA-256 differs from the sidecar's); rerun this shard`;
  }
  return undefined;
}

/** The provenance of a shard's output: the command's own provenance plus the shard record. */
export interface ShardedProvenance extends Provenance {
  shard?: ShardRecord;
}

/**
 * Option keys that may differ between the shards of one job without changing any result: where the output
 * goes, which shard, rerun and display flags, the number of worker threads.
 */
export const PER_SHARD_OPTION_KEYS: readonly string[] = [
  'out',
  'shard',
  'force',
  'quiet',
  'debug',
  'workers',
  'format',
];

/**
 * Option keys that summarise the samples a run computed, shaped `{ largest: number, perSample: {id: value} }`
 * (e.g. the covering radius of landmark subsampling). Each shard records its own; the merge combines them
 * (largest of the largest, per-sample values in dataset order) into what the unsharded run records.
 */
export const PER_SAMPLE_OPTION_KEYS: readonly string[] = ['coveringRadius'];

/** The provenance with the shard record and the per-shard option keys removed: what all shards must share. */
export function sharedProvenance(p: Provenance): Record<string, unknown> {
  const { shard: _shard, options, ...rest } = p as ShardedProvenance;
  const kept: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(options ?? {})) {
    if (!PER_SHARD_OPTION_KEYS.includes(key) && !PER_SAMPLE_OPTION_KEYS.includes(key)) kept[key] = value;
  }
  return { ...rest, options: kept };
}

/** SHA-256 (hex) over the samples' kinds, ids, labels and numeric content, in order. */
export function datasetDigest(samples: readonly Sample[]): string {
  const hash = createHash('sha256');
  const text = (s: string): void => {
    const b = Buffer.from(s, 'utf8');
    hash.update(Uint32Array.of(b.length));
    hash.update(b);
  };
  const numbers = (a: Float64Array | readonly number[]): void => {
    const f = a instanceof Float64Array ? a : Float64Array.from(a);
    hash.update(Uint32Array.of(f.length));
    hash.update(new Uint8Array(f.buffer, f.byteOffset, f.byteLength));
  };
  hash.update(Uint32Array.of(samples.length));
  for (const s of samples) {
    text(s.kind);
    text(s.id);
    text(s.label);
    switch (s.kind) {
      case 'points':
        numbers([s.dim, s.count]);
        numbers(s.coords);
        break;
      case 'distances':
        numbers([s.size]);
        numbers(s.matrix);
        break;
      case 'signal':
      case 'table':
        numbers(s.values);
        break;
      case 'image':
        numbers(s.shape);
        numbers(s.values);
        break;
      case 'diagrams':
        numbers([s.diagrams.length]);
        for (const d of s.diagrams) {
          numbers([d.degree]);
          numbers(d.births);
          numbers(d.deaths);
        }
        break;
    }
  }
  return hash.digest('hex');
}

export interface ShardPlanInput<S extends Sample> {
  /** The whole dataset, in the loader's order. */
  samples: readonly S[];
  /** The `--out` the user gave. */
  out: string;
  /** The shard, from `resolveShard` (undefined: not sharded). */
  shard: ResolvedShard | undefined;
  /** What the file will hold. */
  output: 'diagrams' | 'table';
  /**
   * Everything that decides the result, known before any computing (the command's name and options; keys in
   * `PER_SHARD_OPTION_KEYS` are ignored). Its digest, with landform's version, goes into the shard record.
   */
  settings: Record<string, unknown>;
  /** `--force`: recompute even when the shard is finished. */
  force?: boolean;
  /** Column names of a table dataset, part of its content. */
  columns?: readonly string[];
}

export interface ShardPlan<S extends Sample> {
  /** This shard's samples in dataset order (all samples when not sharded). */
  samples: S[];
  /** The file to write. */
  out: string;
  /** The shard record (undefined when not sharded). */
  record?: ShardRecord;
  /** True when this shard's output already exists with the same settings, version, shard and data: nothing to do. */
  finished: boolean;
  /** A line for stderr describing the plan, or undefined when not sharded. */
  message?: string;
  /** The provenance to write: `provenance` plus the shard record when sharded, unchanged otherwise. */
  stamp(provenance: Provenance): ShardedProvenance;
}

/** SHA-256 (hex) of the settings that decide a result, per-shard keys removed, with landform's version. */
export function settingsDigest(settings: Record<string, unknown>): string {
  const kept: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(settings))
    if (!PER_SHARD_OPTION_KEYS.includes(key)) kept[key] = value;
  return createHash('sha256')
    .update(canonicalJson({ version: version(), settings: kept }))
    .digest('hex');
}

/**
 * Decides what a sharded command does: which samples, which file, and whether the shard is already finished.
 * A shard is finished when its output and its provenance sidecar both exist and the sidecar's shard record
 * equals the one this run would write — same shard, same samples and data (digest), same settings and
 * version (digest). The sidecar is renamed into place after the output, so its presence means the output is
 * complete. The check runs before any computing, so the settings are those known up front; the provenance
 * written at the end (which may add what was learned) is stamped with `plan.stamp`.
 */
export function planShard<S extends Sample>(input: ShardPlanInput<S>): ShardPlan<S> {
  const { shard } = input;
  if (shard === undefined) {
    return { samples: [...input.samples], out: input.out, finished: false, stamp: (p) => p };
  }
  const ids = input.samples.map((s) => s.id);
  const ordinals = shardOrdinals(ids, shard.shard);
  const out = shardFileName(input.out, shard.shard);
  const record: ShardRecord = {
    index: shard.shard.index,
    count: shard.shard.count,
    assignment: SHARD_ASSIGNMENT,
    output: input.output,
    total: input.samples.length,
    dataset:
      input.columns === undefined
        ? datasetDigest(input.samples)
        : createHash('sha256')
            .update(datasetDigest(input.samples))
            .update(JSON.stringify(input.columns))
            .digest('hex'),
    settings: settingsDigest(input.settings),
    ids: ordinals.map((i) => ids[i]),
    ordinals,
  };
  const samples = ordinals.map((i) => input.samples[i]);
  const finished = !input.force && shardFinished(out, record);
  const message = finished
    ? `landform: ${shard.description} is already finished (${out}); nothing to do — add --force to recompute`
    : `landform: ${shard.description}: ${samples.length} of ${input.samples.length} samples → ${out}`;
  return { samples, out, record, finished, message, stamp: (p) => ({ ...p, shard: record }) };
}

/** True when `out` and its sidecar exist and the sidecar's shard record equals `expected`. */
export function shardFinished(out: string, expected: ShardRecord): boolean {
  if (!existsSync(out) || !existsSync(provenancePath(out))) return false;
  let found: ShardedProvenance | undefined;
  try {
    found = readProvenance(out) as ShardedProvenance | undefined;
  } catch {
    return false;
  }
  if (found?.shard === undefined) return false;
  const { content: _content, ...plan } = found.shard;
  return canonicalJson(plan) === canonicalJson(expected) && shardContentFault(out, found.shard) === undefined;
}

/** JSON with object keys sorted, so that two records compare by content, not by key order. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_key, v: unknown) => {
    if (v !== null && typeof v === 'object' && !Array.isArray(v)) {
      const sorted: Record<string, unknown> = {};
      for (const k of Object.keys(v as Record<string, unknown>).sort())
        sorted[k] = (v as Record<string, unknown>)[k];
      return sorted;
    }
    return v;
  });
}
