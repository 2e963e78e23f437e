import type { Random } from '../../core/random.js';

/**
 * Planar shapes that differ in topology only — a filled disc (no loop), a unit circle (one loop) and a figure
 * eight of two half-size circles (two loops) — with Gaussian jitter. Invented data for benchmarks and for the
 * checks that landscape features see loops; not a shipped dataset.
 */
export type ShapeLabel = 'disc' | 'loop' | 'eight';

export const SHAPE_LABELS: readonly ShapeLabel[] = ['disc', 'loop', 'eight'];

/** `points` points of one shape, row-major x, y; every draw comes from `random`, in a fixed order. */
export function drawShape(label: ShapeLabel, points: number, noise: number, random: Random): Float64Array {
  const coords = new Float64Array(points * 2);
  for (let i = 0; i < points; i++) {
    const a = random.uniform(0, 2 * Math.PI);
    let x: number;
    let y: number;
    if (label === 'disc') {
      const rad = Math.sqrt(random.next());
      x = rad * Math.cos(a);
      y = rad * Math.sin(a);
    } else if (label === 'loop') {
      x = Math.cos(a);
      y = Math.sin(a);
    } else {
      const side = i % 2 === 0 ? 1 : -1;
      x = side * 0.5 + 0.5 * Math.cos(a);
      y = 0.5 * Math.sin(a);
    }
    coords[2 * i] = x + random.normal(0, noise);
    coords[2 * i + 1] = y + random.normal(0, noise);
  }
  return coords;
}

/**
 * `points` points near the unit sphere in R³ (one void), row-major x, y, z: a uniform direction (a normalised
 * Gaussian triple) moved by Gaussian jitter of standard deviation `noise`. Invented data for benchmarks and
 * for checks that a degree-2 computation sees the void.
 */
export function drawSphere(points: number, noise: number, random: Random): Float64Array {
  const coords = new Float64Array(points * 3);
  for (let i = 0; i < points; i++) {
    const x = random.normal();
    const y = random.normal();
    const z = random.normal();
    const r = Math.hypot(x, y, z);
    coords[3 * i] = x / r + noise * random.normal();
    coords[3 * i + 1] = y / r + noise * random.normal();
    coords[3 * i + 2] = z / r + noise * random.normal();
  }
  return coords;
}
