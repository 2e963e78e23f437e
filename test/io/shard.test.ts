import { readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { Random } from '../../src/core/random.js';
import type { PointSample } from '../../src/core/sample.js';
import { provenance } from '../../src/core/version.js';
import { writeWithProvenance } from '../../src/io/provenance-file.js';
import {
  datasetDigest,
  fnv1a32,
  parseShard,
  planShard,
  resolveShard,
  sealShardContent,
  shardFileName,
  shardOf,
  shardOrdinals,
  sharedProvenance,
} from '../../src/io/shard.js';
import { tempDir } from '../helpers/cli.js';

/** FNV-1a written the long way with BigInt, independent of the Math.imul arithmetic under test. */
function fnv1aReference(text: string): number {
  let h = 2166136261n;
  for (const byte of Buffer.from(text, 'utf8')) {
    h ^= BigInt(byte);
    h = (h * 16777619n) % 4294967296n;
  }
  return Number(h);
}

function cloud(id: string, label: string, rng: Random, count = 4): PointSample {
  const coords = new Float64Array(count * 2);
  for (let i = 0; i < coords.length; i++) coords[i] = rng.normal();
  return { kind: 'points', id, label, dim: 2, count, coords };
}

function userMessage(fn: () => unknown): string {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(UserError);
    return (error as UserError).describe();
  }
  throw new Error('expected a UserError');
}

describe('fnv1a32', () => {
  it('matches the published FNV-1a 32-bit test vectors', () => {
    // Test vectors of Fowler, Noll, Vo & Eastlake, "The FNV Non-Cryptographic Hash Algorithm" (IETF
    // draft-eastlake-fnv, 2011–2024): FNV-1a 32 of "" is the offset basis 0x811c9dc5, of "a" 0xe40c292c,
    // of "foobar" 0xbf9cf968 (from memory; the BigInt reference below checks the arithmetic independently).
    expect(fnv1a32('')).toBe(0x811c9dc5);
    expect(fnv1a32('a')).toBe(0xe40c292c);
    expect(fnv1a32('foobar')).toBe(0xbf9cf968);
  });

  it('agrees with a BigInt evaluation of the definition on random ids, including non-ASCII', () => {
    const rng = new Random(7);
    const alphabet = 'abcXYZ019-_./ äöü€漢字😀';
    for (let t = 0; t < 300; t++) {
      let id = '';
      const length = rng.int(24);
      for (let i = 0; i < length; i++) id += [...alphabet][rng.int([...alphabet].length)];
      expect(fnv1a32(id)).toBe(fnv1aReference(id));
    }
  });
});

describe('shard assignment', () => {
  it('depends on the id alone: shuffling or growing the dataset moves no sample', () => {
    const ids = Array.from({ length: 200 }, (_, i) => `window-${i}`);
    const before = new Map(ids.map((id) => [id, shardOf(id, 7)]));
    const shuffled = new Random(3).shuffle([...ids, 'extra-1', 'extra-2']);
    for (const id of shuffled) if (before.has(id)) expect(shardOf(id, 7)).toBe(before.get(id));
  });

  it('splits ids into disjoint shards that cover every sample, in dataset order', () => {
    const ids = Array.from({ length: 50 }, (_, i) => `s${i}`);
    for (const count of [1, 3, 7]) {
      const all: number[] = [];
      for (let index = 1; index <= count; index++) {
        const ordinals = shardOrdinals(ids, { index, count });
        expect([...ordinals].sort((a, b) => a - b)).toEqual(ordinals);
        all.push(...ordinals);
      }
      expect(all.sort((a, b) => a - b)).toEqual(ids.map((_, i) => i));
    }
  });

  it('balances many ids roughly evenly', () => {
    // Roughly even shards (each within 15% of the mean for 7000 ids in 7 shards): common practice, no source.
    const counts = new Array(7).fill(0);
    for (let i = 0; i < 7000; i++) counts[shardOf(`sensor-${i}`, 7) - 1]++;
    for (const c of counts) expect(Math.abs(c - 1000)).toBeLessThan(150);
  });
});

describe('parseShard', () => {
  it('reads I/N counted from 1', () => {
    expect(parseShard('2/7')).toEqual({ index: 2, count: 7 });
    expect(parseShard(' 7 / 7 ')).toEqual({ index: 7, count: 7 });
    expect(parseShard('1/1')).toEqual({ index: 1, count: 1 });
  });

  it('refuses 0-based, out-of-range and malformed values with a message saying what to give', () => {
    expect(userMessage(() => parseShard('0/7'))).toMatch(/shards count from 1.*1\/7 … 7\/7/);
    expect(userMessage(() => parseShard('8/7'))).toMatch(/from 1 to 7/);
    expect(userMessage(() => parseShard('2'))).toMatch(/must look like I\/N/);
    expect(userMessage(() => parseShard('1/0'))).toMatch(/count N must be/);
    expect(userMessage(() => parseShard('a/b'))).toMatch(/must look like I\/N/);
  });
});

