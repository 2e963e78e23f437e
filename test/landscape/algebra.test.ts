import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { bottleneckDistance } from '../../src/homology/distance.js';
import {
  evaluate,
  evaluateLayer,
  innerProduct,
  landscapeDistance,
  lpNorm,
  meanLandscape,
  meanSampled,
  scaleLandscape,
  subtractLandscapes,
  sumLandscapes,
} from '../../src/landscape/algebra.js';
import { type ExactLandscape, exactLandscape } from '../../src/landscape/exact-landscape.js';
import { gridPoints } from '../../src/landscape/grid.js';
import { sampleLandscape } from '../../src/landscape/sampled-landscape.js';
import { anyDiagram, floatDiagram, latticeDiagram } from './reference.js';

/** Midpoint-rule integral of Σ_k |λ_k|^p over [lo, hi] with `steps` cells: the numeric reference. */
function numericPower(L: ExactLandscape, p: number, lo: number, hi: number, steps: number): number {
  const h = (hi - lo) / steps;
  let sum = 0;
  for (let k = 1; k <= L.layers.length; k++) {
    for (let i = 0; i < steps; i++) sum += Math.abs(evaluate(L, k, lo + (i + 0.5) * h)) ** p * h;
  }
  return sum;
}

function span(L: ExactLandscape): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const layer of L.layers) {
    lo = Math.min(lo, layer.t[0]);
    hi = Math.max(hi, layer.t[layer.t.length - 1]);
  }
  return lo < hi ? [lo, hi] : [0, 1];
}

describe('landscape norms and identities', () => {
  it('Σ_k ‖λ_k‖₁ equals Σ (d − b)²/4', () => {
    // The tents' areas add up over the layers (common practice, no source).
    fc.assert(
      fc.property(anyDiagram, (d) => {
        let want = 0;
        for (let i = 0; i < d.births.length; i++) want += (d.deaths[i] - d.births[i]) ** 2 / 4;
        return Math.abs(lpNorm(exactLandscape(d), 1) - want) <= 1e-9 * (1 + want);
      }),
      { numRuns: 300 },
    );
  });

  it('layers are ordered, non-negative and 1-Lipschitz', () => {
    // λ_k ≥ λ_{k+1} ≥ 0 and |λ_k(s) − λ_k(t)| ≤ |s − t| (Chazal, Fasy, Lecci,
    // Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014, section 2).
    fc.assert(
      fc.property(anyDiagram, (d) => {
        const L = exactLandscape(d);
        for (const layer of L.layers) {
          for (let i = 1; i < layer.t.length; i++) {
            // Allow the rounding of the breakpoints themselves (a few ulps of t).
            const rounding =
              4 * Number.EPSILON * Math.max(Math.abs(layer.t[i]), Math.abs(layer.t[i - 1])) +
              4 * Number.MIN_VALUE;
            const rise = Math.abs(layer.v[i] - layer.v[i - 1]);
            if (rise > (layer.t[i] - layer.t[i - 1]) * (1 + 1e-12) + rounding) return false;
          }
        }
        const [lo, hi] = span(L);
        for (let s = 0; s <= 64; s++) {
          const t = lo + ((hi - lo) * s) / 64;
          for (let k = 1; k <= L.layers.length; k++) {
            const a = evaluate(L, k, t);
            const b = evaluate(L, k + 1, t);
            if (!(a >= b - 1e-12 && b >= 0)) return false;
          }
        }
        return true;
      }),
      { numRuns: 200 },
    );
  });

  it('is stable: sup_k ‖λ_k(D) − λ_k(D′)‖∞ ≤ d_B(D, D′)', () => {
    // Landscape stability under the bottleneck distance: Chazal, Fasy, Lecci, Rinaldo, Wasserman,
    // "Stochastic convergence of persistence landscapes and silhouettes", 2014, section 2.
    fc.assert(
      fc.property(floatDiagram, floatDiagram, (a, b) => {
        const gap = landscapeDistance(exactLandscape(a), exactLandscape(b), Infinity);
        return gap <= bottleneckDistance(a, b) + 1e-9;
      }),
      { numRuns: 200 },
    );
  });

  it('integrates |λ|^p exactly, matching fine numeric integration, sign changes included', () => {
    fc.assert(
      fc.property(latticeDiagram, floatDiagram, fc.constantFrom(1, 1.5, 2, 3.25), (a, b, p) => {
        const diff = subtractLandscapes(exactLandscape(a), exactLandscape(b));
        const [lo, hi] = span(diff);
        const want = numericPower(diff, p, lo, hi, 4000);
        const got = lpNorm(diff, p) ** p;
        return Math.abs(got - want) <= 2e-4 * (1 + want);
      }),
      { numRuns: 40 },
    );
  });

  it('gives the hand-worked norms of one tent', () => {
    // One tent of half-width 1: ∫ λ^p = 2/(p+1); sup = 1 (worked by hand).
    const L = exactLandscape(makeDiagram(1, [[0, 2]]));
    expect(lpNorm(L, 1)).toBeCloseTo(1, 14);
    expect(lpNorm(L, 2)).toBeCloseTo(Math.sqrt(2 / 3), 14);
    expect(lpNorm(L, 4)).toBeCloseTo((2 / 5) ** 0.25, 14);
    expect(lpNorm(L, Infinity)).toBe(1);
    // λ − (λ shifted by 1): ±½ triangles over [0,3] — ∫|·| = 4 small triangles of area 1/8 + middle part.
    const shifted = exactLandscape(makeDiagram(1, [[1, 3]]));
    const diff = subtractLandscapes(L, shifted);
    expect(lpNorm(diff, 1)).toBeCloseTo(1.5, 12);
    expect(() => lpNorm(L, 0.5)).toThrow(/≥ 1/);
  });

  it('computes the inner product exactly', () => {
    fc.assert(
      fc.property(anyDiagram, anyDiagram, (a, b) => {
        const A = exactLandscape(a);
        const B = exactLandscape(b);
        const self = innerProduct(A, A);
        const norm = lpNorm(A, 2) ** 2;
        // ⟨a,b⟩ = (‖a+b‖² − ‖a−b‖²)/4, the polarisation identity.
        const polar = (lpNorm(sumLandscapes(A, B), 2) ** 2 - lpNorm(subtractLandscapes(A, B), 2) ** 2) / 4;
        return (
          Math.abs(self - norm) <= 1e-9 * (1 + norm) &&
          Math.abs(innerProduct(A, B) - polar) <= 1e-8 * (1 + Math.abs(polar))
        );
      }),
      { numRuns: 200 },
    );
  });
});

