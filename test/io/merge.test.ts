import { copyFileSync, existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { DiagramSet } from '../../src/core/diagram.js';
import { UserError } from '../../src/core/errors.js';
import { Random } from '../../src/core/random.js';
import type { DiagramSample } from '../../src/core/sample.js';
import { type Provenance, provenance } from '../../src/core/version.js';
import { loadDataset } from '../../src/io/load.js';
import { mergeShards } from '../../src/io/merge.js';
import {
  chooseFormat,
  formatFromPath,
  readDiagramsOutput,
  writeDiagramsOutput,
  writeFeaturesOutput,
} from '../../src/io/outputs.js';
import { provenancePath } from '../../src/io/provenance-file.js';
import { planShard, resolveShard } from '../../src/io/shard.js';
import { tempDir } from '../helpers/cli.js';

/** 21 tiny samples of made-up diagrams: demo data for the file mechanics, not for any numeric claim. */
function demoSamples(seed = 5, count = 21): DiagramSample[] {
  const rng = new Random(seed);
  return Array.from({ length: count }, (_, i): DiagramSample => {
    const n0 = 1 + rng.int(3);
    const n1 = i % 4 === 3 ? 0 : rng.int(3);
    const births0 = new Float64Array(n0);
    const deaths0 = Float64Array.from({ length: n0 }, (_, k) => (k === 0 ? Infinity : rng.uniform(0.01, 1)));
    const births1 = Float64Array.from({ length: n1 }, () => rng.uniform(0, 0.5));
    const deaths1 = births1.map((b) => b + rng.uniform(0.01, 0.5));
    return {
      kind: 'diagrams',
      id: `lattice-${String(i).padStart(2, '0')}`,
      label: ['intact', 'broken-strut', 'merged-cells'][i % 3],
      diagrams: [
        { degree: 0, births: births0, deaths: deaths0 },
        { degree: 1, births: births1, deaths: deaths1 },
      ],
    };
  });
}

const toSet = (s: DiagramSample): DiagramSet => ({ sample: s.id, label: s.label, diagrams: s.diagrams });

/** Runs the "command" the way the CLI does: plan the shard, compute its samples, write through the same writer. */
async function runDiagrams(
  samples: DiagramSample[],
  out: string,
  shard: string | undefined,
  prov: Provenance,
): Promise<string> {
  const plan = planShard({
    samples,
    out,
    shard: resolveShard(shard, {}),
    output: 'diagrams',
    settings: prov.options,
  });
  if (!plan.finished) await writeDiagramsOutput(plan.out, plan.samples.map(toSet), plan.stamp(prov));
  return plan.out;
}

async function runFeatures(
  samples: DiagramSample[],
  out: string,
  shard: string | undefined,
  prov: Provenance,
): Promise<string> {
  const plan = planShard({
    samples,
    out,
    shard: resolveShard(shard, {}),
    output: 'table',
    settings: prov.options,
  });
  const rows = plan.samples.length;
  const data = new Float64Array(rows * 3);
  plan.samples.forEach((s, i) => {
    data[i * 3] = s.diagrams[0].births.length;
    data[i * 3 + 1] = s.diagrams[1].births.length;
    data[i * 3 + 2] = s.diagrams[1].deaths.reduce((a, d, k) => a + d - s.diagrams[1].births[k], 0) / 3;
  });
  const table = {
    ids: plan.samples.map((s) => s.id),
    labels: plan.samples.map((s) => s.label),
    names: ['H0/count', 'H1/count', 'H1/persistence'],
    matrix: { rows, cols: 3, data },
  };
  await writeFeaturesOutput(plan.out, table, plan.stamp(prov));
  return plan.out;
}

async function userError(promise: Promise<unknown>): Promise<string> {
  try {
    await promise;
  } catch (error) {
    expect(error).toBeInstanceOf(UserError);
    const line = (error as UserError).describe();
    expect(line).not.toContain('\n');
    return line;
  }
  throw new Error('expected a UserError');
}

const bytes = (file: string): Buffer => readFileSync(file);

describe('formats', () => {
  it('follow the extension, and a contradicting --format is refused', () => {
    expect(formatFromPath('a/b.ARROW')).toBe('arrow');
    expect(formatFromPath('x.npy')).toBe('npy');
    expect(formatFromPath('x.csv')).toBe('csv');
    expect(chooseFormat('x.arrow', undefined, ['csv', 'arrow'])).toBe('arrow');
    expect(chooseFormat('x.arrow', 'arrow', ['csv', 'arrow'])).toBe('arrow');
    expect(() => chooseFormat('x.csv', 'arrow', ['csv', 'arrow'])).toThrow(
      /--format arrow but the file is named \.csv/,
    );
    expect(() => chooseFormat('x.npy', undefined, ['csv', 'arrow'])).toThrow(/cannot write NPY/);
    expect(() => chooseFormat('x.csv', 'parquet', ['csv', 'arrow'])).toThrow(/not known/);
  });
});

describe('mergeShards', () => {
  const samples = demoSamples();
  const prov = provenance('diagrams', { input: 'lattice.csv', degrees: [0, 1], out: 'd.csv' });

  for (const ext of ['csv', 'arrow']) {
    it(`merged diagram shards (N = 1, 3, 7, ${ext}) equal the unsharded output and sidecar byte for byte`, async () => {
      const dir = tempDir();
      const whole = await runDiagrams(samples, join(dir, `whole.${ext}`), undefined, prov);
      // N = 30 > 21 samples leaves some shards empty (a header-only file).
      for (const n of [1, 3, 7, 30]) {
        const shardDir = join(dir, `n${n}`);
        const files: string[] = [];
        for (let i = n; i >= 1; i--)
          files.push(await runDiagrams(samples, join(shardDir, `whole.${ext}`), `${i}/${n}`, prov));
        if (n === 30) {
          const empty = [];
          for (const f of files) if ((await readDiagramsOutput(f)).length === 0) empty.push(f);
          expect(empty.length).toBeGreaterThan(0);
        }
        const merged = join(dir, `merged-${n}.${ext}`);
        const summary = await mergeShards(files, merged);
        expect(summary).toMatchObject({ shards: n, samples: 21, output: 'diagrams', format: ext });
        expect(bytes(merged).equals(bytes(whole))).toBe(true);
        expect(bytes(provenancePath(merged)).equals(bytes(provenancePath(whole)))).toBe(true);
      }
      // The merged CSV is a diagrams dataset for evaluate and train.
      if (ext === 'csv') {
        const dataset = await loadDataset(join(dir, 'merged-7.csv'));
        expect(dataset.kind).toBe('diagrams');
        // Samples 3, 7, 11, … have no H1 pair but always an essential H0 class, so all 21 are present.
        expect(dataset.samples.map((s) => s.id)).toEqual(samples.map((s) => s.id));
      }
    });
  }

  for (const ext of ['csv', 'npy', 'arrow']) {
    it(`merged feature-table shards (${ext}) equal the unsharded output byte for byte`, async () => {
      const dir = tempDir();
      const fprov = provenance('vectorize', { input: 'd.csv', depth: 2, out: `f.${ext}` });
      const whole = await runFeatures(samples, join(dir, `f.${ext}`), undefined, fprov);
      const files: string[] = [];
      for (let i = 1; i <= 7; i++)
        files.push(await runFeatures(samples, join(dir, 'shards', `f.${ext}`), `${i}/7`, fprov));
      const merged = join(dir, `m.${ext}`);
      await mergeShards(files, merged);
      expect(bytes(merged).equals(bytes(whole))).toBe(true);
      expect(bytes(provenancePath(merged)).equals(bytes(provenancePath(whole)))).toBe(true);
      if (ext === 'npy') {
        expect(bytes(join(dir, 'm.samples.csv')).equals(bytes(join(dir, 'f.samples.csv')))).toBe(true);
        expect(bytes(join(dir, 'm.columns.csv')).equals(bytes(join(dir, 'f.columns.csv')))).toBe(true);
      }
    });
  }

  it('converts between formats: CSV shards merged into Arrow read back the same diagrams', async () => {
    const dir = tempDir();
    const files: string[] = [];
    for (let i = 1; i <= 3; i++) files.push(await runDiagrams(samples, join(dir, 'd.csv'), `${i}/3`, prov));
    await mergeShards(files, join(dir, 'm.arrow'));
    const back = await readDiagramsOutput(join(dir, 'm.arrow'));
    const csv = await readDiagramsOutput(await runDiagrams(samples, join(dir, 'whole.csv'), undefined, prov));
    expect(back).toEqual(csv);
  });

  it('refuses a missing shard, a repeated shard and mixed shard counts with one line each', async () => {
    const dir = tempDir();
    const files: string[] = [];
    for (let i = 1; i <= 7; i++) files.push(await runDiagrams(samples, join(dir, 'd.csv'), `${i}/7`, prov));
    const out = join(dir, 'm.csv');
    expect(
      await userError(
        mergeShards(
          files.filter((_, k) => k !== 2),
          out,
        ),
      ),
    ).toMatch(/shard 3\/7 is missing \(got 6 of 7\); run it with --shard 3\/7 and merge again/);
    expect(await userError(mergeShards(files.slice(0, 4), out))).toMatch(
      /shards 5\/7, 6\/7, 7\/7 are missing/,
    );
    const copy = join(dir, 'copy-of-2.csv');
    copyFileSync(files[1], copy);
    copyFileSync(provenancePath(files[1]), provenancePath(copy));
    expect(await userError(mergeShards([...files, copy], out))).toMatch(
      /copy-of-2\.csv: is shard 2\/7 again \(also .*d\.shard-2-of-7\.csv\); give each shard once/,
    );
    const three = await runDiagrams(samples, join(dir, 'other', 'd.csv'), '1/3', prov);
    expect(await userError(mergeShards([...files, three], out))).toMatch(
      /is shard 1\/3 but .* is of 7 shards/,
    );
    expect(existsSync(out)).toBe(false);
  });

  it('refuses shards made with other options, another version, or other data', async () => {
    const dir = tempDir();
    const files: string[] = [];
    for (let i = 1; i <= 3; i++) files.push(await runDiagrams(samples, join(dir, 'd.csv'), `${i}/3`, prov));
    const out = join(dir, 'm.csv');
    const odd = await runDiagrams(samples, join(dir, 'odd', 'd.csv'), '2/3', {
      ...prov,
      options: { ...prov.options, degrees: [0] },
    });
    expect(await userError(mergeShards([files[0], odd, files[2]], out))).toMatch(
      /was made with different settings from .*\(options\.degrees is \[0\] here but \[0,1\] there\); rerun this shard/,
    );
    const newer = await runDiagrams(samples, join(dir, 'newer', 'd.csv'), '3/3', {
      ...prov,
      version: '9.9.9',
    });
    expect(await userError(mergeShards([files[0], files[1], newer], out))).toMatch(
      /version is "9.9.9" here but/,
    );
    const changed = samples.map((s, i) => (i === 0 ? { ...s, label: 'relabelled' } : s));
    const other = await runDiagrams(changed, join(dir, 'changed', 'd.csv'), '2/3', prov);
    expect(await userError(mergeShards([files[0], other, files[2]], out))).toMatch(
      /was made from different data/,
    );
    // Per-shard settings (worker count, output name) may differ.
    const fewerWorkers = await runDiagrams(samples, join(dir, 'w', 'x.csv'), '2/3', {
      ...prov,
      options: { ...prov.options, workers: 1, out: 'x.csv' },
    });
    await mergeShards([files[0], fewerWorkers, files[2]], out);
    expect(existsSync(out)).toBe(true);
  });

  it('refuses files that are not shard outputs, and --out naming an input', async () => {
    const dir = tempDir();
    const files: string[] = [];
    for (let i = 1; i <= 2; i++) files.push(await runDiagrams(samples, join(dir, 'd.csv'), `${i}/2`, prov));
    const whole = await runDiagrams(samples, join(dir, 'whole.csv'), undefined, prov);
    expect(await userError(mergeShards([files[0], whole], join(dir, 'm.csv')))).toMatch(
      /was not written by a sharded run/,
    );
    expect(await userError(mergeShards(files, files[0]))).toMatch(/--out names one of the shard files/);
    rmSync(provenancePath(files[1]));
    expect(await userError(mergeShards(files, join(dir, 'm.csv')))).toMatch(/has no provenance sidecar/);
    expect(await userError(mergeShards([join(dir, 'nope.csv')], join(dir, 'm.csv')))).toMatch(
      /file not found/,
    );
    expect(await userError(mergeShards([], join(dir, 'm.csv')))).toMatch(/no shard outputs given/);
  });

  it('refuses a shard file holding a sample its record does not list (a file edited or swapped)', async () => {
    const dir = tempDir();
    const files: string[] = [];
    for (let i = 1; i <= 2; i++) files.push(await runDiagrams(samples, join(dir, 'd.csv'), `${i}/2`, prov));
    // Swap the data of the two shards, keeping each sidecar: the records no longer describe the files, and
    // the size and SHA-256 each sidecar recorded at writing no longer match.
    const a = readFileSync(files[0]);
    writeFileSync(files[0], readFileSync(files[1]));
    writeFileSync(files[1], a);
    expect(await userError(mergeShards(files, join(dir, 'm.csv')))).toMatch(
      /d\.shard-1-of-2\.csv: d\.shard-1-of-2\.csv (holds \d+ bytes but \d+ were written \(truncated or changed\)|was changed after it was written)/,
    );
  });

  it('writes nothing when the merge fails part-way', async () => {
    const dir = tempDir();
    const files: string[] = [];
    for (let i = 1; i <= 3; i++) files.push(await runDiagrams(samples, join(dir, 'd.csv'), `${i}/3`, prov));
    writeFileSync(files[2], 'sample,label,degree,birth,death\nx,y,1,0.5,0.25\n');
    const before = readdirSync(dir).sort();
    await userError(mergeShards(files, join(dir, 'm.csv')));
    expect(readdirSync(dir).sort()).toEqual(before);
  });
});
