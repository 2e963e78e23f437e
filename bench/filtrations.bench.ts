import { Random } from '../src/core/random.js';
import { alphaComplex, alphaComplexPersistence, alphaPersistence } from '../src/homology/alpha.js';
import { dtmPersistence } from '../src/homology/dtm.js';
import { complexPersistence } from '../src/homology/filtered-complex.js';
import { pairwiseDistances } from '../src/homology/metric.js';
import { nearestNeighbours, nearestNeighboursByScan } from '../src/homology/nearest.js';
import { ripsPersistence } from '../src/homology/rips.js';
import { maxminLandmarks } from '../src/homology/subsample.js';
import { report, time } from './harness.js';

/**
 * Filtrations: alpha in the plane, DTM-weighted Rips against plain Rips, maxmin landmarks and k-d tree
 * neighbours, each beside a baseline measured in the same run.
 */
function uniformCloud(seed: number, count: number, dim: number): Float64Array {
  const r = new Random(seed);
  return Float64Array.from({ length: count * dim }, () => r.next());
}

/** Farthest-point selection done naively: each step recomputes every point's distance to all landmarks. */
function naiveMaxmin(coords: Float64Array, count: number, dim: number, n: number): Int32Array {
  const chosen: number[] = [0];
  while (chosen.length < n) {
    let best = -1;
    let far = 0;
    for (let p = 0; p < count; p++) {
      let nearest = Infinity;
      for (const l of chosen) {
        let d = 0;
        for (let a = 0; a < dim; a++) d += (coords[p * dim + a] - coords[l * dim + a]) ** 2;
        nearest = Math.min(nearest, d);
      }
      if (nearest > best) {
        best = nearest;
        far = p;
      }
    }
    chosen.push(far);
  }
  return Int32Array.from(chosen);
}

export async function run(): Promise<void> {
  // Alpha H0 + H1 of 10⁵ planar points; baseline: the Delaunay triangulation alone.
  const big = uniformCloud(1, 100_000, 2);
  const { default: Delaunator } = await import('delaunator');
  const triangulation = await time(() => new Delaunator(big), 3);
  const alpha = await time(() => alphaPersistence(big, 100_000), 3);
  // Duality against the column reduction of the same alpha complex (3,000 points).
  const mid = uniformCloud(2, 3000, 2);
  const complex = alphaComplex(mid, 3000);
  const dualityMid = await time(() => alphaComplexPersistence(complex), 5);
  const vertices = Int32Array.from({ length: complex.vertexCount }, (_, i) => i);
  const reductionMid = await time(
    () =>
      complexPersistence(
        {
          simplices: [vertices, complex.edges, complex.triangles],
          values: [new Float64Array(complex.vertexCount), complex.edgeValues, complex.triangleValues],
        },
        1,
      ),
    3,
  );

  // DTM (K = 10) against plain Rips on the same 1,000 points in R³, degrees 0 and 1.
  const cloud3 = uniformCloud(3, 1000, 3);
  const rips = await time(
    () => ripsPersistence(1000, pairwiseDistances(cloud3, 1000, 3), { maxDegree: 1 }),
    3,
  );
  const dtm = await time(() => dtmPersistence(cloud3, 1000, 3, 10, { maxDegree: 1 }), 3);

  // Maxmin: 1,000 landmarks of 10⁵ points in R³; baseline: the naive recomputation at 60 landmarks.
  const many = uniformCloud(4, 100_000, 3);
  const maxmin = await time(() => maxminLandmarks(many, 100_000, 3, 1000, 1), 3);
  const maxminSmall = await time(() => maxminLandmarks(many, 100_000, 3, 60, 1), 3);
  const naiveSmall = await time(() => naiveMaxmin(many, 100_000, 3, 60), 1, 0);

  // k nearest neighbours (k = 10) of 20,000 points in R³: k-d tree against the direct scan.
  const knnCloud = uniformCloud(5, 20_000, 3);
  const tree = await time(() => nearestNeighbours(knnCloud, 20_000, 3, 10), 3);
  const scan = await time(() => nearestNeighboursByScan(knnCloud, 20_000, 3, 10), 1, 0);

  report('filtrations', [
    {
      name: 'alpha H0+H1, 10^5 planar points',
      value: alpha.ms,
      unit: 'ms',
      goal: '≤ 2000 ms',
      met: alpha.ms <= 2000,
    },
    { name: 'Delaunay triangulation alone (baseline), 10^5 points', value: triangulation.ms, unit: 'ms' },
    { name: 'alpha / triangulation', value: alpha.ms / triangulation.ms, unit: '×' },
    { name: 'alpha complex, 3000 points: H1 by duality', value: dualityMid.ms, unit: 'ms' },
    { name: 'same complex: column reduction (baseline)', value: reductionMid.ms, unit: 'ms' },
    { name: 'reduction / duality', value: reductionMid.ms / dualityMid.ms, unit: '×' },
    { name: 'plain Rips H0+H1, 1000 points in R^3 (baseline)', value: rips.ms, unit: 'ms' },
    { name: 'DTM K=10 H0+H1, same points', value: dtm.ms, unit: 'ms' },
    { name: 'DTM / Rips', value: dtm.ms / rips.ms, unit: '×', goal: '≤ 1.5', met: dtm.ms / rips.ms <= 1.5 },
    {
      name: 'maxmin 1000 landmarks of 10^5 points in R^3',
      value: maxmin.ms,
      unit: 'ms',
      goal: '≤ 1000 ms',
      met: maxmin.ms <= 1000,
    },
    { name: 'maxmin 60 landmarks, incremental', value: maxminSmall.ms, unit: 'ms' },
    { name: 'maxmin 60 landmarks, naive recomputation (baseline)', value: naiveSmall.ms, unit: 'ms' },
    { name: 'naive / incremental (60 landmarks)', value: naiveSmall.ms / maxminSmall.ms, unit: '×' },
    { name: 'k-d tree 10-NN of 20000 points in R^3', value: tree.ms, unit: 'ms' },
    { name: 'direct scan (baseline)', value: scan.ms, unit: 'ms' },
    { name: 'scan / tree', value: scan.ms / tree.ms, unit: '×' },
  ]);
}
