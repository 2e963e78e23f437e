import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { provenance } from '../../src/core/version.js';
import type { DiagramSample } from '../../src/io/dataset.js';
import { writeDiagramsOutput } from '../../src/io/merge.js';
import { planShard, resolveShard } from '../../src/io/shard.js';
import { runCli, tempDir } from '../helpers/cli.js';

/** Made-up diagrams for the file mechanics of the command (demo data, no numeric claim). */
function demoSamples(count = 21): DiagramSample[] {
  const rng = new Random(17);
  return Array.from({ length: count }, (_, i): DiagramSample => {
    const b = rng.uniform(0, 0.4);
    return {
      kind: 'diagrams',
      id: `pump-window-${i}`,
      label: i % 2 === 0 ? 'healthy' : 'cavitating',
      diagrams: [
        { degree: 0, births: Float64Array.of(0, 0), deaths: Float64Array.of(rng.uniform(0.1, 1), Infinity) },
        { degree: 1, births: Float64Array.of(b), deaths: Float64Array.of(b + rng.uniform(0.05, 0.5)) },
      ],
    };
  });
}

async function writeShards(dir: string, n: number): Promise<{ files: string[]; whole: string }> {
  const samples = demoSamples();
  const prov = provenance('diagrams', { degrees: [0, 1], out: 'd.csv' });
  const sets = (list: DiagramSample[]) => list.map((s) => ({ sample: s.id, label: s.label, diagrams: s.diagrams }));
  const whole = join(dir, 'whole.csv');
  await writeDiagramsOutput(whole, sets(samples), prov);
  const files: string[] = [];
  for (let i = 1; i <= n; i++) {
    const plan = planShard({ samples, out: join(dir, 'out', 'd.csv'), shard: resolveShard(`${i}/${n}`, {}), output: 'diagrams', provenance: prov });
    await writeDiagramsOutput(plan.out, sets(plan.samples), plan.provenance);
    files.push(plan.out);
  }
  return { files, whole };
}

describe('landform merge', () => {
  it('merges shard outputs into the unsharded file and says what it did', async () => {
    const dir = tempDir();
    const { files, whole } = await writeShards(dir, 3);
    const out = join(dir, 'merged.csv');
    const r = runCli(['merge', ...files, '--out', out]);
    expect(r.stderr).toMatch(/merged 3 shards \(21 samples, diagrams\)/);
    expect(r.code).toBe(0);
    expect(readFileSync(out).equals(readFileSync(whole))).toBe(true);
  });

  it('refuses a missing shard with one line, exit 2, and writes nothing', async () => {
    const dir = tempDir();
    const { files } = await writeShards(dir, 3);
    const out = join(dir, 'merged.csv');
    const r = runCli(['merge', files[0], files[2], '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^landform: shard 2\/3 is missing \(got 2 of 3\); run it with --shard 2\/3 and merge again/);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(dir).sort()).toEqual(['out', 'whole.csv', 'whole.csv.provenance.json']);
  });

  it('refuses a shard given twice, and a missing --out', async () => {
    const dir = tempDir();
    const { files } = await writeShards(dir, 2);
    const twice = runCli(['merge', files[0], files[1], files[1], '--out', join(dir, 'm.csv')]);
    expect(twice.code).toBe(2);
    expect(twice.stderr).toMatch(/is shard 2\/2 again .* give each shard once/);
    const noOut = runCli(['merge', ...files]);
    expect(noOut.code).toBe(2);
    expect(noOut.stderr).toMatch(/--out FILE is required/);
  });
});
