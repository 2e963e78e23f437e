import type { ExactLandscape, LandscapeLayer } from './exact-landscape.js';
import { sameGrid } from './grid.js';
import type { SampledLandscape } from './sampled-landscape.js';

/**
 * Arithmetic on exact landscapes. Every operation is exact for piecewise-linear layers: sums and means are
 * taken on the union of the breakpoints (between them every layer is linear), integrals in closed form.
 * Layers are numbered from 1; a missing layer is identically zero.
 */

/** λ(t) for one layer: linear between breakpoints, zero outside. */
export function evaluateLayer(layer: LandscapeLayer, t: number): number {
  const { t: ts, v } = layer;
  const m = ts.length;
  if (m === 0 || !(t >= ts[0]) || !(t <= ts[m - 1])) return 0;
  let lo = 0;
  let hi = m - 1;
  // Invariant: ts[lo] ≤ t ≤ ts[hi].
  while (hi - lo > 1) {
    const mid = (lo + hi) >>> 1;
    if (ts[mid] <= t) lo = mid;
    else hi = mid;
  }
  if (hi === lo) return v[lo];
  const w = (t - ts[lo]) / (ts[hi] - ts[lo]);
  return v[lo] + w * (v[hi] - v[lo]);
}

/** λ_k(t), k from 1; zero for a layer beyond the stored ones. */
export function evaluate(landscape: ExactLandscape, k: number, t: number): number {
  if (!Number.isInteger(k) || k < 1) throw new Error(`layer ${k} must be a whole number ≥ 1`);
  const layer = landscape.layers[k - 1];
  return layer === undefined ? 0 : evaluateLayer(layer, t);
}

/** Evaluates a layer at increasing points `ts`, writing into `out`, by one merged walk. */
function evaluateSorted(
  layer: LandscapeLayer,
  ts: Float64Array,
  out: Float64Array,
  scale: number,
  accumulate: boolean,
): void {
  const { t: lt, v } = layer;
  const m = lt.length;
  let j = 0;
  // Invariant: every breakpoint before j lies at or below the current point.
  for (let i = 0; i < ts.length; i++) {
    const t = ts[i];
    let value = 0;
    if (m > 0 && t >= lt[0] && t <= lt[m - 1]) {
      while (j < m - 1 && lt[j + 1] < t) j++;
      if (t === lt[j]) value = v[j];
      else if (j + 1 < m) {
        const w = (t - lt[j]) / (lt[j + 1] - lt[j]);
        value = v[j] + w * (v[j + 1] - v[j]);
      } else value = v[j];
    }
    out[i] = accumulate ? out[i] + scale * value : scale * value;
  }
}

/** The sorted union of the breakpoints of several layers. */
function unionOfBreakpoints(layers: readonly LandscapeLayer[]): Float64Array {
  let total = 0;
  for (const layer of layers) total += layer.t.length;
  const all = new Float64Array(total);
  let at = 0;
  for (const layer of layers) {
    all.set(layer.t, at);
    at += layer.t.length;
  }
  all.sort();
  let k = 0;
  for (let i = 0; i < total; i++) if (k === 0 || all[i] !== all[k - 1]) all[k++] = all[i];
  return all.slice(0, k);
}

/** Σ_i weights[i]·layers[i], on the union of their breakpoints. */
function combineLayers(layers: readonly LandscapeLayer[], weights: readonly number[]): LandscapeLayer {
  const t = unionOfBreakpoints(layers);
  const v = new Float64Array(t.length);
  for (let i = 0; i < layers.length; i++) evaluateSorted(layers[i], t, v, weights[i], true);
  return { t, v };
}

function checkDegrees(landscapes: readonly ExactLandscape[]): number {
  if (landscapes.length === 0) throw new Error('no landscapes given');
  const degree = landscapes[0].degree;
  for (const l of landscapes)
    if (l.degree !== degree)
      throw new Error(`landscapes of degrees ${degree} and ${l.degree} cannot be combined`);
  return degree;
}

function combine(landscapes: readonly ExactLandscape[], weights: readonly number[]): ExactLandscape {
  const degree = checkDegrees(landscapes);
  let depth = 0;
  for (const l of landscapes) depth = Math.max(depth, l.layers.length);
  const layers: LandscapeLayer[] = [];
  for (let k = 0; k < depth; k++) {
    const parts: LandscapeLayer[] = [];
    const w: number[] = [];
    for (let i = 0; i < landscapes.length; i++) {
      const layer = landscapes[i].layers[k];
      if (layer !== undefined) {
        parts.push(layer);
        w.push(weights[i]);
      }
    }
    layers.push(combineLayers(parts, w));
  }
  return { degree, layers };
}

/** a + b, layer by layer. */
export function sumLandscapes(a: ExactLandscape, b: ExactLandscape): ExactLandscape {
  return combine([a, b], [1, 1]);
}

/** a − b, layer by layer (layers may then be negative). */
export function subtractLandscapes(a: ExactLandscape, b: ExactLandscape): ExactLandscape {
  return combine([a, b], [1, -1]);
}

/** c·λ for every layer. */
export function scaleLandscape(landscape: ExactLandscape, c: number): ExactLandscape {
  return {
    degree: landscape.degree,
    layers: landscape.layers.map((layer) => ({ t: layer.t.slice(), v: layer.v.map((x) => c * x) })),
  };
}

