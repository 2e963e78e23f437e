import { Random } from '../core/random.js';
import { holmAdjust } from './holm.js';
import { type LandscapeStack, sampledNorm } from './stack.js';

/**
 * A permutation test of equal mean landscapes between two groups (Robinson & Turner, "Hypothesis testing
 * for topological data analysis", Journal of Applied and Computational Topology, 2017). The statistic is
 * the Lp distance between the two sampled mean landscapes, ‖λ̄_A − λ̄_B‖_p (L2 by default; see `sampledNorm`);
 * the labels are shuffled `permutations` times and
 *   p = (1 + #{permuted statistic ≥ observed}) / (1 + permutations),
 * which is a valid p-value for any number of permutations (it counts the observed labelling as one of them).
 */
export interface PermutationOptions {
  /** Number of random relabellings. Default 999. */
  permutations?: number;
  /** The p of the Lp distance, ≥ 1 or Infinity. Default 2. */
  p?: number;
  /** Seed of the relabellings. Default 1. */
  seed?: number;
  onProgress?: (done: number, total: number) => void;
}

export const DEFAULT_PERMUTATION_OPTIONS = { permutations: 999, p: 2, seed: 1 } as const;

export interface PermutationResult {
  statistic: number;
  p: number;
  permutations: number;
  /** How many relabellings gave a statistic at least as large as the observed one. */
  exceed: number;
}

export function permutationTest(a: LandscapeStack, b: LandscapeStack, options: PermutationOptions = {}): PermutationResult {
  const permutations = options.permutations ?? DEFAULT_PERMUTATION_OPTIONS.permutations;
  const p = options.p ?? DEFAULT_PERMUTATION_OPTIONS.p;
  const seed = options.seed ?? DEFAULT_PERMUTATION_OPTIONS.seed;
  if (!(p >= 1)) throw new Error(`permutationTest: p ${p} must be ≥ 1`);
  if (!(Number.isInteger(permutations) && permutations >= 1)) throw new Error(`permutationTest: permutations ${permutations} must be ≥ 1`);
  if (a.depth !== b.depth || a.grid.count !== b.grid.count || a.grid.start !== b.grid.start || a.grid.stop !== b.grid.stop) {
    throw new Error('permutationTest: the two groups are not on the same grid and depth');
  }
  const nA = a.samples;
  const nB = b.samples;
  if (nA === 0 || nB === 0) throw new Error('permutationTest: each group needs at least one sample');
  const n = nA + nB;
  const width = a.depth * a.grid.count;
  const all = new Float64Array(n * width);
  all.set(a.values.subarray(0, nA * width), 0);
  all.set(b.values.subarray(0, nB * width), nA * width);
  const total = new Float64Array(width);
  for (let i = 0; i < n; i++) for (let j = 0; j < width; j++) total[j] += all[i * width + j];

  const sumA = new Float64Array(width);
  const diff = new Float64Array(width);
  const statisticOf = (indices: Int32Array): number => {
    sumA.fill(0);
    // Invariant: after k rows, sumA is the sum of the first k rows named by `indices` (group A's members).
    for (let k = 0; k < nA; k++) {
      const base = indices[k] * width;
      for (let j = 0; j < width; j++) sumA[j] += all[base + j];
    }
    for (let j = 0; j < width; j++) diff[j] = sumA[j] / nA - (total[j] - sumA[j]) / nB;
    return sampledNorm(diff, a.depth, a.grid, p);
  };

  const indices = new Int32Array(n);
  for (let i = 0; i < n; i++) indices[i] = i;
  const observed = statisticOf(indices);
  // Floating-point sums of the same rows in another order may differ in the last bits; treat those as ties.
  const threshold = observed - 1e-12 * Math.max(1, Math.abs(observed));
  const random = new Random(seed);
  let exceed = 0;
  const every = Math.max(1, Math.floor(permutations / 100));
  for (let r = 0; r < permutations; r++) {
    // Partial Fisher–Yates: only the first nA positions are needed to define group A.
    for (let k = 0; k < nA; k++) {
      const j = k + random.int(n - k);
      const t = indices[k];
      indices[k] = indices[j];
      indices[j] = t;
    }
    if (statisticOf(indices) >= threshold) exceed++;
    if (options.onProgress && ((r + 1) % every === 0 || r + 1 === permutations)) options.onProgress(r + 1, permutations);
  }
  return { statistic: observed, p: (1 + exceed) / (1 + permutations), permutations, exceed };
}

/** One row of the contrast table: classes a and b compared in one degree. */
export interface ContrastTest {
  a: string;
  b: string;
  degree: number;
  statistic: number;
  p: number;
  pAdjusted: number;
  /** Samples in class a and b. */
  sizes: [number, number];
}

/**
 * Every pair of classes × every degree, each a permutation test, with Holm's correction over the whole
 * family (all pairs × all degrees tested together). `stacks` maps degree → class → stack; classes are
 * paired in the given order (a before b). Each test gets its own seed derived from `seed`, so adding a
 * degree does not change the other tests' relabellings.
 */
export function contrastAll(
  stacks: ReadonlyArray<{ degree: number; classes: ReadonlyArray<{ label: string; stack: LandscapeStack }> }>,
  options: PermutationOptions = {},
): ContrastTest[] {
  const seed = options.seed ?? DEFAULT_PERMUTATION_OPTIONS.seed;
  const jobs: Array<{ degree: number; a: { label: string; stack: LandscapeStack }; b: { label: string; stack: LandscapeStack } }> = [];
  for (const d of stacks) {
    for (let i = 0; i < d.classes.length; i++) {
      for (let j = i + 1; j < d.classes.length; j++) jobs.push({ degree: d.degree, a: d.classes[i], b: d.classes[j] });
    }
  }
  const permutations = options.permutations ?? DEFAULT_PERMUTATION_OPTIONS.permutations;
  const total = jobs.length * permutations;
  const raw = jobs.map((job, index) =>
    permutationTest(job.a.stack, job.b.stack, {
      ...options,
      seed: (seed * 7919 + index * 104729 + 1) >>> 0,
      onProgress: options.onProgress ? (done) => options.onProgress?.(index * permutations + done, total) : undefined,
    }),
  );
  const adjusted = holmAdjust(raw.map((r) => r.p));
  return jobs.map((job, index) => ({
    a: job.a.label,
    b: job.b.label,
    degree: job.degree,
    statistic: raw[index].statistic,
    p: raw[index].p,
    pAdjusted: adjusted[index],
    sizes: [job.a.stack.samples, job.b.stack.samples],
  }));
}
