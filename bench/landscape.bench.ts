import type { Diagram } from '../src/core/diagram.js';
import { Random } from '../src/core/random.js';
import { exactLandscape } from '../src/landscape/exact-landscape.js';
import { type Grid, gridPoints } from '../src/landscape/grid.js';
import { sampleLandscapeInto } from '../src/landscape/sampled-landscape.js';
import { report, time } from './harness.js';

/**
 * Landscapes: the exact sweep and the sampling fast path, each against the naive method measured in the
 * same run — every tent evaluated at every grid point, then the top K selected per point.
 * Diagrams: births uniform on [0, 1], persistence exponential with mean 0.05 (many short bars, a few long
 * ones), the shape of a noisy point cloud's H1 (synthetic, seeded).
 */
function randomDiagram(random: Random, n: number): Diagram {
  const births = new Float64Array(n);
  const deaths = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    births[i] = random.uniform(0, 1);
    deaths[i] = births[i] - 0.05 * Math.log(1 - random.next() * 0.999999);
  }
  return { degree: 1, births, deaths };
}

/** The naive method: all n tents at every grid point into a scratch array, then top-K selection by insertion. */
function naiveSample(
  diagram: Diagram,
  grid: Grid,
  depth: number,
  out: Float64Array,
  scratch: Float64Array,
): void {
  const ts = gridPoints(grid);
  const { births, deaths } = diagram;
  const n = births.length;
  const top = new Float64Array(depth);
  for (let i = 0; i < ts.length; i++) {
    const t = ts[i];
    // Invariant: scratch[0..p) holds every tent value at t of pairs 0..p-1.
    for (let p = 0; p < n; p++) scratch[p] = Math.max(0, Math.min(t - births[p], deaths[p] - t));
    top.fill(0);
    for (let p = 0; p < n; p++) {
      const h = scratch[p];
      if (h <= top[depth - 1]) continue;
      let k = depth - 1;
      while (k > 0 && top[k - 1] < h) {
        top[k] = top[k - 1];
        k--;
      }
      top[k] = h;
    }
    for (let k = 0; k < depth; k++) out[k * ts.length + i] = top[k];
  }
}

function span(d: Diagram): Grid {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < d.births.length; i++) {
    lo = Math.min(lo, d.births[i]);
    hi = Math.max(hi, d.deaths[i]);
  }
  return { start: lo, stop: hi, count: 1000 };
}

export async function run(): Promise<void> {
  const random = new Random(20261202);
  const depth = 5;
  const figures = [];
  for (const n of [1_000, 10_000, 100_000]) {
    const diagram = randomDiagram(random, n);
    const exact = await time(() => exactLandscape(diagram, { maxDepth: depth }), n >= 100_000 ? 5 : 11, 3);
    const full = n <= 10_000 ? await time(() => exactLandscape(diagram), 3) : undefined;
    const grid = span(diagram);
    const out = new Float64Array(depth * grid.count);
    const scratch = new Float64Array(n);
    const naive = await time(() => naiveSample(diagram, grid, depth, out, scratch), n >= 100_000 ? 1 : 3);
    const sampled = await time(() => sampleLandscapeInto(diagram, grid, depth, out, 0), 5, 2);
    const breakpoints = exactLandscape(diagram, { maxDepth: depth }).layers.reduce(
      (s, l) => s + l.t.length,
      0,
    );
    figures.push({
      name: `exact, ${n} pairs, depth ${depth} (${breakpoints} breakpoints)`,
      value: exact.ms,
      unit: 'ms',
      ...(n === 10_000 ? { goal: '≤ 20 ms', met: exact.ms <= 20 } : {}),
    });
    if (full !== undefined) {
      const all = exactLandscape(diagram);
      const count = all.layers.reduce((s, l) => s + l.t.length, 0);
      figures.push({
        name: `exact, ${n} pairs, all ${all.layers.length} layers (${count} breakpoints)`,
        value: full.ms,
        unit: 'ms',
      });
    }
    figures.push({
      name: `naive, ${n} pairs, 1000 grid points, depth ${depth}`,
      value: naive.ms,
      unit: 'ms',
    });
    figures.push({
      name: `  naive ÷ exact at ${n} pairs`,
      value: naive.ms / exact.ms,
      unit: '×',
      ...(n === 10_000 ? { goal: '≥ 50×', met: naive.ms / exact.ms >= 50 } : {}),
    });
    figures.push({
      name: `sampleLandscape, ${n} pairs, 1000 grid points, depth ${depth}`,
      value: sampled.ms,
      unit: 'ms',
    });
    figures.push({
      name: `  naive ÷ sampleLandscape at ${n} pairs`,
      value: naive.ms / sampled.ms,
      unit: '×',
    });
  }
  // Deeply nested pairs (i, 2n − i): n layers of one tent each, O(n) breakpoints — a sweep that walked the
  // nested pieces once per layer would do n²/2 steps here.
  const nestedCount = 10_000;
  const nested: Diagram = {
    degree: 1,
    births: Float64Array.from({ length: nestedCount }, (_, i) => i),
    deaths: Float64Array.from({ length: nestedCount }, (_, i) => 2 * nestedCount - i),
  };
  const nestedTime = await time(() => exactLandscape(nested), 3);
  figures.push({
    name: `exact, ${nestedCount} nested pairs, all ${nestedCount} layers`,
    value: nestedTime.ms,
    unit: 'ms',
  });
  report('exact landscapes (sweep) vs naive sampling', figures);

  const diagrams = Array.from({ length: 10_000 }, () => randomDiagram(random, 100));
  const grid: Grid = { start: 0, stop: 1.2, count: 100 };
  const size = depth * grid.count;
  const out = new Float64Array(diagrams.length * size);
  const fast = await time(() => {
    for (let s = 0; s < diagrams.length; s++) sampleLandscapeInto(diagrams[s], grid, depth, out, s * size);
  }, 5);
  const scratch = new Float64Array(100);
  const naive = await time(() => {
    for (let s = 0; s < diagrams.length; s++)
      naiveSample(diagrams[s], grid, depth, out.subarray(s * size, (s + 1) * size), scratch);
  }, 3);
  const rate = diagrams.length / (fast.ms / 1000);
  report('sampled landscapes: 10,000 diagrams × 100 pairs, depth 5, 100 grid points', [
    { name: 'sampleLandscape', value: rate, unit: 'diagrams/s', goal: '≥ 20,000/s', met: rate >= 20_000 },
    { name: 'naive', value: diagrams.length / (naive.ms / 1000), unit: 'diagrams/s' },
    { name: '  naive ÷ sampleLandscape (time)', value: naive.ms / fast.ms, unit: '×' },
  ]);
}
