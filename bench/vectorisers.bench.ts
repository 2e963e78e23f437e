import type { DiagramSet } from '../src/core/diagram.js';
import { BettiCurveVectorizer } from '../src/features/betti-curve.js';
import { LandscapeVectorizer } from '../src/features/landscape-vectorizer.js';
import { PersistenceImageVectorizer } from '../src/features/persistence-image.js';
import { PersistenceStatistics } from '../src/features/persistence-statistics.js';
import { type Figure, randomDiagrams, report, time } from './harness.js';

/** The naive Betti curve: every pair tested at every grid point. */
function naiveBetti(sets: readonly DiagramSet[], t: Float64Array): Float64Array {
  const out = new Float64Array(sets.length * t.length);
  for (let s = 0; s < sets.length; s++) {
    const d = sets[s].diagrams[0];
    for (let j = 0; j < t.length; j++) {
      let n = 0;
      for (let i = 0; i < d.births.length; i++) if (d.births[i] <= t[j] && t[j] < d.deaths[i]) n++;
      out[s * t.length + j] = n;
    }
  }
  return out;
}

/** The naive persistence image: the Gaussian density evaluated at each pixel's centre times its area. */
function naiveImage(sets: readonly DiagramSet[], R: number, P: number, sigma: number): Float64Array {
  const out = new Float64Array(sets.length * R * R);
  const side = 1 / R;
  for (let s = 0; s < sets.length; s++) {
    const d = sets[s].diagrams[0];
    for (let i = 0; i < R; i++) {
      for (let j = 0; j < R; j++) {
        const x = (j + 0.5) * side;
        const y = (i + 0.5) * side * P;
        let v = 0;
        for (let k = 0; k < d.births.length; k++) {
          const p = d.deaths[k] - d.births[k];
          const w = Math.min(1, p / P);
          v += w * Math.exp(-((x - d.births[k]) ** 2 + (y - p) ** 2) / (2 * sigma * sigma));
        }
        out[s * R * R + i * R + j] = (v * side * side * P) / (2 * Math.PI * sigma * sigma);
      }
    }
  }
  return out;
}

export async function run(): Promise<void> {
  const sets = randomDiagrams(2000, 100, 11);
  const few = sets.slice(0, 200);
  const figures: Figure[] = [];
  const rate = (n: number, ms: number) => n / (ms / 1000);

  const landscape = new LandscapeVectorizer({ degrees: [1], depth: 5, gridSize: 100 }).fit(sets);
  const l = await time(() => landscape.transform(sets), 3, 1);
  figures.push({
    name: 'landscape (depth 5, 100 points), for scale',
    value: rate(2000, l.ms),
    unit: 'diagrams/s',
  });

  const betti = new BettiCurveVectorizer({ degrees: [1], gridSize: 100 }).fit(sets);
  const b = await time(() => betti.transform(sets), 3, 1);
  const grid = betti.state!.grids[0].grid;
  const t = Float64Array.from({ length: 100 }, (_, j) => grid.start + ((grid.stop - grid.start) * j) / 99);
  const bn = await time(() => naiveBetti(few, t), 3, 1);
  figures.push(
    { name: 'Betti curves (100 points)', value: rate(2000, b.ms), unit: 'diagrams/s' },
    { name: '  naive: every pair at every point', value: rate(200, bn.ms), unit: 'diagrams/s' },
  );

  const stats = new PersistenceStatistics({ degrees: [1] }).fit(sets);
  const st = await time(() => stats.transform(sets), 3, 1);
  figures.push({ name: 'persistence statistics (31 values)', value: rate(2000, st.ms), unit: 'diagrams/s' });

  const image = new PersistenceImageVectorizer({ degrees: [1], resolution: 20 }).fit(sets);
  const im = await time(() => image.transform(sets), 3, 1);
  const frame = image.state!.frames[0].frame;
  const imn = await time(() => naiveImage(few, 20, frame.persistenceStop, frame.sigma), 3, 1);
  figures.push(
    {
      name: 'persistence images (20 × 20, exact pixel integrals)',
      value: rate(2000, im.ms),
      unit: 'diagrams/s',
    },
    { name: '  naive: density at each pixel centre', value: rate(200, imn.ms), unit: 'diagrams/s' },
  );
  report('vectorisers: 2,000 diagrams of 100 pairs, one channel', figures);
}
