/**
 * Filtrations of images (2-D, shape [rows, columns]) and volumes (3-D, shape [depth, rows, columns]): each
 * turns a grey image into the pixel values whose sublevel sets `cubicalPersistence` (cubical.ts) filters.
 *
 * Positions are pixel indices in axis order — (row, column) for images, (depth, row, column) for volumes —
 * and every direction or centre is written in that same order. Most filtrations look at the binarised image:
 * a pixel is foreground when its value is ≥ the threshold (default: Otsu's threshold of the image, see
 * `otsuThreshold`; `threshold` fixes it for every image).
 *
 *   grey           the image's own values (superlevel: their negatives, so bright pixels come first);
 *   height:A:B     foreground pixel p → ⟨p, v⟩ with v = (A, B) / |(A, B)|; background → the largest value of
 *                  ⟨p, v⟩ over the whole grid + 1 (so it enters after every foreground pixel, at a value that
 *                  depends on the shape only, not on the image); volumes: height:A:B:C;
 *   radial:R:C     foreground pixel p → |p − c| with centre c = (R, C); background → the largest distance from c
 *                  to a pixel of the grid + 1; a coordinate written P% means P/100 × (size − 1) on that axis
 *                  (0% the first pixel, 100% the last); volumes: radial:D:R:C;
 *   distance       the signed distance transform: foreground p → −(Euclidean distance to the nearest background
 *                  pixel), background p → +(distance to the nearest foreground pixel). Sublevel sets start
 *                  at the stroke's medial pixels, reach the binarised shape at −1 and then thicken it;
 *   dilation       p → distance to the nearest foreground pixel (0 on the foreground): sublevel set t is the
 *                  shape dilated by a disc of radius t (gaps close, holes fill in);
 *   erosion        foreground p → −(distance to the nearest background pixel), background → 0: sublevel set
 *                  −t is the shape eroded by a disc of radius t (thin strokes vanish first, thick parts last);
 *   density:R      p → N_R − (foreground pixels q with |q − p| ≤ R), where N_R is the number of grid offsets in
 *                  that ball: a fully foreground ball gives 0, so dense regions come first;
 * Presets (2-D images; they expand at parsing):
 *   heights:N      height:sin(2πk/N):cos(2πk/N), k = 0 … N − 1, rounded to 6 decimals (k = 0 is left to
 *                  right, k = N/4 top to bottom);
 *   radials:N      radial:P_i%:P_j% with P_i = 100 (i + 1) / (N + 1), i, j = 0 … N − 1 (a grid of N × N centres
 *                  inside the image, row-major).
 *
 * Distances are exact Euclidean (squared distances by the lower envelope of parabolas along each axis in
 * turn: Felzenszwalb & Huttenlocher, "Distance transforms of sampled functions", 2012). When a distance has
 * no pixel to reach (no background pixel for erosion, no foreground pixel for dilation), it is the grid's
 * diagonal length + 1: above every distance the grid holds.
 */
import { UserError } from '../core/errors.js';
import { imageSize } from './cubical.js';

export type ImageFiltration =
  | { kind: 'grey' }
  | { kind: 'height'; direction: number[] }
  | { kind: 'radial'; centre: CentreCoordinate[] }
  | { kind: 'distance' }
  | { kind: 'dilation' }
  | { kind: 'erosion' }
  | { kind: 'density'; radius: number };

/** A centre coordinate on one axis: in pixels, or as a percentage of (size − 1). */
export interface CentreCoordinate {
  value: number;
  percent: boolean;
}

export const IMAGE_FILTRATION_CHOICES =
  'grey, height:ROW:COL (a direction), radial:ROW:COL (a centre, pixels or P%), distance, dilation, erosion, density:R, or the presets heights:N and radials:N';

export interface ImageFiltrationOptions {
  /** Foreground is value ≥ threshold (default: Otsu's threshold of each image). */
  threshold?: number;
  /** grey only: superlevel sets, i.e. the negated values (default false). */
  superlevel?: boolean;
}

/** True when the filtration looks at the binarised image (every kind but grey). */
export function isBinaryFiltration(f: ImageFiltration): boolean {
  return f.kind !== 'grey';
}

/**
 * Parses one item of the filtration syntax; a preset (`heights:N`, `radials:N`) gives several. Returns
 * undefined when the text is not an image filtration at all; throws a UserError when it is one with bad values.
 */
