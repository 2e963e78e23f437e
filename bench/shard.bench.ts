import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DiagramSet } from '../src/core/diagram.js';
import { Random } from '../src/core/random.js';
import type { DiagramSample } from '../src/core/sample.js';
import { provenance } from '../src/core/version.js';
import { formatDiagramCsv, parseDiagramCsv } from '../src/io/diagram-csv.js';
import { mergeShards } from '../src/io/merge.js';
import { writeDiagramsOutput } from '../src/io/outputs.js';
import { writeWithProvenance } from '../src/io/provenance-file.js';
import { planShard, resolveShard, shardOf } from '../src/io/shard.js';
import { report, time } from './harness.js';

/**
 * The merge step against its floor: reading, parsing, formatting and writing the unsharded diagram CSV once
 * (what any merge must at least do). Goal of our own: merging 8 shards ≤ 2× the floor. Also Arrow against CSV
 * for the same diagrams, and the shard assignment's throughput.
 */
export async function run(): Promise<void> {
  const rng = new Random(1);
  const count = 2000;
  const samples: DiagramSample[] = Array.from({ length: count }, (_, i) => {
    const n = 20 + rng.int(20);
    const births = Float64Array.from({ length: n }, () => rng.uniform(0, 1));
    const deaths = births.map((b) => b + rng.uniform(0, 1));
    return {
      kind: 'diagrams',
      id: `window-${i}`,
      label: `class-${i % 3}`,
      diagrams: [
        {
          degree: 0,
          births: new Float64Array(n),
          deaths: Float64Array.from(deaths, (d, k) => (k === 0 ? Infinity : d)),
        },
        { degree: 1, births, deaths },
      ],
    };
  });
  const sets: DiagramSet[] = samples.map((s) => ({ sample: s.id, label: s.label, diagrams: s.diagrams }));
  const dir = mkdtempSync(join(tmpdir(), 'landform-bench-shard-'));
  try {
    const prov = provenance('diagrams', { degrees: [0, 1] });
    const whole = join(dir, 'whole.csv');
    await writeDiagramsOutput(whole, sets, prov);
    const shards: string[] = [];
    for (let i = 1; i <= 8; i++) {
      const plan = planShard<DiagramSample>({
        samples,
        out: join(dir, 'shards', 'd.csv'),
        shard: resolveShard(`${i}/8`, {}),
        output: 'diagrams',
        settings: prov.options,
      });
      await writeDiagramsOutput(
        plan.out,
        plan.samples.map((s) => ({ sample: s.id, label: s.label, diagrams: s.diagrams })),
        plan.stamp(prov),
      );
      shards.push(plan.out);
    }
    const floor = await time(() => {
      const parsed = parseDiagramCsv(readFileSync(whole, 'utf8'), whole);
      writeWithProvenance(join(dir, 'floor.csv'), formatDiagramCsv(parsed), prov);
    }, 3);
    const merge = await time(() => mergeShards(shards, join(dir, 'merged.csv')), 3);
    const csvWrite = await time(() => writeDiagramsOutput(join(dir, 'w.csv'), sets, prov), 3);
    const arrowWrite = await time(() => writeDiagramsOutput(join(dir, 'w.arrow'), sets, prov), 3);
    const ids = samples.map((s) => s.id);
    const assign = await time(() => {
      let sum = 0;
      for (let r = 0; r < 25; r++) for (const id of ids) sum += shardOf(id, 16);
      return sum;
    }, 3);
    const mergeRatio = merge.ms / floor.ms;
    report(`merge of 8 shards, ${count} samples, ${(statSync(whole).size / 1e6).toFixed(1)} MB diagram CSV`, [
      { name: 'floor: parse + format + write the unsharded CSV', value: floor.ms, unit: 'ms' },
      { name: 'merge 8 shards (checks, parse, order, write)', value: merge.ms, unit: 'ms' },
      { name: 'merge / floor', value: mergeRatio, unit: '×', goal: '≤ 2×', met: mergeRatio <= 2 },
      { name: 'write CSV', value: csvWrite.ms, unit: 'ms' },
      { name: 'write Arrow', value: arrowWrite.ms, unit: 'ms' },
      { name: 'Arrow / CSV write time', value: arrowWrite.ms / csvWrite.ms, unit: '×' },
      {
        name: 'Arrow / CSV file size',
        value: statSync(join(dir, 'w.arrow')).size / statSync(join(dir, 'w.csv')).size,
        unit: '×',
      },
      {
        name: 'shard assignment (FNV-1a of the id)',
        value: (25 * count) / (assign.ms / 1000) / 1e6,
        unit: 'M ids/s',
      },
    ]);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
