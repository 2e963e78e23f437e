import { Random } from '../core/random.js';
import { holmAdjust } from './holm.js';
import { gridStep, type LandscapeStack, sampledNorm } from './stack.js';

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
  /**
   * How relabellings are scored: 'direct' re-sums group A's rows each time; 'gram' (L2 only) uses the
   * samples' Gram matrix under the trapezoid weights, so a relabelling costs nA² additions instead of
   * nA × width. 'auto' (default) takes 'gram' for p = 2 when the smaller group has fewer samples than the
   * landscape has values. Both give the same p-value up to rounding of exact ties.
   */
  method?: 'auto' | 'direct' | 'gram';
}

export const DEFAULT_PERMUTATION_OPTIONS = { permutations: 999, p: 2, seed: 1 } as const;

export interface PermutationResult {
  statistic: number;
  p: number;
  permutations: number;
  /** How many relabellings gave a statistic at least as large as the observed one. */
  exceed: number;
}

export function permutationTest(
  a: LandscapeStack,
  b: LandscapeStack,
  options: PermutationOptions = {},
): PermutationResult {
  const permutations = options.permutations ?? DEFAULT_PERMUTATION_OPTIONS.permutations;
  const p = options.p ?? DEFAULT_PERMUTATION_OPTIONS.p;
  const seed = options.seed ?? DEFAULT_PERMUTATION_OPTIONS.seed;
  if (!(p >= 1)) throw new Error(`permutationTest: p ${p} must be ≥ 1`);
  if (!(Number.isInteger(permutations) && permutations >= 1))
    throw new Error(`permutationTest: permutations ${permutations} must be ≥ 1`);
  if (
    a.depth !== b.depth ||
    a.grid.count !== b.grid.count ||
    a.grid.start !== b.grid.start ||
    a.grid.stop !== b.grid.stop
  ) {
    throw new Error('permutationTest: the two groups are not on the same grid and depth');
  }
  if (a.samples === 0 || b.samples === 0)
    throw new Error('permutationTest: each group needs at least one sample');
  // The statistic is symmetric in the groups: let group A be the smaller one, whose members are re-summed.
  const [first, second] = a.samples <= b.samples ? [a, b] : [b, a];
  const nA = first.samples;
  const nB = second.samples;
  const n = nA + nB;
  const width = a.depth * a.grid.count;
  const all = new Float64Array(n * width);
  all.set(first.values.subarray(0, nA * width), 0);
  all.set(second.values.subarray(0, nB * width), nA * width);
  const total = new Float64Array(width);
  for (let i = 0; i < n; i++) for (let j = 0; j < width; j++) total[j] += all[i * width + j];

  const method = options.method ?? 'auto';
  if (method === 'gram' && p !== 2) throw new Error("permutationTest: method 'gram' needs p = 2");
  const useGram = method === 'gram' || (method === 'auto' && p === 2 && nA < width);
  const score = useGram
    ? gramScorer(all, total, n, nA, nB, a.depth, a.grid)
    : directScorer(all, total, nA, nB, a.depth, a.grid, p);

  const indices = new Int32Array(n);
  for (let i = 0; i < n; i++) indices[i] = i;
  const observedScore = score.of(indices);
  // Floating-point sums of the same rows in another order may differ in the last bits; treat those as ties.
  const threshold = observedScore - score.tolerance(observedScore);
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
    if (score.of(indices) >= threshold) exceed++;
    if (options.onProgress && ((r + 1) % every === 0 || r + 1 === permutations))
      options.onProgress(r + 1, permutations);
  }
  // The reported statistic is always computed directly from the two means.
  const statistic = directScorer(all, total, nA, nB, a.depth, a.grid, p).of(
    Int32Array.from({ length: n }, (_, i) => i),
  );
  return { statistic, p: (1 + exceed) / (1 + permutations), permutations, exceed };
}

interface Scorer {
  /** A score increasing with the statistic, for group A = the first nA entries of `indices`. */
  of(indices: Int32Array): number;
  /** How far below the observed score a relabelling still counts as a tie. */
  tolerance(observed: number): number;
}