describe('resolveShard', () => {
  it('prefers the option, and --shard none turns sharding off inside a job array', () => {
    const env = { SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_COUNT: '7', SLURM_ARRAY_TASK_MIN: '0' };
    expect(resolveShard('5/7', env)?.shard).toEqual({ index: 5, count: 7 });
    expect(resolveShard('none', env)).toBeUndefined();
    expect(resolveShard(undefined, {})).toBeUndefined();
  });

  it('reads a Slurm job array that starts at 0, at 1, or steps', () => {
    // Slurm sets SLURM_ARRAY_TASK_ID, _COUNT, _MIN, _MAX and _STEP in each array element (SchedMD, Slurm
    // documentation, "Job Array Support" and sbatch(1) "OUTPUT ENVIRONMENT VARIABLES").
    const zero = resolveShard(undefined, {
      SLURM_ARRAY_TASK_ID: '0',
      SLURM_ARRAY_TASK_COUNT: '7',
      SLURM_ARRAY_TASK_MIN: '0',
    });
    expect(zero?.shard).toEqual({ index: 1, count: 7 });
    expect(zero?.source).toBe('slurm');
    expect(zero?.description).toContain('SLURM_ARRAY_TASK_ID=0');
    // --array=1-7: the last element is shard 7/7.
    const one = resolveShard(undefined, {
      SLURM_ARRAY_TASK_ID: '7',
      SLURM_ARRAY_TASK_COUNT: '7',
      SLURM_ARRAY_TASK_MIN: '1',
    });
    expect(one?.shard).toEqual({ index: 7, count: 7 });
    // --array=10-22:4 → ids 10, 14, 18, 22.
    const stepped = { SLURM_ARRAY_TASK_COUNT: '4', SLURM_ARRAY_TASK_MIN: '10', SLURM_ARRAY_TASK_STEP: '4' };
    expect(resolveShard(undefined, { ...stepped, SLURM_ARRAY_TASK_ID: '18' })?.shard).toEqual({
      index: 3,
      count: 4,
    });
    // Without MIN, ids are taken to start at 0.
    expect(resolveShard(undefined, { SLURM_ARRAY_TASK_ID: '2', SLURM_ARRAY_TASK_COUNT: '3' })?.shard).toEqual(
      { index: 3, count: 3 },
    );
  });

  it('refuses Slurm arrays it cannot map to shards', () => {
    // --array=1,4,9: count 3, min 1, ids not on one stepped range.
    expect(
      userMessage(() =>
        resolveShard(undefined, {
          SLURM_ARRAY_TASK_ID: '9',
          SLURM_ARRAY_TASK_COUNT: '3',
          SLURM_ARRAY_TASK_MIN: '1',
        }),
      ),
    ).toMatch(/not on one evenly stepped range.*--shard I\/N/);
    expect(userMessage(() => resolveShard(undefined, { SLURM_ARRAY_TASK_ID: '2' }))).toMatch(
      /SLURM_ARRAY_TASK_COUNT is not/,
    );
    expect(
      userMessage(() => resolveShard(undefined, { SLURM_ARRAY_TASK_ID: 'x', SLURM_ARRAY_TASK_COUNT: '3' })),
    ).toMatch(/not a whole number/);
  });

  it('reads a Kubernetes Indexed Job when LANDFORM_SHARD_COUNT gives the count', () => {
    // Kubernetes sets JOB_COMPLETION_INDEX from 0 to completions − 1 in each pod of an Indexed Job
    // (Kubernetes documentation, "Jobs", section "Completion mode").
    const k = resolveShard(undefined, { JOB_COMPLETION_INDEX: '0', LANDFORM_SHARD_COUNT: '3' });
    expect(k?.shard).toEqual({ index: 1, count: 3 });
    expect(k?.source).toBe('kubernetes');
    expect(resolveShard(undefined, { JOB_COMPLETION_INDEX: '2', LANDFORM_SHARD_COUNT: '3' })?.shard).toEqual({
      index: 3,
      count: 3,
    });
    // Without our count variable an indexed job is not taken as sharding (it may index something else).
    expect(resolveShard(undefined, { JOB_COMPLETION_INDEX: '2' })).toBeUndefined();
    expect(
      userMessage(() => resolveShard(undefined, { JOB_COMPLETION_INDEX: '3', LANDFORM_SHARD_COUNT: '3' })),
    ).toMatch(/does not fit/);
  });
});

describe('shardFileName', () => {
  it('derives the shard file from --out, zero-padded to the width of N', () => {
    expect(shardFileName('out/diagrams.csv', { index: 2, count: 7 })).toBe(
      join('out', 'diagrams.shard-2-of-7.csv'),
    );
    expect(shardFileName('features.arrow', { index: 3, count: 12 })).toBe('features.shard-03-of-12.arrow');
    expect(shardFileName('x', { index: 1, count: 1 })).toBe('x.shard-1-of-1');
  });
});

