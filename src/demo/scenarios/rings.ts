import { Random } from '../../core/random.js';
import type { PointSample } from '../../core/sample.js';

/**
 * Scenario (invented, synthetic): a vision station on a gasket press traces the outline of each stamped part as
 * a planar point cloud. Five kinds of part come down the line:
 *
 *   single   one ring
 *   twin     two rings side by side with a clear gap between them
 *   linked   two rings that touch (a figure eight)
 *   blank    a solid disc (the punch did not cut the hole)
 *   crescent an open arc of about three quarters of a ring (a torn part)
 *
 * Every cloud carries jitter and a share of stray detections (dust, glare) scattered uniformly over the frame:
 * these outliers make long H0 bars of their own in a plain Rips filtration, which blurs "twin" against
 * "linked"; a distance-to-measure filtration pushes them late and keeps the two apart.
 */
export interface RingsOptions {
  /** Samples per class. Default 12. */
  perClass?: number;
  /** Points per cloud (outliers included). Default 150. */
  points?: number;
  /** Share of the points that are stray detections. Default 0.04. */
  outliers?: number;
  /** Standard deviation of the jitter, in ring radii. Default 0.04. */
  jitter?: number;
}

export const RINGS_CLASSES = ['single', 'twin', 'linked', 'blank', 'crescent'] as const;

/** Generates the gasket-press clouds from `seed`: classes in turn, each sample with its own fork of the stream. */
export function generateRings(seed: number, options: RingsOptions = {}): PointSample[] {
  const perClass = options.perClass ?? 12;
  const points = options.points ?? 150;
  const outlierShare = options.outliers ?? 0.04;
  const jitter = options.jitter ?? 0.04;
  const random = new Random(seed);
  const samples: PointSample[] = [];
  for (let s = 0; s < perClass * RINGS_CLASSES.length; s++) {
    const label = RINGS_CLASSES[s % RINGS_CLASSES.length];
    const r = random.fork();
    const outliers = Math.round(points * outlierShare);
    const inliers = points - outliers;
    const coords = new Float64Array(points * 2);
    const scale = r.uniform(0.9, 1.1);
    const turn = r.uniform(0, 2 * Math.PI);
    const cos = Math.cos(turn);
    const sin = Math.sin(turn);
    for (let i = 0; i < inliers; i++) {
      let x = 0;
      let y = 0;
      if (label === 'single') {
        const a = r.uniform(0, 2 * Math.PI);
        x = Math.cos(a);
        y = Math.sin(a);
      } else if (label === 'twin' || label === 'linked') {
        // Rings of radius 0.6; centres ±0.9 (gap 0.6) for twin, ±0.6 (touching) for linked.
        const offset = label === 'twin' ? 0.9 : 0.6;
        const a = r.uniform(0, 2 * Math.PI);
        const side = i % 2 === 0 ? -1 : 1;
        x = side * offset + 0.6 * Math.cos(a);
        y = 0.6 * Math.sin(a);
      } else if (label === 'blank') {
        const a = r.uniform(0, 2 * Math.PI);
        const rho = Math.sqrt(r.next());
        x = rho * Math.cos(a);
        y = rho * Math.sin(a);
      } else {
        const a = r.uniform(0, 1.5 * Math.PI);
        x = Math.cos(a);
        y = Math.sin(a);
      }
      x += r.normal(0, jitter);
      y += r.normal(0, jitter);
      coords[2 * i] = scale * (cos * x - sin * y);
      coords[2 * i + 1] = scale * (sin * x + cos * y);
    }
    for (let i = inliers; i < points; i++) {
      coords[2 * i] = r.uniform(-2, 2);
      coords[2 * i + 1] = r.uniform(-2, 2);
    }
    samples.push({
      kind: 'points',
      id: `${label}-${String(Math.floor(s / RINGS_CLASSES.length) + 1).padStart(2, '0')}`,
      label,
      dim: 2,
      count: points,
      coords,
    });
  }
  return samples;
}
