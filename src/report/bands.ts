import { Random } from '../core/random.js';
import { type GridSpec, type LandscapeStack, stackMean } from './stack.js';

/**
 * Simultaneous confidence bands for a mean landscape by the multiplier bootstrap of Chazal, Fasy, Lecci,
 * Rinaldo and Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014/2015
 * (Algorithm 1 there). From n landscapes λ_1 … λ_n with mean λ̄:
 *   1. draw ξ_1 … ξ_n independent standard normal multipliers;
 *   2. θ = sup_t | n^(−1/2) Σ_i ξ_i (λ_i(t) − λ̄(t)) |;
 *   3. repeat `draws` times; Z = the (1 − α) quantile of θ;
 *   4. the band is λ̄(t) ± Z / √n, simultaneous over t.
 * The sup runs over the grid of the sampled landscapes. With scope 'layer' (the default, as in the paper,
 * whose theorem is for one layer λ_k at a time) each layer gets its own Z; with scope 'all' one Z covers
 * every layer at once (wider, simultaneous over layers too). The lower edge is clipped at 0: a mean
 * landscape is never negative, so clipping cannot lose coverage.
 */
export interface BandOptions {
  /** Confidence level 1 − α of the band. Default 0.95. */
  level?: number;
  /** Number of bootstrap draws. Default 1000. */
  draws?: number;
  /** Seed of the multipliers. Default 1. */
  seed?: number;
  /** Simultaneous over t within each layer ('layer', default) or over all layers and t ('all'). */
  scope?: 'layer' | 'all';
}

export const DEFAULT_BAND_OPTIONS: Required<BandOptions> = {
  level: 0.95,
  draws: 1000,
  seed: 1,
  scope: 'layer',
};

export interface SampledBand {
  samples: number;
  depth: number;
  grid: GridSpec;
  /** The sampled mean landscape, depth × grid.count, layer-major. */
  mean: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** Half-width Z / √n of the band per layer (all equal when scope is 'all'). */
  halfWidth: Float64Array;
  level: number;
  draws: number;
  scope: 'layer' | 'all';
}

export function multiplierBand(stack: LandscapeStack, options: BandOptions = {}): SampledBand {
  const { level, draws, seed, scope } = { ...DEFAULT_BAND_OPTIONS, ...options };
  if (!(level > 0 && level < 1)) throw new Error(`multiplierBand: level ${level} must be in (0, 1)`);
  if (!(Number.isInteger(draws) && draws >= 1))
    throw new Error(`multiplierBand: draws ${draws} must be a whole number ≥ 1`);
  const n = stack.samples;
  const count = stack.grid.count;
  const depth = stack.depth;
  const width = depth * count;
  const mean = stackMean(stack);
  const halfWidth = new Float64Array(depth);
  if (n >= 2) {
    const centred = new Float64Array(n * width);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < width; j++) centred[i * width + j] = stack.values[i * width + j] - mean[j];
    }
    const layers = scope === 'layer' ? depth : 1;
    // theta[l * draws + b]: the sup statistic of draw b for layer group l.
    const theta = new Float64Array(layers * draws);
    const xi = new Float64Array(n);
    const sum = new Float64Array(width);
    const random = new Random(seed);
    const scale = 1 / Math.sqrt(n);
    for (let b = 0; b < draws; b++) {
      for (let i = 0; i < n; i++) xi[i] = random.normal();
      sum.fill(0);
      // Invariant: after row i, sum[j] = Σ_{r ≤ i} ξ_r (λ_r − λ̄)[j].
      for (let i = 0; i < n; i++) {
        const x = xi[i];
        const base = i * width;
        for (let j = 0; j < width; j++) sum[j] += x * centred[base + j];
      }
      // Invariant: sup holds max |sum| over the grid points of the current layer group seen so far.
      for (let l = 0; l < layers; l++) {
        const from = scope === 'layer' ? l * count : 0;
        const to = scope === 'layer' ? from + count : width;
        let sup = 0;
        for (let j = from; j < to; j++) {
          const a = Math.abs(sum[j]);
          if (a > sup) sup = a;
        }
        theta[l * draws + b] = sup * scale;
      }
    }
    const rank = Math.min(draws - 1, Math.max(0, Math.ceil(level * draws) - 1));
    for (let l = 0; l < layers; l++) {
      const sorted = theta.slice(l * draws, (l + 1) * draws).sort();
      const z = sorted[rank];
      if (scope === 'layer') halfWidth[l] = z * scale;
      else halfWidth.fill(z * scale);
    }
  }
  const lower = new Float64Array(width);
  const upper = new Float64Array(width);
  for (let k = 0; k < depth; k++) {
    const h = n >= 2 ? halfWidth[k] : Infinity;
    for (let j = k * count; j < (k + 1) * count; j++) {
      lower[j] = Math.max(0, mean[j] - h);
      upper[j] = mean[j] + h;
    }
  }
  return { samples: n, depth, grid: stack.grid, mean, lower, upper, halfWidth, level, draws, scope };
}

/** True when `truth` (same layout as the band) lies inside the band of layer `layer` at every grid point. */
export function bandCovers(band: SampledBand, truth: ArrayLike<number>, layer: number): boolean {
  const count = band.grid.count;
  for (let j = layer * count; j < (layer + 1) * count; j++) {
    if (truth[j] < band.lower[j] || truth[j] > band.upper[j]) return false;
  }
  return true;
}