export function parseImageFiltration(text: string): ImageFiltration[] | undefined {
  const t = text.trim();
  const parts = t.split(':');
  const head = parts[0];
  const rest = parts.slice(1);
  const none = (): void => {
    if (rest.length > 0) throw new UserError(`filtration '${t}' takes no values; write '${head}'`);
  };
  switch (head) {
    case 'grey':
    case 'distance':
    case 'dilation':
    case 'erosion':
      none();
      return [{ kind: head }];
    case 'height': {
      if (rest.length < 1 || rest.length > 3)
        throw new UserError(
          `filtration '${t}' must look like height:ROW:COL (or height:DEPTH:ROW:COL), e.g. height:0:1`,
        );
      const direction = rest.map((r) => numberIn(r, t));
      if (direction.every((x) => x === 0))
        throw new UserError(`filtration '${t}' has direction 0; give a direction such as height:0:1`);
      return [{ kind: 'height', direction }];
    }
    case 'radial': {
      if (rest.length < 1 || rest.length > 3)
        throw new UserError(
          `filtration '${t}' must look like radial:ROW:COL (pixels, or P% of the size), e.g. radial:13.5:13.5 or radial:50%:50%`,
        );
      return [{ kind: 'radial', centre: rest.map((r) => centreIn(r, t)) }];
    }
    case 'density': {
      if (rest.length !== 1)
        throw new UserError(`filtration '${t}' must look like density:R, e.g. density:3`);
      const radius = numberIn(rest[0], t);
      if (!(radius > 0) || radius > 1000)
        throw new UserError(`filtration '${t}': the radius must be above 0 and at most 1000 pixels`);
      return [{ kind: 'density', radius }];
    }
    case 'heights':
    case 'radials': {
      const n = rest.length === 1 && /^\d+$/.test(rest[0]) ? Number(rest[0]) : 0;
      if (n < 1 || n > 64)
        throw new UserError(
          `filtration '${t}' must look like ${head}:N with N from 1 to 64, e.g. ${head}:${head === 'heights' ? 8 : 3}`,
        );
      return head === 'heights' ? heightPreset(n) : radialPreset(n);
    }
    default:
      return undefined;
  }
}

function heightPreset(n: number): ImageFiltration[] {
  const out: ImageFiltration[] = [];
  for (let k = 0; k < n; k++) {
    const angle = (2 * Math.PI * k) / n;
    out.push({ kind: 'height', direction: [rounded(Math.sin(angle), 6), rounded(Math.cos(angle), 6)] });
  }
  return out;
}

function radialPreset(n: number): ImageFiltration[] {
  const out: ImageFiltration[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const centre = [i, j].map((k) => ({ value: rounded((100 * (k + 1)) / (n + 1), 4), percent: true }));
      out.push({ kind: 'radial', centre });
    }
  }
  return out;
}

/** Rounds to `digits` decimals; never returns −0. */
function rounded(x: number, digits: number): number {
  const scale = 10 ** digits;
  return Math.round(x * scale) / scale + 0;
}

function numberIn(text: string, whole: string): number {
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value))
    throw new UserError(`filtration '${whole}': '${text}' is not a finite number`);
  return value + 0;
}

function centreIn(text: string, whole: string): CentreCoordinate {
  const percent = text.endsWith('%');
  return { value: numberIn(percent ? text.slice(0, -1) : text, whole), percent };
}

/** The canonical text of a filtration (parsing it gives the same filtration back); it is the diagrams' tag. */
export function describeImageFiltration(f: ImageFiltration): string {
  switch (f.kind) {
    case 'height':
      return `height:${f.direction.map(String).join(':')}`;
    case 'radial':
      return `radial:${f.centre.map((c) => `${c.value}${c.percent ? '%' : ''}`).join(':')}`;
    case 'density':
      return `density:${f.radius}`;
    default:
      return f.kind;
  }
}

/**
 * The values to filter for one image: `values` row-major over `shape` (1 to 3 axes), filtration `f`. The
 * result goes to `cubicalPersistence(result, shape)` as it is (superlevel is already applied for grey).
 */
