/**
 * Landmark subsampling of a sample before its filtration: greedy farthest-point ("maxmin") selection
 * (de Silva & Carlsson, "Topological estimation using witness complexes", 2004) or a seeded uniform draw.
 *
 * Each selection records its covering radius ε = max over sample points of the distance to the nearest
 * landmark. The landmark set is then within Hausdorff distance ε of the sample, so by the stability theorem
 * (Cohen-Steiner, Edelsbrunner & Harer, "Stability of persistence diagrams", 2007; Chazal, de Silva & Oudot,
 * "Persistence stability for geometric complexes", 2014) the Rips diagrams on distances move by at most 2ε
 * in bottleneck distance (and the Čech/alpha diagrams on radii by at most ε).
 */
import { Random } from '../core/random.js';
import type { DistanceSample, PointSample } from '../core/sample.js';

export type SubsampleMethod = 'maxmin' | 'random';

export interface SubsampleSpec {
  method: SubsampleMethod;
  /** How many landmarks to keep. */
  count: number;
  /** Seed of the first landmark (maxmin) or of the draw (random). Default 1. */
  seed: number;
}

export const DEFAULT_SUBSAMPLE_SEED = 1;

export interface Landmarks {
  /** Indices of the landmarks in the sample, in the order chosen. */
  indices: Int32Array;
  /** max over the sample of the distance to the nearest landmark (0 when every point is kept). */
  coveringRadius: number;
}

/**
 * Greedy farthest-point selection of `n` landmarks from a cloud: the first is drawn with `seed`, each next one
 * is the point farthest from those already chosen (ties: lowest index).
 */
export function maxminLandmarks(
  coords: ArrayLike<number>,
  count: number,
  dim: number,
  n: number,
  seed = DEFAULT_SUBSAMPLE_SEED,
): Landmarks {
  const take = Math.min(n, count);
  const indices = new Int32Array(take);
  if (take === 0) return { indices, coveringRadius: 0 };
  const nearest = new Float64Array(count).fill(Infinity);
  let next = new Random(seed).int(count);
  let radiusSquared = 0;
  // Invariant: nearest[p] is the squared distance from p to the closest of indices[0, l).
  for (let l = 0; l < take; l++) {
    indices[l] = next;
    const far =
      dim === 2
        ? relax2(coords, count, next, nearest)
        : dim === 3
          ? relax3(coords, count, next, nearest)
          : relax(coords, count, dim, next, nearest);
    radiusSquared = nearest[far];
    next = far;
  }
  return { indices, coveringRadius: take === count ? 0 : Math.sqrt(radiusSquared) };
}

/** Lowers `nearest` by the distances to landmark `q`; returns the point now farthest from all landmarks. */
function relax(
  coords: ArrayLike<number>,
  count: number,
  dim: number,
  q: number,
  nearest: Float64Array,
): number {
  const base = q * dim;
  let far = 0;
  let farthest = -1;
  // Invariant: far is the first point of largest nearest[] among 0..p−1, already lowered by q.
  for (let p = 0; p < count; p++) {
    let d = 0;
    const pb = p * dim;
    for (let a = 0; a < dim; a++) {
      const t = coords[pb + a] - coords[base + a];
      d += t * t;
    }
    const m = d < nearest[p] ? d : nearest[p];
    nearest[p] = m;
    if (m > farthest) {
      farthest = m;
      far = p;
    }
  }
  return far;
}

function relax2(coords: ArrayLike<number>, count: number, q: number, nearest: Float64Array): number {
  const qx = coords[2 * q];
  const qy = coords[2 * q + 1];
  let far = 0;
  let farthest = -1;
  // Invariant: as in relax, for two coordinates.
  for (let p = 0; p < count; p++) {
    const dx = coords[2 * p] - qx;
    const dy = coords[2 * p + 1] - qy;
    const d = dx * dx + dy * dy;
    const m = d < nearest[p] ? d : nearest[p];
    nearest[p] = m;
    if (m > farthest) {
      farthest = m;
      far = p;
    }
  }
  return far;
}

function relax3(coords: ArrayLike<number>, count: number, q: number, nearest: Float64Array): number {
  const qx = coords[3 * q];
  const qy = coords[3 * q + 1];
  const qz = coords[3 * q + 2];
  let far = 0;
  let farthest = -1;
  // Invariant: as in relax, for three coordinates.
  for (let p = 0, o = 0; p < count; p++, o += 3) {
    const dx = coords[o] - qx;
    const dy = coords[o + 1] - qy;
    const dz = coords[o + 2] - qz;
    const d = dx * dx + dy * dy + dz * dz;
    const m = d < nearest[p] ? d : nearest[p];
    nearest[p] = m;
    if (m > farthest) {
      farthest = m;
      far = p;
    }
  }
  return far;
}

/** Greedy farthest-point selection from a full `size × size` distance matrix. */
export function maxminLandmarksFromMatrix(
  matrix: ArrayLike<number>,
  size: number,
  n: number,
  seed = DEFAULT_SUBSAMPLE_SEED,
): Landmarks {
  const take = Math.min(n, size);
  const indices = new Int32Array(take);
  if (take === 0) return { indices, coveringRadius: 0 };
  const nearest = new Float64Array(size).fill(Infinity);
  let next = new Random(seed).int(size);
  let radius = 0;
  // Invariant: nearest[p] is the distance from p to the closest of indices[0, l).
  for (let l = 0; l < take; l++) {
    indices[l] = next;
    let far = -1;
    let farthest = -1;
    for (let p = 0; p < size; p++) {
      const d = p === next ? 0 : matrix[next * size + p];
      if (d < nearest[p]) nearest[p] = d;
      if (nearest[p] > farthest) {
        farthest = nearest[p];
        far = p;
      }
    }
    radius = farthest;
    next = far;
  }
  return { indices, coveringRadius: take === size ? 0 : radius };
}

