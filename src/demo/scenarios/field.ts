import { Random } from '../../core/random.js';
import type { ImageSample } from '../../core/sample.js';

/**
 * Scenario (invented, synthetic): a thermal camera looks down on a field of buried heating sensors; each
 * frame is centred roughly on one sensor's warm patch, 8-bit grey levels (brighter is warmer).
 *
 *   disc   a solid warm patch: one component in the superlevel sets
 *   ring   a warm rim around a cool core (a ruptured sensor): one component and one loop
 *   pair   two separate warm patches (a split sensor): two components
 *
 * The warm area is matched across classes (the rim and the two patches cover about the area of the disc), and
 * position, size, brightness, background gradient and noise vary per frame, so neither raw pixels nor the
 * histogram of grey levels tell the classes apart easily; the number of components and loops does.
 */
export interface FieldOptions {
  /** Frames per class. Default 25. */
  perClass?: number;
  /** Frame height and width in pixels. Default 40. */
  size?: number;
  /** Pixel noise standard deviation in grey levels: fewest and most. Default [4, 10]. */
  noise?: [number, number];
}

export const FIELD_CLASSES = ['disc', 'ring', 'pair'] as const;

/** Generates the field dataset from `seed`: classes in turn (disc, ring, pair, …); values are whole grey levels. */
export function generateField(seed: number, options: FieldOptions = {}): ImageSample[] {
  const perClass = options.perClass ?? 25;
  const size = options.size ?? 40;
  const [minNoise, maxNoise] = options.noise ?? [4, 10];
  const random = new Random(seed);
  const samples: ImageSample[] = [];
  for (let k = 0; k < perClass * FIELD_CLASSES.length; k++) {
    const label = FIELD_CLASSES[k % FIELD_CLASSES.length];
    const r = random.fork();
    const outerRadius = r.uniform(0.2, 0.24) * size;
    const edge = r.uniform(0.5, 0.9);
    const peak = r.uniform(110, 170);
    const base = r.uniform(30, 60);
    const slope = r.uniform(-0.6, 0.6);
    const slopeAngle = r.uniform(0, 2 * Math.PI);
    const noise = r.uniform(minNoise, maxNoise);
    // Patches as (centre x, centre y, outer radius, inner radius): warm where inner ≤ distance ≤ outer.
    // Warm areas about match: a rim from 0.7 R to R (narrower than the 0.6 R of equal area, to offset its longer
    // soft edges; tuned on the generated frames, no source), a disc of 0.8 R, or two discs of 0.8 R / √2.
    const patches: number[][] = [];
    const small = (0.8 * outerRadius) / Math.SQRT2;
    const half = small * r.uniform(1.4, 1.8);
    const extent = label === 'ring' ? outerRadius : label === 'disc' ? 0.8 * outerRadius : half + small;
    const margin = extent + 2;
    const cx = r.uniform(margin, size - margin);
    const cy = r.uniform(margin, size - margin);
    if (label === 'disc') {
      patches.push([cx, cy, 0.8 * outerRadius, 0]);
    } else if (label === 'ring') {
      patches.push([cx, cy, outerRadius, 0.7 * outerRadius]);
    } else {
      const a = r.uniform(0, Math.PI);
      const dx = half * Math.cos(a);
      const dy = half * Math.sin(a);
      patches.push([cx - dx, cy - dy, small, 0], [cx + dx, cy + dy, small, 0]);
    }
    const values = new Float64Array(size * size);
    const gx = slope * Math.cos(slopeAngle);
    const gy = slope * Math.sin(slopeAngle);
    // Invariant: values[0 .. y·size + x) hold the finished grey levels of the pixels before (x, y).
    for (let y = 0; y < size; y++) {
      for (let x = 0; x < size; x++) {
        let warmth = 0;
        // Each patch's profile is scaled so that its warmest point reaches 1, whatever its shape.
        for (const [px, py, outer, inner] of patches) {
          const d = Math.hypot(x + 0.5 - px, y + 0.5 - py);
          const w =
            profile(d, outer, inner, edge) / profile(inner > 0 ? (inner + outer) / 2 : 0, outer, inner, edge);
          if (w > warmth) warmth = w;
        }
        const v = base + gx * (x - size / 2) + gy * (y - size / 2) + peak * warmth + r.normal(0, noise);
        values[y * size + x] = Math.min(255, Math.max(0, Math.round(v)));
      }
    }
    samples.push({
      kind: 'image',
      id: `frame-${String(k + 1).padStart(3, '0')}`,
      label,
      shape: [size, size],
      values,
    });
  }
  return samples;
}

/** Warmth at distance d from a patch centre: a soft step down at `outer` and (for a rim) a soft step up at `inner`. */
function profile(d: number, outer: number, inner: number, edge: number): number {
  return sigmoid((outer - d) / edge) * (inner > 0 ? sigmoid((d - inner) / edge) : 1);
}

function sigmoid(z: number): number {
  return 1 / (1 + Math.exp(-z));
}