/** The exact mean (1/N)Σ λ^(i) of many landscapes, as a piecewise-linear function per layer. */
export function meanLandscape(landscapes: readonly ExactLandscape[]): ExactLandscape {
  const w = 1 / landscapes.length;
  return combine(
    landscapes,
    landscapes.map(() => w),
  );
}

/** The mean of sampled landscapes on one grid and depth. */
export function meanSampled(landscapes: readonly SampledLandscape[]): SampledLandscape {
  if (landscapes.length === 0) throw new Error('no landscapes given');
  const first = landscapes[0];
  const values = new Float64Array(first.depth * first.grid.count);
  for (const l of landscapes) {
    if (l.degree !== first.degree || l.depth !== first.depth || !sameGrid(l.grid, first.grid)) {
      throw new Error('sampled landscapes must share degree, depth and grid to be averaged');
    }
    for (let i = 0; i < values.length; i++) values[i] += l.values[i];
  }
  const w = 1 / landscapes.length;
  for (let i = 0; i < values.length; i++) values[i] *= w;
  return { degree: first.degree, grid: first.grid, depth: first.depth, values };
}

/** ∫ over [0, h] of |x|^p where x goes linearly from a to b (a, b ≥ 0). */
function powerIntegralSameSign(a: number, b: number, h: number, p: number): number {
  if (a === b) return h * a ** p;
  const hiV = a > b ? a : b;
  const loV = a > b ? b : a;
  if (hiV - loV < 1e-6 * hiV) {
    // Nearly constant: Simpson's rule is exact to far below rounding here.
    const mid = (a + b) / 2;
    return (h * (a ** p + 4 * mid ** p + b ** p)) / 6;
  }
  return (h * (hiV ** (p + 1) - loV ** (p + 1))) / ((p + 1) * (hiV - loV));
}

/** ∫ |λ|^p over one layer, exactly (splitting a segment where it changes sign). */
function layerPowerIntegral(layer: LandscapeLayer, p: number): number {
  const { t, v } = layer;
  let sum = 0;
  // Invariant: sum is ∫|λ|^p from t[0] to t[i].
  for (let i = 0; i + 1 < t.length; i++) {
    const h = t[i + 1] - t[i];
    const a = v[i];
    const b = v[i + 1];
    if ((a >= 0 && b >= 0) || (a <= 0 && b <= 0))
      sum += powerIntegralSameSign(Math.abs(a), Math.abs(b), h, p);
    else {
      const root = (h * Math.abs(a)) / (Math.abs(a) + Math.abs(b));
      sum += (root * Math.abs(a) ** p + (h - root) * Math.abs(b) ** p) / (p + 1);
    }
  }
  return sum;
}

/** Per-layer integral ∫|λ_k|^p (p finite) or sup |λ_k| (p = Infinity). */
export function layerNorm(layer: LandscapeLayer, p: number): number {
  if (p === Infinity) {
    let max = 0;
    for (let i = 0; i < layer.v.length; i++) max = Math.max(max, Math.abs(layer.v[i]));
    return max;
  }
  return layerPowerIntegral(layer, p) ** (1 / p);
}

/**
 * ‖λ‖_p = (Σ_k ∫ |λ_k(t)|^p dt)^(1/p) for p ≥ 1, integrated exactly; p = Infinity gives sup_k,t |λ_k(t)|.
 */
export function lpNorm(landscape: ExactLandscape, p: number): number {
  if (!(p >= 1)) throw new Error(`norm order p = ${p} must be ≥ 1`);
  if (p === Infinity) {
    let max = 0;
    for (const layer of landscape.layers) max = Math.max(max, layerNorm(layer, Infinity));
    return max;
  }
  let sum = 0;
  for (const layer of landscape.layers) sum += layerPowerIntegral(layer, p);
  return sum ** (1 / p);
}

/** ⟨a, b⟩ = Σ_k ∫ λ_k^a(t) λ_k^b(t) dt, exactly (the product of two linear pieces integrates in closed form). */
export function innerProduct(a: ExactLandscape, b: ExactLandscape): number {
  checkDegrees([a, b]);
  const depth = Math.min(a.layers.length, b.layers.length);
  let sum = 0;
  for (let k = 0; k < depth; k++) {
    const t = unionOfBreakpoints([a.layers[k], b.layers[k]]);
    const f = new Float64Array(t.length);
    const g = new Float64Array(t.length);
    evaluateSorted(a.layers[k], t, f, 1, false);
    evaluateSorted(b.layers[k], t, g, 1, false);
    // Invariant: sum holds the integral over layers < k and over [t[0], t[i]] of layer k.
    for (let i = 0; i + 1 < t.length; i++) {
      const h = t[i + 1] - t[i];
      sum += (h * (2 * f[i] * g[i] + f[i] * g[i + 1] + f[i + 1] * g[i] + 2 * f[i + 1] * g[i + 1])) / 6;
    }
  }
  return sum;
}

/** ‖a − b‖_p, exactly. */
export function landscapeDistance(a: ExactLandscape, b: ExactLandscape, p = 2): number {
  return lpNorm(subtractLandscapes(a, b), p);
}