/** ‖mean_A − mean_B‖_p by re-summing group A's rows. */
function directScorer(
  all: Float64Array,
  total: Float64Array,
  nA: number,
  nB: number,
  depth: number,
  grid: LandscapeStack['grid'],
  p: number,
): Scorer {
  const width = total.length;
  const sumA = new Float64Array(width);
  const diff = new Float64Array(width);
  return {
    of(indices) {
      sumA.fill(0);
      // Invariant: after k rows, sumA is the sum of the first k rows named by `indices` (group A's members).
      for (let k = 0; k < nA; k++) {
        const base = indices[k] * width;
        for (let j = 0; j < width; j++) sumA[j] += all[base + j];
      }
      for (let j = 0; j < width; j++) diff[j] = sumA[j] / nA - (total[j] - sumA[j]) / nB;
      return sampledNorm(diff, depth, grid, p);
    },
    tolerance: (observed) => 1e-12 * Math.max(1, Math.abs(observed)),
  };
}

/**
 * ‖mean_A − mean_B‖²₂ from the Gram matrix. With s_A = Σ_{i∈A} x_i, c = 1/nA + 1/nB, d = 1/nB and W the
 * trapezoid weights, mean_A − mean_B = c·s_A − d·total, so
 *   ‖·‖² = c² Σ_{i,k∈A} G_ik − 2cd Σ_{i∈A} g_i + d² T,   G = X W Xᵀ, g = X W total, T = totalᵀ W total.
 */
function gramScorer(
  all: Float64Array,
  total: Float64Array,
  n: number,
  nA: number,
  nB: number,
  depth: number,
  grid: LandscapeStack['grid'],
): Scorer {
  const width = total.length;
  const count = grid.count;
  const h = gridStep(grid);
  const w = new Float64Array(width);
  for (let k = 0; k < depth; k++)
    for (let j = 0; j < count; j++) w[k * count + j] = (j === 0 || j === count - 1 ? 0.5 : 1) * h;
  const gram = new Float64Array(n * n);
  const g = new Float64Array(n);
  let big = 0;
  // Invariant: rows < i of `gram` (and their mirror entries) and g[< i] are final.
  for (let i = 0; i < n; i++) {
    const bi = i * width;
    for (let k = i; k < n; k++) {
      const bk = k * width;
      let sum = 0;
      for (let j = 0; j < width; j++) sum += all[bi + j] * w[j] * all[bk + j];
      gram[i * n + k] = sum;
      gram[k * n + i] = sum;
    }
    let gi = 0;
    for (let j = 0; j < width; j++) gi += all[bi + j] * w[j] * total[j];
    g[i] = gi;
    if (gram[i * n + i] > big) big = gram[i * n + i];
  }
  let t = 0;
  for (let j = 0; j < width; j++) t += total[j] * w[j] * total[j];
  const c = 1 / nA + 1 / nB;
  const d = 1 / nB;
  // Rounding scale of the three terms, for ties (their sizes, not their difference, set the error).
  const scale = c * c * nA * nA * big + 2 * c * d * nA * Math.sqrt(big * t) + d * d * t;
  return {
    of(indices) {
      let quad = 0;
      let lin = 0;
      // Invariant: quad = Σ over A-members a < k of Σ over all A-members b of G_ab; lin = Σ of g over them.
      for (let x = 0; x < nA; x++) {
        const row = indices[x] * n;
        for (let y = 0; y < nA; y++) quad += gram[row + indices[y]];
        lin += g[indices[x]];
      }
      return c * c * quad - 2 * c * d * lin + d * d * t;
    },
    tolerance: () => 1e-11 * Math.max(1e-300, scale),
  };
}