/** `n` distinct indices of `count` drawn uniformly with `seed` (partial Fisher–Yates), in increasing order. */
export function randomIndices(count: number, n: number, seed = DEFAULT_SUBSAMPLE_SEED): Int32Array {
  const take = Math.min(n, count);
  const pool = new Int32Array(count);
  for (let i = 0; i < count; i++) pool[i] = i;
  const random = new Random(seed);
  // Invariant: pool[0, i) is a uniform draw without replacement of i indices.
  for (let i = 0; i < take; i++) {
    const j = i + random.int(count - i);
    const t = pool[i];
    pool[i] = pool[j];
    pool[j] = t;
  }
  return pool.slice(0, take).sort();
}

/** The covering radius of a set of landmarks in a cloud: max over points of the distance to the nearest one. */
export function coveringRadius(
  coords: ArrayLike<number>,
  count: number,
  dim: number,
  landmarks: ArrayLike<number>,
): number {
  let worst = 0;
  // Invariant: worst is the largest nearest-landmark squared distance over points 0..p−1.
  for (let p = 0; p < count; p++) {
    let best = Infinity;
    for (let l = 0; l < landmarks.length && best > worst; l++) {
      const lb = landmarks[l] * dim;
      let d = 0;
      for (let a = 0; a < dim; a++) {
        const t = coords[p * dim + a] - coords[lb + a];
        d += t * t;
      }
      if (d < best) best = d;
    }
    if (best > worst) worst = best;
  }
  return Math.sqrt(worst);
}

/** The covering radius of landmarks given as rows of a full distance matrix. */
export function coveringRadiusFromMatrix(
  matrix: ArrayLike<number>,
  size: number,
  landmarks: ArrayLike<number>,
): number {
  let worst = 0;
  for (let p = 0; p < size; p++) {
    let best = Infinity;
    for (let l = 0; l < landmarks.length; l++) {
      const q = landmarks[l];
      const d = q === p ? 0 : matrix[q * size + p];
      if (d < best) best = d;
    }
    if (best > worst) worst = best;
  }
  return worst;
}

/** The landmarks of a cloud by the given method. */
export function selectLandmarks(
  coords: ArrayLike<number>,
  count: number,
  dim: number,
  spec: SubsampleSpec,
): Landmarks {
  if (spec.method === 'maxmin') return maxminLandmarks(coords, count, dim, spec.count, spec.seed);
  const indices = randomIndices(count, spec.count, spec.seed);
  return {
    indices,
    coveringRadius: indices.length === count ? 0 : coveringRadius(coords, count, dim, indices),
  };
}

/** The landmarks of a distance matrix by the given method. */
export function selectLandmarksFromMatrix(
  matrix: ArrayLike<number>,
  size: number,
  spec: SubsampleSpec,
): Landmarks {
  if (spec.method === 'maxmin') return maxminLandmarksFromMatrix(matrix, size, spec.count, spec.seed);
  const indices = randomIndices(size, spec.count, spec.seed);
  return {
    indices,
    coveringRadius: indices.length === size ? 0 : coveringRadiusFromMatrix(matrix, size, indices),
  };
}

/** A point or distance sample cut down to its landmarks, with the landmarks' covering radius. */
export function subsampleSample<S extends PointSample | DistanceSample>(
  sample: S,
  spec: SubsampleSpec,
): { sample: S; landmarks: Landmarks } {
  if (sample.kind === 'points') {
    const s = sample as PointSample;
    const landmarks = selectLandmarks(s.coords, s.count, s.dim, spec);
    const coords = new Float64Array(landmarks.indices.length * s.dim);
    for (let l = 0; l < landmarks.indices.length; l++) {
      coords.set(
        s.coords.subarray(landmarks.indices[l] * s.dim, (landmarks.indices[l] + 1) * s.dim),
        l * s.dim,
      );
    }
    return { sample: { ...s, count: landmarks.indices.length, coords } as S, landmarks };
  }
  const s = sample as DistanceSample;
  const landmarks = selectLandmarksFromMatrix(s.matrix, s.size, spec);
  const m = landmarks.indices.length;
  const matrix = new Float64Array(m * m);
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++)
      matrix[a * m + b] = s.matrix[landmarks.indices[a] * s.size + landmarks.indices[b]];
  }
  return { sample: { ...s, size: m, matrix } as S, landmarks };
}

/** Parses `maxmin:N[:SEED]` or `random:N[:SEED]`; undefined when the text is neither. */
export function parseSubsample(text: string): SubsampleSpec | undefined {
  const m = /^(maxmin|random):(\d+)(?::(\d+))?$/.exec(text.trim());
  if (!m) return undefined;
  const count = Number(m[2]);
  if (count < 1) return undefined;
  return {
    method: m[1] as SubsampleMethod,
    count,
    seed: m[3] === undefined ? DEFAULT_SUBSAMPLE_SEED : Number(m[3]),
  };
}

export function describeSubsample(spec: SubsampleSpec): string {
  return `${spec.method}:${spec.count}:${spec.seed}`;
}
