import { Random } from '../src/core/random.js';
import { multiplierBand } from '../src/report/bands.js';
import { permutationTest } from '../src/report/permutation.js';
import { type GridSpec, type LandscapeStack, sampledNorm } from '../src/report/stack.js';
import { report, time } from './harness.js';

/**
 * The report's statistics against straightforward versions measured in the same run:
 * - permutation test: ours (L2) scores a relabelling from the samples' Gram matrix in nA² additions; the
 *   'direct' method keeps the column sums and re-sums only group A's rows (partial shuffle); the naive one shuffles everything, copies both groups into arrays of rows and averages each from scratch;
 * - multiplier band: ours accumulates Σ ξ_i (λ_i − λ̄) into one preallocated buffer per draw; the naive one
 *   builds a new array of centred rows and maps over them each draw.
 * And the time to render the report's heaviest chart (a mean landscape with bands for 3 classes × 4 layers).
 */
function stack(random: Random, n: number, depth: number, grid: GridSpec): LandscapeStack {
  const values = new Float64Array(n * depth * grid.count);
  for (let i = 0; i < values.length; i++) values[i] = Math.max(0, random.normal(0.2, 0.1));
  return { samples: n, depth, grid, values };
}

function naivePermutation(a: LandscapeStack, b: LandscapeStack, permutations: number, seed: number): number {
  const width = a.depth * a.grid.count;
  const rows: number[][] = [];
  for (let i = 0; i < a.samples; i++) rows.push(Array.from(a.values.subarray(i * width, (i + 1) * width)));
  for (let i = 0; i < b.samples; i++) rows.push(Array.from(b.values.subarray(i * width, (i + 1) * width)));
  const mean = (group: number[][]) =>
    group[0].map((_, j) => group.reduce((s, r) => s + r[j], 0) / group.length);
  const distance = (x: number[], y: number[]) =>
    sampledNorm(Float64Array.from(x.map((v, j) => v - y[j])), a.depth, a.grid, 2);
  const observed = distance(mean(rows.slice(0, a.samples)), mean(rows.slice(a.samples)));
  const random = new Random(seed);
  let exceed = 0;
  for (let r = 0; r < permutations; r++) {
    const order = random.shuffle(rows.map((_, i) => i));
    const ga = order.slice(0, a.samples).map((i) => rows[i]);
    const gb = order.slice(a.samples).map((i) => rows[i]);
    if (distance(mean(ga), mean(gb)) >= observed) exceed++;
  }
  return (1 + exceed) / (1 + permutations);
}

function naiveBand(s: LandscapeStack, draws: number, seed: number): number {
  const width = s.depth * s.grid.count;
  const rows = Array.from({ length: s.samples }, (_, i) =>
    Array.from(s.values.subarray(i * width, (i + 1) * width)),
  );
  const mean = rows[0].map((_, j) => rows.reduce((acc, r) => acc + r[j], 0) / rows.length);
  const random = new Random(seed);
  const theta: number[] = [];
  for (let b = 0; b < draws; b++) {
    const xi = rows.map(() => random.normal());
    const centred = rows.map((r) => r.map((v, j) => v - mean[j]));
    const sum = mean.map((_, j) => centred.reduce((acc, r, i) => acc + xi[i] * r[j], 0));
    theta.push(Math.max(...sum.slice(0, s.grid.count).map(Math.abs)) / Math.sqrt(rows.length));
  }
  theta.sort((x, y) => x - y);
  return theta[Math.ceil(0.95 * draws) - 1] / Math.sqrt(rows.length);
}

export async function run(): Promise<void> {
  const random = new Random(1);
  const grid: GridSpec = { start: 0, stop: 2, count: 100 };
  const depth = 5;
  const a = stack(random, 40, depth, grid);
  const b = stack(random, 40, depth, grid);
  const permutations = 999;
  const fast = await time(() => permutationTest(a, b, { permutations }), 5);
  const direct = await time(() => permutationTest(a, b, { permutations, method: 'direct' }), 5);
  const slow = await time(() => naivePermutation(a, b, permutations, 1), 3);
  const band = stack(random, 60, depth, grid);
  const fastBand = await time(() => multiplierBand(band, { draws: 1000 }), 5);
  const slowBand = await time(() => naiveBand(band, 1000, 1), 2, 0);

  const { meanBandChart, renderSvg } = await import('../src/report/charts.js');
  const classes = ['intact', 'broken-strut', 'merged-cells'].map((label) => ({
    label,
    band: multiplierBand(stack(random, 25, depth, grid), { draws: 200 }),
  }));
  const chart = await time(() => renderSvg(meanBandChart(1, classes, 4)), 5);

  report('report statistics and charts', [
    {
      name: 'permutation test, 2 × 40 samples, 5 × 100 values, 999 relabellings',
      value: fast.ms,
      unit: 'ms',
    },
    { name: '  re-summing group A per relabelling (method direct)', value: direct.ms, unit: 'ms' },
    { name: '  naive (full shuffle, arrays of rows, means from scratch)', value: slow.ms, unit: 'ms' },
    { name: '  Gram scoring over re-summing', value: direct.ms / fast.ms, unit: '×' },
    { name: '  speed-up over naive', value: slow.ms / fast.ms, unit: '×' },
    { name: 'multiplier band, 60 samples, 5 × 100 values, 1000 draws', value: fastBand.ms, unit: 'ms' },
    { name: '  naive (new centred arrays and maps per draw)', value: slowBand.ms, unit: 'ms' },
    { name: '  speed-up over naive', value: slowBand.ms / fastBand.ms, unit: '×' },
    { name: 'mean-landscape chart to SVG (3 classes × 4 layers × 100 points)', value: chart.ms, unit: 'ms' },
  ]);
}
