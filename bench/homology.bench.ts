import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Random } from '../src/core/random.js';
import { cubicalPersistence } from '../src/homology/cubical.js';
import { pairwiseDistances } from '../src/homology/metric.js';
import { computeDiagramsParallel } from '../src/homology/parallel.js';
import { ripsPersistence } from '../src/homology/rips.js';
import type { PointSample } from '../src/io/dataset.js';
import { report, time } from './harness.js';

/**
 * Persistent homology: each figure beside a floor measured in the same run.
 *
 * - Rips H0+H1 of 1,000 and 2,000 uniform points in the unit cube, whole process: `landform diagrams` on
 *   a points CSV against a floor process that reads the same file, computes every pairwise distance and
 *   sorts them (native typed-array sort). Wall time and CPU time (user + system, from the child's own
 *   resource usage, which is steadier on a shared machine) and the child's peak resident memory.
 * - Rips H0–H2 of 400 points near the unit sphere (with and without the edge collapse), and cubical H0+H1
 *   of a 512 × 512 image, in process.
 * - 200 clouds of 300 points on 2 worker threads against 1.
 */
const root = fileURLToPath(new URL('../../', import.meta.url));
const cli = join(root, 'dist/src/cli/main.js');

/** A preload that prints the process's resource usage as one JSON line on stderr when it exits. */
const usageHook = `data:text/javascript,process.on('exit',()=>{const u=process.resourceUsage();process.stderr.write('\\nUSAGE '+JSON.stringify({cpu:(u.userCPUTime+u.systemCPUTime)/1000,rss:u.maxRSS/1024})+'\\n')})`;

const floorScript = `
import { readFileSync } from 'node:fs';
const text = readFileSync(process.argv[2], 'utf8');
const lines = text.split('\\n');
const dim = lines[0].split(',').length - 2;
const rows = lines.slice(1).filter((l) => l !== '');
const coords = new Float64Array(rows.length * dim);
rows.forEach((l, i) => { const f = l.split(','); for (let d = 0; d < dim; d++) coords[i * dim + d] = Number(f[2 + d]); });
const n = rows.length;
const dist = new Float64Array((n * (n - 1)) / 2);
for (let j = 1, e = 0; j < n; j++) for (let i = 0; i < j; i++, e++) {
  let s = 0; for (let d = 0; d < dim; d++) { const x = coords[i * dim + d] - coords[j * dim + d]; s += x * x; }
  dist[e] = Math.sqrt(s);
}
dist.sort();
if (!(dist[0] >= 0)) throw new Error('unsorted');
`;

interface ChildRun {
  wall: number;
  cpu: number;
  rss: number;
}

function runChild(args: string[]): ChildRun {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--import', usageHook, ...args], {
    encoding: 'utf8',
    env: { ...process.env, CI: 'true' },
  });
  const wall = performance.now() - t0;
  if (r.status !== 0) throw new Error(`child failed (${r.status}): ${r.stderr}`);
  const m = /USAGE (\{.*\})/.exec(r.stderr);
  const usage = m ? (JSON.parse(m[1]) as { cpu: number; rss: number }) : { cpu: Number.NaN, rss: Number.NaN };
  return { wall, cpu: usage.cpu, rss: usage.rss };
}

function medianRun(args: string[], repeats: number): ChildRun {
  const runs = Array.from({ length: repeats }, () => runChild(args));
  const med = (xs: number[]): number => xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  return {
    wall: med(runs.map((r) => r.wall)),
    cpu: med(runs.map((r) => r.cpu)),
    rss: Math.max(...runs.map((r) => r.rss)),
  };
}

function cubeCloudCsv(file: string, count: number, seed: number): void {
  const rng = new Random(seed);
  const lines = ['sample,label,x,y,z'];
  for (let i = 0; i < count; i++) lines.push(`cloud,a,${rng.next()},${rng.next()},${rng.next()}`);
  writeFileSync(file, lines.join('\n') + '\n');
}

async function wholeProcess(dir: string, count: number, goal: number, memoryGoal?: number): Promise<void> {
  const input = join(dir, `cube-${count}.csv`);
  cubeCloudCsv(input, count, 1000 + count);
  const floorFile = join(dir, 'floor.mjs');
  writeFileSync(floorFile, floorScript);
  const repeats = 3;
  const floor = medianRun([floorFile, input], repeats);
  const ours = medianRun(
    [cli, 'diagrams', input, '--degrees', '0,1', '--workers', '1', '--out', join(dir, `d-${count}.csv`)],
    repeats,
  );
  const figures = [
    { name: 'floor: read + all distances + sort, wall', value: floor.wall, unit: 'ms' },
    { name: 'landform diagrams H0+H1, wall', value: ours.wall, unit: 'ms' },
    {
      name: 'ratio to floor, wall',
      value: ours.wall / floor.wall,
      unit: '×',
      goal: `≤ ${goal}`,
      met: ours.wall / floor.wall <= goal,
    },
    { name: 'floor, CPU', value: floor.cpu, unit: 'ms' },
    { name: 'landform diagrams H0+H1, CPU', value: ours.cpu, unit: 'ms' },
    {
      name: 'ratio to floor, CPU',
      value: ours.cpu / floor.cpu,
      unit: '×',
      goal: `≤ ${goal}`,
      met: ours.cpu / floor.cpu <= goal,
    },
    {
      name: 'peak resident memory of landform diagrams',
      value: ours.rss,
      unit: 'MB',
      ...(memoryGoal ? { goal: `≤ ${memoryGoal}`, met: ours.rss <= memoryGoal } : {}),
    },
    { name: 'peak resident memory of the floor', value: floor.rss, unit: 'MB' },
  ];
  report(`Rips H0+H1, ${count} uniform points in R³, whole process`, figures);
}