/** One row of the contrast table: classes a and b compared in one degree. */
export interface ContrastTest {
  a: string;
  b: string;
  degree: number;
  /** The filtration of the test's channel, when samples were filtered several ways. */
  filtration?: string;
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
  stacks: ReadonlyArray<{
    degree: number;
    filtration?: string;
    classes: ReadonlyArray<{ label: string; stack: LandscapeStack }>;
  }>,
  options: PermutationOptions = {},
): ContrastTest[] {
  const seed = options.seed ?? DEFAULT_PERMUTATION_OPTIONS.seed;
  const jobs: Array<{
    degree: number;
    filtration?: string;
    a: { label: string; stack: LandscapeStack };
    b: { label: string; stack: LandscapeStack };
  }> = [];
  for (const d of stacks) {
    for (let i = 0; i < d.classes.length; i++) {
      for (let j = i + 1; j < d.classes.length; j++)
        jobs.push({
          degree: d.degree,
          ...(d.filtration !== undefined ? { filtration: d.filtration } : {}),
          a: d.classes[i],
          b: d.classes[j],
        });
    }
  }
  const permutations = options.permutations ?? DEFAULT_PERMUTATION_OPTIONS.permutations;
  const total = jobs.length * permutations;
  const raw = jobs.map((job, index) =>
    permutationTest(job.a.stack, job.b.stack, {
      ...options,
      seed: (seed * 7919 + index * 104729 + 1) >>> 0,
      onProgress: options.onProgress
        ? (done) => options.onProgress?.(index * permutations + done, total)
        : undefined,
    }),
  );
  const adjusted = holmAdjust(raw.map((r) => r.p));
  return jobs.map((job, index) => ({
    a: job.a.label,
    b: job.b.label,
    degree: job.degree,
    ...(job.filtration !== undefined ? { filtration: job.filtration } : {}),
    statistic: raw[index].statistic,
    p: raw[index].p,
    pAdjusted: adjusted[index],
    sizes: [job.a.stack.samples, job.b.stack.samples],
  }));
}

/**
 * How far a family of permutation tests can reach. With R relabellings the smallest raw p is 1/(R + 1) — the
 * observed labelling counts as one of them (Phipson & Smyth, "Permutation P-values Should Never Be Zero",
 * Statistical Applications in Genetics and Molecular Biology, 2010) — and Holm's correction multiplies the
 * smallest p of m tests by m (Holm, 1979), so no adjusted p can fall below m/(R + 1). When that floor is above
 * the level, no test of the family can be declared different, whatever the data.
 */
export interface PermutationReach {
  tests: number;
  permutations: number;
  /** m/(R + 1), at most 1: the smallest adjusted p the family can show. */
  floor: number;
  level: number;
  /** Whether the floor is at or below the level. */
  reachable: boolean;
  /** The fewest relabellings per test whose floor is at or below the level: ⌈m/level⌉ − 1. */
  needed: number;
}

export function permutationReach(tests: number, permutations: number, level = 0.05): PermutationReach {
  const floor = tests === 0 ? 0 : Math.min(1, tests / (permutations + 1));
  // m/level with a little slack so that 3/0.05 = 60.000…01 counts as 60.
  const needed = Math.max(1, Math.ceil(tests / level - 1e-9) - 1);
  return { tests, permutations, floor, level, reachable: floor <= level, needed };
}

/** The least permutations per test of a family when the user gave no count (the count before any raise). */
export const BASE_PERMUTATIONS = 999;

/**
 * The most permutations per test chosen automatically: 9,999 keeps a family of 100 tests reaching an adjusted
 * p of 0.01 and one of up to 500 tests able to reach 5%, at a few seconds for the demo-sized classes (measured
 * in DEVELOPERS.md, "The report stage"); beyond it the report says how many would be needed.
 */
export const PERMUTATION_BUDGET = 9999;

/**
 * Permutations per test for a family of `tests` when the user fixed none: `base`, raised until the smallest
 * adjusted p the family can reach is 0.01 — a fifth of the 5% level, so a test can still be declared
 * different when a few relabellings match its statistic (common practice, no source) — that is
 * R = 100·m − 1, and capped at `budget`.
 */
export function permutationsForFamily(
  tests: number,
  base: number = BASE_PERMUTATIONS,
  budget: number = PERMUTATION_BUDGET,
): number {
  const wanted = permutationReach(tests, 1, 0.01).needed;
  return Math.max(1, Math.min(Math.max(budget, base), Math.max(base, wanted)));
}

/** A count with thousands separated by commas: 9999 → '9,999'. */
function counted(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/**
 * The plain sentence for a family that cannot reach its level: how many tests, how many permutations, the
 * floor of the adjusted p and the permutations that would be needed. Undefined when the level is reachable.
 */
export function unreachableSentence(reach: PermutationReach, what = 'contrasts'): string | undefined {
  if (reach.reachable || reach.tests === 0) return undefined;
  const pct = `${Math.round(reach.level * 100)}%`;
  return (
    `None of the ${reach.tests} ${what} can reach the ${pct} level with ${counted(reach.permutations)} permutations per test: ` +
    `under Holm's correction over ${reach.tests} tests the smallest possible adjusted p is ${reach.floor.toPrecision(2)}, ` +
    `whatever the data. At least ${counted(reach.needed)} permutations per test are needed; until then "no difference found" means "not tested".`
  );
}
