import type { Random } from '../../src/core/random.js';

/**
 * `count` points drawn uniformly on the unit sphere S² (normalised Gaussian vectors: the standard normal
 * distribution is rotation invariant), row-major x, y, z. For tests of degree 2, where S² has b2 = 1.
 */
export function spherePoints(rng: Random, count: number): Float64Array {
  const c = new Float64Array(count * 3);
  for (let i = 0; i < count; i++) {
    const x = rng.normal();
    const y = rng.normal();
    const z = rng.normal();
    const r = Math.hypot(x, y, z);
    c[3 * i] = x / r;
    c[3 * i + 1] = y / r;
    c[3 * i + 2] = z / r;
  }
  return c;
}