/** Median CPU time (user + system, this process) of `repeats` runs, in ms: steadier than wall time on a busy machine. */
async function cpuTime(fn: () => unknown | Promise<unknown>, repeats: number): Promise<number> {
  const xs: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const u = process.cpuUsage();
    await fn();
    const d = process.cpuUsage(u);
    xs.push((d.user + d.system) / 1000);
  }
  return xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)];
}

function sphereCloud(count: number, seed: number): Float64Array {
  const rng = new Random(seed);
  const c = new Float64Array(count * 3);
  for (let i = 0; i < count; i++) {
    const x = rng.normal();
    const y = rng.normal();
    const z = rng.normal();
    const r = Math.hypot(x, y, z);
    c[3 * i] = x / r + 0.02 * rng.normal();
    c[3 * i + 1] = y / r + 0.02 * rng.normal();
    c[3 * i + 2] = z / r + 0.02 * rng.normal();
  }
  return c;
}

export async function run(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'landform-bench-homology-'));
  try {
    await wholeProcess(dir, 1000, 4);
    await wholeProcess(dir, 2000, 6, 300);

    const sphere = sphereCloud(400, 7);
    const edges = pairwiseDistances(sphere, 400, 3);
    const sortFloor = await time(() => Float64Array.from(edges).sort(), 3);
    const sortCpu = await cpuTime(() => Float64Array.from(edges).sort(), 3);
    const h1 = await time(() => ripsPersistence(400, edges, { maxDegree: 1 }), 3);
    // The first degree-2 run in this process (code not yet optimised), then the median of three more.
    const h2First = await cpuTime(() => ripsPersistence(400, edges, { maxDegree: 2 }), 1);
    const h2Cpu = await cpuTime(() => ripsPersistence(400, edges, { maxDegree: 2 }), 3);
    const plainCpu = await cpuTime(() => ripsPersistence(400, edges, { maxDegree: 2, collapse: false }), 1);
    report('Rips H0–H2, 400 points near the unit sphere', [
      { name: 'floor: sort the 79,800 distances, wall', value: sortFloor.ms, unit: 'ms' },
      { name: 'floor, CPU', value: sortCpu, unit: 'ms' },
      { name: 'H0+H1, wall', value: h1.ms, unit: 'ms' },
      { name: 'H0–H2, first run in the process, CPU', value: h2First, unit: 'ms' },
      { name: 'H0–H2, CPU (median of 3)', value: h2Cpu, unit: 'ms', goal: '≤ 1000 ms', met: h2Cpu <= 1000 },
      { name: 'H0–H2 ratio to floor, CPU', value: h2Cpu / sortCpu, unit: '×' },
      { name: 'H0–H2 without the edge collapse, CPU', value: plainCpu, unit: 'ms' },
      { name: 'speed-up from the collapse', value: plainCpu / h2Cpu, unit: '×' },
    ]);

    const rng = new Random(512);
    const image = new Float64Array(512 * 512);
    for (let y = 0; y < 512; y++)
      for (let x = 0; x < 512; x++)
        image[y * 512 + x] = Math.sin(x / 23) * Math.cos(y / 31) + 0.3 * rng.normal();
    const imageFloor = await time(() => Float64Array.from(image).sort(), 3);
    const imageFloorCpu = await cpuTime(() => Float64Array.from(image).sort(), 3);
    const cub = await time(() => cubicalPersistence(image, [512, 512]), 3);
    const cubCpu = await cpuTime(() => cubicalPersistence(image, [512, 512]), 3);
    report('Cubical H0+H1, 512 × 512 image (smooth pattern plus noise)', [
      { name: 'floor: sort the 262,144 pixel values, wall', value: imageFloor.ms, unit: 'ms' },
      { name: 'floor, CPU', value: imageFloorCpu, unit: 'ms' },
      { name: 'cubical H0+H1, wall', value: cub.ms, unit: 'ms', goal: '≤ 1000 ms', met: cub.ms <= 1000 },
      { name: 'cubical H0+H1, CPU', value: cubCpu, unit: 'ms', goal: '≤ 1000 ms', met: cubCpu <= 1000 },
      { name: 'ratio to floor, CPU', value: cubCpu / imageFloorCpu, unit: '×' },
    ]);

    const clouds: PointSample[] = [];
    const cr = new Random(300);
    for (let k = 0; k < 200; k++) {
      const coords = new Float64Array(300 * 3);
      for (let i = 0; i < coords.length; i++) coords[i] = cr.next();
      clouds.push({ kind: 'points', id: `c${k}`, label: 'a', dim: 3, count: 300, coords });
    }
    const options = { degrees: [0, 1] };
    const one = await time(() => computeDiagramsParallel(clouds, options, { workers: 1 }), 1, 0);
    const two = await time(() => computeDiagramsParallel(clouds, options, { workers: 2 }), 1, 0);
    report('200 clouds of 300 points, H0+H1, worker threads', [
      { name: 'one thread', value: one.ms, unit: 'ms' },
      { name: 'two workers', value: two.ms, unit: 'ms' },
      {
        name: 'speed-up (wall; needs two idle cores)',
        value: one.ms / two.ms,
        unit: '×',
        goal: '≥ 1.7',
        met: one.ms / two.ms >= 1.7,
      },
    ]);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