export function filteredImage(
  values: Float64Array,
  shape: readonly number[],
  f: ImageFiltration,
  options: ImageFiltrationOptions = {},
): Float64Array {
  const total = checkShape(values, shape);
  if (f.kind === 'grey') {
    const out = new Float64Array(total);
    if (options.superlevel) for (let p = 0; p < total; p++) out[p] = 0 - values[p];
    else out.set(values);
    return out;
  }
  const foreground = binarise(values, options.threshold);
  switch (f.kind) {
    case 'height':
      return heightValues(foreground, shape, checkedVector(f.direction, shape, describeImageFiltration(f)));
    case 'radial':
      return radialValues(foreground, shape, centreOf(f, shape));
    case 'distance': {
      const inside = distanceTransform(foreground, shape, 0);
      const outside = distanceTransform(foreground, shape, 1);
      const out = new Float64Array(total);
      for (let p = 0; p < total; p++) out[p] = foreground[p] ? -inside[p] : outside[p];
      return out;
    }
    case 'dilation':
      return distanceTransform(foreground, shape, 1);
    case 'erosion': {
      const out = distanceTransform(foreground, shape, 0);
      for (let p = 0; p < total; p++) out[p] = 0 - out[p];
      return out;
    }
    case 'density':
      return densityValues(foreground, shape, f.radius);
  }
}

function checkShape(values: Float64Array, shape: readonly number[]): number {
  const total = imageSize(values, shape);
  for (let p = 0; p < total; p++) {
    if (!Number.isFinite(values[p]))
      throw new UserError(`pixel ${p + 1} is ${values[p]}; pixel values must be finite numbers`);
  }
  return total;
}

function checkedVector(direction: readonly number[], shape: readonly number[], name: string): Float64Array {
  if (direction.length !== shape.length) {
    throw new UserError(
      `filtration '${name}' has ${direction.length} component${direction.length === 1 ? '' : 's'}, the image has ${shape.length} axes; give one per axis (${shape.length === 3 ? 'depth, row, column' : 'row, column'})`,
    );
  }
  let norm = 0;
  for (const x of direction) norm += x * x;
  norm = Math.sqrt(norm);
  return Float64Array.from(direction, (x) => x / norm);
}

function centreOf(f: { kind: 'radial'; centre: CentreCoordinate[] }, shape: readonly number[]): Float64Array {
  if (f.centre.length !== shape.length) {
    throw new UserError(
      `filtration '${describeImageFiltration(f)}' has ${f.centre.length} coordinate${f.centre.length === 1 ? '' : 's'}, the image has ${shape.length} axes; give one per axis`,
    );
  }
  return Float64Array.from(f.centre, (c, a) => (c.percent ? (c.value / 100) * (shape[a] - 1) : c.value));
}

/**
 * Otsu's threshold of an image: the split of a 256-bin histogram over [min, max] that maximises the
 * between-class variance ω0 ω1 (μ0 − μ1)² (Otsu, "A threshold selection method from gray-level histograms",
 * 1979). Returned as the smallest value of the upper class, so foreground = value ≥ threshold. A constant
 * image has no split: the threshold is above its value (no foreground).
 */
export function otsuThreshold(values: Float64Array): number {
  const n = values.length;
  let min = Infinity;
  let max = -Infinity;
  for (let p = 0; p < n; p++) {
    if (values[p] < min) min = values[p];
    if (values[p] > max) max = values[p];
  }
  if (!(max > min)) return n === 0 ? 0 : max + 1;
  const bins = 256;
  const histogram = binCounts(values, min, max, bins);
  const best = otsuSplit(histogram, n);
  // The smallest value whose bin is above the split.
  const scale = bins / (max - min);
  let threshold = Infinity;
  for (let p = 0; p < n; p++) {
    const b = Math.min(bins - 1, Math.floor((values[p] - min) * scale));
    if (b > best && values[p] < threshold) threshold = values[p];
  }
  return threshold;
}

function binCounts(values: Float64Array, min: number, max: number, bins: number): Float64Array {
  const histogram = new Float64Array(bins);
  const scale = bins / (max - min);
  for (let p = 0; p < values.length; p++)
    histogram[Math.min(bins - 1, Math.floor((values[p] - min) * scale))]++;
  return histogram;
}

