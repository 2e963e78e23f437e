import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { bandCovers, multiplierBand } from '../../src/report/bands.js';
import { type GridSpec, stackLandscapes, stackMean } from '../../src/report/stack.js';

/**
 * The sampled landscape of a diagram straight from its definition (Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence
 * landscapes and silhouettes", 2014): λ_k(t) is the k-th largest of the tents
 * max(0, min(t − b, d − t)). Written here independently of src/landscape so the band is checked against the
 * definition, not against our own landscape code.
 */
function landscapeByDefinition(
  births: number[],
  deaths: number[],
  grid: GridSpec,
  depth: number,
): Float64Array {
  const out = new Float64Array(depth * grid.count);
  const step = (grid.stop - grid.start) / (grid.count - 1);
  for (let j = 0; j < grid.count; j++) {
    const t = grid.start + j * step;
    const tents = births.map((b, i) => Math.max(0, Math.min(t - b, deaths[i] - t))).sort((x, y) => y - x);
    for (let k = 0; k < depth; k++) out[k * grid.count + j] = tents[k] ?? 0;
  }
  return out;
}

/** A fixed distribution of diagrams: 1–3 pairs, births uniform on [0, 1], lifetimes uniform on [0.3, 1.3]. */
function drawDiagram(random: Random): { births: number[]; deaths: number[] } {
  const size = 1 + random.int(3);
  const births: number[] = [];
  const deaths: number[] = [];
  for (let i = 0; i < size; i++) {
    const b = random.uniform(0, 1);
    births.push(b);
    deaths.push(b + random.uniform(0.3, 1.3));
  }
  return { births, deaths };
}

const grid: GridSpec = { start: 0, stop: 2.3, count: 47 };
const depth = 2;

function sampleStack(random: Random, n: number) {
  const rows: Float64Array[] = [];
  for (let i = 0; i < n; i++) {
    const { births, deaths } = drawDiagram(random);
    rows.push(landscapeByDefinition(births, deaths, grid, depth));
  }
  return stackLandscapes(rows, grid, depth);
}

// The true mean landscape of the distribution, from a large sample (20,000 diagrams): its Monte Carlo error
// (sd / √20000 ≈ 0.002) is about 1/30 of the band half-widths below, so it does not move the coverage.
const truth = stackMean(sampleStack(new Random(2024), 20_000));

describe('multiplierBand', () => {
  it('covers the true mean landscape near the nominal level over repeated draws', () => {
    // Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and
    // silhouettes", 2014/2015, Theorem 5 and Algorithm 1: the multiplier-bootstrap band is asymptotically
    // a simultaneous (1 − α) band for each layer's mean.
    const repeats = 200;
    const random = new Random(7);
    for (const level of [0.95, 0.8]) {
      const covered = new Int32Array(depth);
      for (let r = 0; r < repeats; r++) {
        const band = multiplierBand(sampleStack(random, 60), { level, draws: 300, seed: 1000 + r });
        for (let k = 0; k < depth; k++) if (bandCovers(band, truth, k)) covered[k]++;
      }
      for (let k = 0; k < depth; k++) {
        const coverage = covered[k] / repeats;
        if (process.env.LANDFORM_PRINT) console.log(level, k, coverage);
        // Tolerance: the binomial standard error of a coverage of 200 draws is √(0.95·0.05/200) ≈ 0.015 at
        // level 0.95 and ≈ 0.028 at 0.8; we allow about three of them plus 0.03 for the finite-sample
        // (n = 60, 300 draws) bias of an asymptotic band (common practice, no source).
        const tolerance = 3 * Math.sqrt((level * (1 - level)) / repeats) + 0.03;
        expect(coverage, `layer ${k + 1} at level ${level}`).toBeGreaterThan(level - tolerance);
        expect(coverage, `layer ${k + 1} at level ${level}`).toBeLessThan(Math.min(1, level + tolerance));
      }
    }
  });

  it('narrows like 1/√n and widens with the level', () => {
    // Chazal et al. 2015: the half-width is Z/√n with Z converging to a fixed quantile, so quadrupling n
    // roughly halves it.
    const small = multiplierBand(sampleStack(new Random(11), 50), { draws: 400 });
    const large = multiplierBand(sampleStack(new Random(12), 800), { draws: 400 });
    const ratio = small.halfWidth[0] / large.halfWidth[0];
    expect(ratio).toBeGreaterThan(4 * 0.8);
    expect(ratio).toBeLessThan(4 * 1.25);
    const narrow = multiplierBand(sampleStack(new Random(11), 50), { draws: 400, level: 0.5 });
    expect(narrow.halfWidth[0]).toBeLessThan(small.halfWidth[0]);
    const joint = multiplierBand(sampleStack(new Random(11), 50), { draws: 400, scope: 'all' });
    expect(joint.halfWidth[0]).toBeGreaterThanOrEqual(
      Math.max(small.halfWidth[0], small.halfWidth[1]) * 0.95,
    );
  });

  it('is reproducible from its seed and keeps the lower edge at or above zero', () => {
    const stack = sampleStack(new Random(3), 30);
    const a = multiplierBand(stack, { draws: 200, seed: 5 });
    const b = multiplierBand(stack, { draws: 200, seed: 5 });
    expect(Array.from(a.upper)).toEqual(Array.from(b.upper));
    for (const v of a.lower) expect(v).toBeGreaterThanOrEqual(0);
    for (let j = 0; j < a.mean.length; j++) expect(a.upper[j]).toBeGreaterThanOrEqual(a.mean[j]);
  });
});