describe('planShard', () => {
  const rng = new Random(11);
  const samples = Array.from({ length: 21 }, (_, i) =>
    cloud(`part-${i}`, i % 3 === 0 ? 'intact' : 'broken', rng),
  );
  const prov = provenance('diagrams', { degrees: [0, 1], out: 'd.csv', workers: 2 });

  it('without a shard keeps every sample and the file as given', () => {
    const plan = planShard({
      samples,
      out: 'd.csv',
      shard: undefined,
      output: 'diagrams',
      settings: prov.options,
    });
    expect(plan.samples).toHaveLength(21);
    expect(plan.out).toBe('d.csv');
    expect(plan.stamp(prov)).toEqual(prov);
    expect(plan.record).toBeUndefined();
    expect(plan.finished).toBe(false);
  });

  it('selects the shard, records ids and ordinals, and knows when the shard is finished', () => {
    const dir = tempDir();
    const out = join(dir, 'd.csv');
    const shard = resolveShard('2/3', {});
    const plan = planShard({ samples, out, shard, output: 'diagrams', settings: prov.options });
    expect(plan.out).toBe(join(dir, 'd.shard-2-of-3.csv'));
    const expectedIds = samples.map((s) => s.id).filter((id) => shardOf(id, 3) === 2);
    expect(plan.samples.map((s) => s.id)).toEqual(expectedIds);
    const record = plan.record!;
    expect(plan.stamp(prov)).toEqual({ ...prov, shard: record });
    expect(record.ids).toEqual(expectedIds);
    expect(record.ordinals.map((o) => samples[o].id)).toEqual(expectedIds);
    expect(record.total).toBe(21);
    expect(plan.finished).toBe(false);

    const header = 'sample,label,degree,birth,death\n';
    // As the writers do: the sidecar records the data's size and SHA-256 beside the plan's record.
    writeWithProvenance(
      plan.out,
      header,
      sealShardContent(plan.stamp(prov), [{ path: plan.out, data: header }], { rows: 0, samples: 0 }),
    );
    expect(planShard({ samples, out, shard, output: 'diagrams', settings: prov.options }).finished).toBe(
      true,
    );
    // --force recomputes.
    expect(
      planShard({ samples, out, shard, output: 'diagrams', settings: prov.options, force: true }).finished,
    ).toBe(false);
    // Worker count and output name do not change results: still finished.
    const other = provenance('diagrams', { degrees: [0, 1], out: 'd.csv', workers: 1 });
    expect(planShard({ samples, out, shard, output: 'diagrams', settings: other.options }).finished).toBe(
      true,
    );
    // Other options, or changed data, mean the shard must run again.
    const changed = provenance('diagrams', { degrees: [0], out: 'd.csv', workers: 2 });
    expect(planShard({ samples, out, shard, output: 'diagrams', settings: changed.options }).finished).toBe(
      false,
    );
    const edited = samples.map((s, i) =>
      i === record.ordinals[0] ? { ...s, coords: s.coords.map((v) => v + 1) } : s,
    );
    expect(
      planShard({ samples: edited, out, shard, output: 'diagrams', settings: prov.options }).finished,
    ).toBe(false);
    // A finished shard whose data was truncated or changed afterwards is not finished any more.
    writeFileSync(plan.out, header.slice(0, 10));
    expect(planShard({ samples, out, shard, output: 'diagrams', settings: prov.options }).finished).toBe(
      false,
    );
    writeFileSync(plan.out, header);
    expect(planShard({ samples, out, shard, output: 'diagrams', settings: prov.options }).finished).toBe(
      true,
    );
    // An output whose sidecar is missing (e.g. the run died between the two renames) is not finished.
    writeFileSync(join(dir, 'd.shard-1-of-3.csv'), 'sample,label,degree,birth,death\n');
    expect(
      planShard({ samples, out, shard: resolveShard('1/3', {}), output: 'diagrams', settings: prov.options })
        .finished,
    ).toBe(false);
    expect(readdirSync(dir).sort()).toEqual([
      'd.shard-1-of-3.csv',
      'd.shard-2-of-3.csv',
      'd.shard-2-of-3.csv.provenance.json',
    ]);
  });

  it('shared provenance ignores per-shard keys but keeps the rest', () => {
    const a = sharedProvenance({ ...prov, options: { degrees: [0, 1], out: 'a', workers: 1, force: true } });
    const b = sharedProvenance({ ...prov, options: { degrees: [0, 1], out: 'b', workers: 4 } });
    expect(a).toEqual(b);
    expect(sharedProvenance({ ...prov, options: { degrees: [0] } })).not.toEqual(b);
  });

  it('digests content: equal data gives equal digests, any change gives another', () => {
    const copy = samples.map((s) => ({ ...s, coords: Float64Array.from(s.coords) }));
    expect(datasetDigest(copy)).toBe(datasetDigest(samples));
    const relabelled = samples.map((s, i) => (i === 5 ? { ...s, label: 'other' } : s));
    expect(datasetDigest(relabelled)).not.toBe(datasetDigest(samples));
    expect(datasetDigest(samples.slice(1))).not.toBe(datasetDigest(samples));
  });
});