/** The last bin of the lower class that maximises ω0 ω1 (μ0 − μ1)² (ties: the first such bin). */
function otsuSplit(histogram: Float64Array, n: number): number {
  let totalSum = 0;
  for (let b = 0; b < histogram.length; b++) totalSum += b * histogram[b];
  let count0 = 0;
  let sum0 = 0;
  let best = 0;
  let bestScore = -1;
  // invariant: count0 and sum0 are the count and bin-index sum of bins 0 … k
  for (let k = 0; k < histogram.length - 1; k++) {
    count0 += histogram[k];
    sum0 += k * histogram[k];
    const count1 = n - count0;
    if (count0 === 0 || count1 === 0) continue;
    const mean0 = sum0 / count0;
    const mean1 = (totalSum - sum0) / count1;
    const score = count0 * count1 * (mean0 - mean1) * (mean0 - mean1);
    if (score > bestScore) {
      bestScore = score;
      best = k;
    }
  }
  return best;
}

/** 1 where value ≥ threshold (default: Otsu's threshold of these values), else 0. */
export function binarise(values: Float64Array, threshold?: number): Uint8Array {
  const t = threshold ?? otsuThreshold(values);
  const out = new Uint8Array(values.length);
  for (let p = 0; p < values.length; p++) out[p] = values[p] >= t ? 1 : 0;
  return out;
}

/** Strides of a row-major shape (last axis fastest). */
function stridesOf(shape: readonly number[]): number[] {
  const strides = new Array<number>(shape.length);
  let s = 1;
  for (let a = shape.length - 1; a >= 0; a--) {
    strides[a] = s;
    s *= shape[a];
  }
  return strides;
}

function heightValues(foreground: Uint8Array, shape: readonly number[], v: Float64Array): Float64Array {
  const out = new Float64Array(foreground.length);
  let top = 0;
  for (let a = 0; a < shape.length; a++) top += Math.max(0, (shape[a] - 1) * v[a]);
  const background = top + 1;
  const axes = shape.length;
  const s0 = axes === 3 ? shape[1] * shape[2] : axes === 2 ? shape[1] : 1;
  const s1 = axes === 3 ? shape[2] : 1;
  // invariant: out[0 … p) holds the values of the pixels before p
  for (let p = 0; p < out.length; p++) {
    if (!foreground[p]) {
      out[p] = background;
      continue;
    }
    const i0 = Math.floor(p / s0);
    const r = p - i0 * s0;
    const i1 = Math.floor(r / s1);
    const i2 = r - i1 * s1;
    const h = axes === 1 ? i0 * v[0] : axes === 2 ? i0 * v[0] + r * v[1] : i0 * v[0] + i1 * v[1] + i2 * v[2];
    out[p] = h + 0; // never −0
  }
  return out;
}

function radialValues(foreground: Uint8Array, shape: readonly number[], c: Float64Array): Float64Array {
  const out = new Float64Array(foreground.length);
  let far = 0;
  for (let a = 0; a < shape.length; a++) {
    const reach = Math.max(Math.abs(c[a]), Math.abs(shape[a] - 1 - c[a]));
    far += reach * reach;
  }
  const background = Math.sqrt(far) + 1;
  const axes = shape.length;
  const s0 = axes === 3 ? shape[1] * shape[2] : axes === 2 ? shape[1] : 1;
  const s1 = axes === 3 ? shape[2] : 1;
  // invariant: out[0 … p) holds the values of the pixels before p
  for (let p = 0; p < out.length; p++) {
    if (!foreground[p]) {
      out[p] = background;
      continue;
    }
    const i0 = Math.floor(p / s0);
    const r = p - i0 * s0;
    const d0 = i0 - c[0];
    let sq = d0 * d0;
    if (axes === 2) {
      const d1 = r - c[1];
      sq += d1 * d1;
    } else if (axes === 3) {
      const i1 = Math.floor(r / s1);
      const d1 = i1 - c[1];
      const d2 = r - i1 * s1 - c[2];
      sq += d1 * d1 + d2 * d2;
    }
    out[p] = Math.sqrt(sq);
  }
  return out;
}

/** Far above any squared distance of a grid (the parabola of a pixel that is no site). */
const NO_SITE = 1e20;

/**
 * Exact Euclidean distance from every pixel to the nearest pixel whose mask value is `site` (0 at the sites
 * themselves); the grid's diagonal + 1 where there is no site at all. Squared distances are transformed along
 * each axis in turn by the lower envelope of parabolas (Felzenszwalb & Huttenlocher 2012).
 */