describe('landscape sums and means', () => {
  it('sums, scales and averages pointwise', () => {
    fc.assert(
      fc.property(
        fc.array(anyDiagram, { minLength: 1, maxLength: 5 }),
        fc.double({ min: -3, max: 3, noNaN: true }),
        (ds, t) => {
          const Ls = ds.map((d) => exactLandscape(d));
          const mean = meanLandscape(Ls);
          const sum = sumLandscapes(Ls[0], Ls[Ls.length - 1]);
          const scaled = scaleLandscape(Ls[0], -2.5);
          for (let k = 1; k <= 6; k++) {
            const want = Ls.reduce((s, L) => s + evaluate(L, k, t), 0) / Ls.length;
            if (Math.abs(evaluate(mean, k, t) - want) > 1e-9) return false;
            const wantSum = evaluate(Ls[0], k, t) + evaluate(Ls[Ls.length - 1], k, t);
            if (Math.abs(evaluate(sum, k, t) - wantSum) > 1e-9) return false;
            if (Math.abs(evaluate(scaled, k, t) + 2.5 * evaluate(Ls[0], k, t)) > 1e-9) return false;
          }
          return true;
        },
      ),
      { numRuns: 200 },
    );
  });

  it('averages sampled landscapes like the exact mean sampled', () => {
    const ds = [
      makeDiagram(1, [
        [0, 2],
        [1, 3],
      ]),
      makeDiagram(1, [[0.5, 1.5]]),
      makeDiagram(1, []),
    ];
    const grid = { start: 0, stop: 3, count: 13 };
    const m = meanSampled(ds.map((d) => sampleLandscape(d, grid, 3)));
    const exact = meanLandscape(ds.map((d) => exactLandscape(d)));
    const ts = gridPoints(grid);
    for (let k = 1; k <= 3; k++)
      for (let i = 0; i < 13; i++)
        expect(m.values[(k - 1) * 13 + i]).toBeCloseTo(evaluate(exact, k, ts[i]), 12);
    expect(() => meanSampled([sampleLandscape(ds[0], grid, 3), sampleLandscape(ds[0], grid, 2)])).toThrow(
      /share/,
    );
    expect(() =>
      sumLandscapes(exactLandscape(makeDiagram(0, [])), exactLandscape(makeDiagram(1, []))),
    ).toThrow(/degrees/);
  });

  it('evaluates layers between and outside breakpoints', () => {
    const layer = { t: Float64Array.from([0, 1, 3]), v: Float64Array.from([0, 1, 0]) };
    expect(evaluateLayer(layer, -1)).toBe(0);
    expect(evaluateLayer(layer, 0.25)).toBe(0.25);
    expect(evaluateLayer(layer, 2)).toBe(0.5);
    expect(evaluateLayer(layer, 3)).toBe(0);
    expect(evaluateLayer(layer, 4)).toBe(0);
  });
});