export function distanceTransform(mask: Uint8Array, shape: readonly number[], site: 0 | 1): Float64Array {
  const total = mask.length;
  const d = new Float64Array(total);
  let any = false;
  for (let p = 0; p < total; p++) {
    if (mask[p] === site) any = true;
    else d[p] = NO_SITE;
  }
  let diagonal = 0;
  for (const s of shape) diagonal += (s - 1) * (s - 1);
  if (!any) return d.fill(Math.sqrt(diagonal) + 1);
  const strides = stridesOf(shape);
  let longest = 0;
  for (const s of shape) longest = Math.max(longest, s);
  const line = new Float64Array(longest);
  const result = new Float64Array(longest);
  const hull = new Int32Array(longest);
  const bounds = new Float64Array(longest + 1);
  for (let a = 0; a < shape.length; a++) {
    const length = shape[a];
    const stride = strides[a];
    const lines = total / length;
    // Line k starts at the k-th index with coordinate 0 on axis a.
    for (let k = 0; k < lines; k++) {
      const outer = Math.floor(k / stride);
      const start = outer * stride * length + (k - outer * stride);
      for (let q = 0; q < length; q++) line[q] = d[start + q * stride];
      lowerEnvelope(line, length, result, hull, bounds);
      for (let q = 0; q < length; q++) d[start + q * stride] = result[q];
    }
  }
  for (let p = 0; p < total; p++) d[p] = Math.sqrt(d[p]);
  return d;
}

/**
 * One-dimensional squared distance transform of sampled function f: out[q] = min_r (q − r)² + f[r]
 * (Felzenszwalb & Huttenlocher 2012, algorithm DT(f)). `hull` holds the parabolas of the lower envelope,
 * `bounds` the points where one gives way to the next.
 */
function lowerEnvelope(
  f: Float64Array,
  n: number,
  out: Float64Array,
  hull: Int32Array,
  bounds: Float64Array,
): void {
  let k = 0;
  hull[0] = 0;
  bounds[0] = -Infinity;
  bounds[1] = Infinity;
  // invariant: hull[0 … k] are the parabolas of the envelope of f[0 … q), bounds[k + 1] = +∞
  for (let q = 1; q < n; q++) {
    let s = (f[q] + q * q - (f[hull[k]] + hull[k] * hull[k])) / (2 * q - 2 * hull[k]);
    while (s <= bounds[k]) {
      k--;
      s = (f[q] + q * q - (f[hull[k]] + hull[k] * hull[k])) / (2 * q - 2 * hull[k]);
    }
    k++;
    hull[k] = q;
    bounds[k] = s;
    bounds[k + 1] = Infinity;
  }
  k = 0;
  for (let q = 0; q < n; q++) {
    while (bounds[k + 1] < q) k++;
    const r = hull[k];
    out[q] = (q - r) * (q - r) + f[r];
  }
}

/** N_R − (foreground pixels within distance R), see the module comment. */
function densityValues(foreground: Uint8Array, shape: readonly number[], radius: number): Float64Array {
  const axes = shape.length;
  const reach = Math.floor(radius);
  const dims = [axes === 3 ? shape[0] : 1, axes >= 2 ? shape[axes - 2] : 1, shape[axes - 1]];
  // Offsets (dz, dy, dx) within the ball, flattened three at a time.
  const offsets: number[] = [];
  const rz = axes === 3 ? reach : 0;
  const ry = axes >= 2 ? reach : 0;
  for (let dz = -rz; dz <= rz; dz++)
    for (let dy = -ry; dy <= ry; dy++)
      for (let dx = -reach; dx <= reach; dx++)
        if (dz * dz + dy * dy + dx * dx <= radius * radius) offsets.push(dz, dy, dx);
  return densityCounts(foreground, dims[0], dims[1], dims[2], Int32Array.from(offsets));
}

function densityCounts(fg: Uint8Array, D: number, H: number, W: number, offsets: Int32Array): Float64Array {
  const out = new Float64Array(fg.length);
  const ball = offsets.length / 3;
  // invariant: out[p] for pixels before (z, y, x) holds N_R minus their foreground counts
  for (let z = 0; z < D; z++)
    for (let y = 0; y < H; y++)
      for (let x = 0; x < W; x++) {
        let count = 0;
        for (let o = 0; o < offsets.length; o += 3) {
          const zz = z + offsets[o];
          const yy = y + offsets[o + 1];
          const xx = x + offsets[o + 2];
          if (zz < 0 || zz >= D || yy < 0 || yy >= H || xx < 0 || xx >= W) continue;
          count += fg[(zz * H + yy) * W + xx];
        }
        out[(z * H + y) * W + x] = ball - count;
      }
  return out;
}
