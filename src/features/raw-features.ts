import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import type { Sample, SampleKind } from '../core/sample.js';
import { quantileSorted } from './landscape-vectorizer.js';

/**
 * Raw-feature baselines, fitted on the same folds as the landscape features so the comparison is fair:
 *  - points: the D2 shape distribution — a histogram of all pairwise distances (Osada, Funkhouser, Chazelle,
 *    Dobkin, "Shape distributions", 2002) — with its bin range learned in `fit` (0 to the largest of the
 *    training samples' `upperQuantile` distance quantiles), as fractions of the pairs, plus the sorted
 *    eigenvalues of the covariance of the coordinates (largest first);
 *  - distances: the same histogram over the entries above the diagonal;
 *  - signal: the values resampled to `signalLength` points by linear interpolation;
 *  - image: pixels averaged down to `imageSize` per side (boxes of the input);
 *  - table: its own columns.
 * Diagram datasets have no raw baseline.
 */
export interface RawFeaturesOptions {
  /** Histogram bins for points and distances. Default 32. */
  bins?: number;
  /** Quantile of each training sample's distances that bounds the histogram. Default 0.99. */
  upperQuantile?: number;
  /** Resampled length of signals. Default 64. */
  signalLength?: number;
  /** Side of the downsampled image (or volume). Default 16 for images, 8 for volumes. */
  imageSize?: number;
}

export const DEFAULT_RAW_FEATURES_OPTIONS = { bins: 32, upperQuantile: 0.99, signalLength: 64 } as const;

export interface RawFeaturesState {
  kind: SampleKind;
  /** Histogram range [0, upper] for points and distances. */
  upper?: number;
  /** Covariance eigenvalue count for points (the largest dimension seen in training). */
  dim?: number;
  /** Output shape for images. */
  shape?: number[];
  /** Column count for tables and signals. */
  width?: number;
  /** Column names for tables. */
  columns?: string[];
}

export interface RawFeaturesJSON {
  kind: 'landform.raw-features';
  format: 1;
  options: Required<Omit<RawFeaturesOptions, 'imageSize'>> & { imageSize?: number };
  state: RawFeaturesState;
}

/** Kinds that have a raw baseline. */
export function hasRawFeatures(kind: SampleKind): boolean {
  return kind !== 'diagrams';
}

export class RawFeatures {
  readonly bins: number;
  readonly upperQuantile: number;
  readonly signalLength: number;
  readonly imageSize?: number;
  state?: RawFeaturesState;

  constructor(options: RawFeaturesOptions = {}) {
    const o = { ...DEFAULT_RAW_FEATURES_OPTIONS, ...options };
    this.bins = o.bins;
    this.upperQuantile = o.upperQuantile;
    this.signalLength = o.signalLength;
    this.imageSize = o.imageSize;
    if (!Number.isInteger(this.bins) || this.bins < 1)
      throw new UserError(`raw histogram bins ${this.bins} must be a whole number ≥ 1`);
    if (!Number.isInteger(this.signalLength) || this.signalLength < 2)
      throw new UserError(`signal length ${this.signalLength} must be ≥ 2`);
  }

  /** Learns the histogram range, dimensions or shapes from `samples[indices]` only. */
  fit(samples: readonly Sample[], indices?: ArrayLike<number>, columns?: readonly string[]): this {
    const chosen = indices ?? identity(samples.length);
    if (chosen.length === 0) throw new Error('RawFeatures.fit: no samples');
    const kind = samples[chosen[0]].kind;
    switch (kind) {
      case 'points':
      case 'distances': {
        let upper = 0;
        let dim = 0;
        for (let r = 0; r < chosen.length; r++) {
          const s = samples[chosen[r]];
          const q = quantileSorted(sortedDistances(s), this.upperQuantile);
          if (q > upper) upper = q;
          if (s.kind === 'points' && s.dim > dim) dim = s.dim;
        }
        this.state = { kind, upper: upper > 0 ? upper : 1, ...(kind === 'points' ? { dim } : {}) };
        break;
      }
      case 'signal':
        this.state = { kind, width: this.signalLength };
        break;
      case 'image': {
        const s = samples[chosen[0]];
        const volume = s.kind === 'image' && s.shape.length === 3;
        const side = this.imageSize ?? (volume ? 8 : 16);
        this.state = { kind, shape: volume ? [side, side, side] : [side, side] };
        break;
      }
      case 'table': {
        const s = samples[chosen[0]];
        const width = s.kind === 'table' ? s.values.length : 0;
        this.state = {
          kind,
          width,
          columns: columns ? [...columns] : Array.from({ length: width }, (_, j) => `c${j + 1}`),
        };
        break;
      }
      case 'diagrams':
        throw new UserError(
          'a diagrams dataset has no raw-feature baseline; use a feature set built from diagrams (landscape, betti, stats, pimage)',
        );
    }
    return this;
  }

  transform(samples: readonly Sample[], indices?: ArrayLike<number>): Matrix {
    const state = this.fitted();
    const chosen = indices ?? identity(samples.length);
    const cols = this.featureCount;
    const data = new Float64Array(chosen.length * cols);
    for (let r = 0; r < chosen.length; r++) {
      const s = samples[chosen[r]];
      if (s.kind !== state.kind)
        throw new UserError(`sample '${s.id}' is ${s.kind} but the features were fitted on ${state.kind}`);
      const out = data.subarray(r * cols, (r + 1) * cols);
      switch (s.kind) {
        case 'points':
          histogram(sortedDistances(s), state.upper!, this.bins, out);
          covarianceEigenvalues(s.coords, s.count, s.dim, out.subarray(this.bins, this.bins + state.dim!));
          break;
        case 'distances':
          histogram(sortedDistances(s), state.upper!, this.bins, out);
          break;
        case 'signal':
          resample(s.values, out);
          break;
        case 'image':
          downsample(s.values, s.shape, state.shape!, out);
          break;
        case 'table':
          if (s.values.length !== state.width) {
            throw new UserError(
              `sample '${s.id}' has ${s.values.length} columns; the features were fitted on ${state.width}`,
            );
          }
          out.set(s.values);
          break;
        case 'diagrams':
          throw new UserError(
            'a diagrams dataset has no raw-feature baseline; use a feature set built from diagrams (landscape, betti, stats, pimage)',
          );
      }
    }
    return { rows: chosen.length, cols, data };
  }

  get featureCount(): number {
    const s = this.fitted();
    switch (s.kind) {
      case 'points':
        return this.bins + s.dim!;
      case 'distances':
        return this.bins;
      case 'image':
        return s.shape!.reduce((a, b) => a * b, 1);
      default:
        return s.width!;
    }
  }

  /** Readable names: `D2/r=0.0312` (bin centre), `eig/1`, `signal/i=12`, `pixel/y=3,x=4`, table columns. */
  featureNames(): string[] {
    const s = this.fitted();
    const names: string[] = [];
    if (s.kind === 'points' || s.kind === 'distances') {
      const prefix = s.kind === 'points' ? 'D2' : 'dist';
      const width = s.upper! / this.bins;
      const decimals = Math.max(4, Math.ceil(-Math.log10(width)) + 1);
      for (let b = 0; b < this.bins; b++) names.push(`${prefix}/r=${((b + 0.5) * width).toFixed(decimals)}`);
      if (s.kind === 'points') for (let e = 1; e <= s.dim!; e++) names.push(`eig/${e}`);
    } else if (s.kind === 'signal') {
      for (let i = 0; i < s.width!; i++) names.push(`signal/i=${i}`);
    } else if (s.kind === 'image') {
      const shape = s.shape!;
      if (shape.length === 2) {
        for (let y = 0; y < shape[0]; y++)
          for (let x = 0; x < shape[1]; x++) names.push(`pixel/y=${y},x=${x}`);
      } else {
        for (let z = 0; z < shape[0]; z++)
          for (let y = 0; y < shape[1]; y++)
            for (let x = 0; x < shape[2]; x++) names.push(`voxel/z=${z},y=${y},x=${x}`);
      }
    } else {
      names.push(...s.columns!);
    }
    return names;
  }

  toJSON(): RawFeaturesJSON {
    return {
      kind: 'landform.raw-features',
      format: 1,
      options: {
        bins: this.bins,
        upperQuantile: this.upperQuantile,
        signalLength: this.signalLength,
        ...(this.imageSize !== undefined ? { imageSize: this.imageSize } : {}),
      },
      state: structuredClone(this.fitted()),
    };
  }

  static fromJSON(json: unknown): RawFeatures {
    const j = json as Partial<RawFeaturesJSON> | null;
    if (j?.kind !== 'landform.raw-features')
      throw new UserError('not saved raw features (kind tag missing or different)');
    if (j.format !== 1)
      throw new UserError(`saved raw features have format ${String(j.format)}; this landform reads format 1`);
    if (!j.options || !j.state) throw new UserError('saved raw features lack their options or state');
    const r = new RawFeatures(j.options);
    r.state = structuredClone(j.state);
    return r;
  }

  private fitted(): RawFeaturesState {
    if (!this.state) throw new Error('RawFeatures: call fit() before transform()');
    return this.state;
  }
}

function identity(n: number): Int32Array {
  const a = new Int32Array(n);
  for (let i = 0; i < n; i++) a[i] = i;
  return a;
}

/** Sorted pairwise distances of a sample; they depend on the sample alone, so they are computed once. */
const distanceCache = new WeakMap<object, Float64Array>();

export function sortedDistances(s: Sample): Float64Array {
  const cached = distanceCache.get(s);
  if (cached) return cached;
  let out: Float64Array;
  if (s.kind === 'points') {
    const n = s.count;
    const d = s.dim;
    out = new Float64Array((n * (n - 1)) / 2);
    let k = 0;
    // Invariant: out[0..k) holds the distances of pairs (i', j') with i' < i, or i' = i and j' < j.
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        let ss = 0;
        for (let c = 0; c < d; c++) {
          const diff = s.coords[i * d + c] - s.coords[j * d + c];
          ss += diff * diff;
        }
        out[k++] = Math.sqrt(ss);
      }
    }
  } else if (s.kind === 'distances') {
    const n = s.size;
    out = new Float64Array((n * (n - 1)) / 2);
    let k = 0;
    // Invariant: out[0..k) holds the entries above the diagonal of rows before i, and of row i before j.
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) out[k++] = s.matrix[i * n + j];
  } else {
    throw new Error(`sortedDistances: ${s.kind} samples have no distances`);
  }
  out.sort();
  distanceCache.set(s, out);
  return out;
}

/** Fractions of `values` in `bins` equal bins of [0, upper]; values beyond fall into the last bin. */
export function histogram(values: Float64Array, upper: number, bins: number, out: Float64Array): void {
  out.fill(0, 0, bins);
  if (values.length === 0) return;
  const scale = bins / upper;
  // Invariant: out[b] counts the values seen so far whose bin is b.
  for (let i = 0; i < values.length; i++) {
    let b = Math.floor(values[i] * scale);
    if (b >= bins) b = bins - 1;
    if (b < 0) b = 0;
    out[b]++;
  }
  const inv = 1 / values.length;
  for (let b = 0; b < bins; b++) out[b] *= inv;
}

/** Eigenvalues, largest first, of the covariance of `count` points in `dim` dimensions (cyclic Jacobi). */
export function covarianceEigenvalues(
  coords: Float64Array,
  count: number,
  dim: number,
  out: Float64Array,
): void {
  out.fill(0);
  if (count < 2) return;
  const mean = new Float64Array(dim);
  for (let i = 0; i < count; i++) for (let c = 0; c < dim; c++) mean[c] += coords[i * dim + c];
  for (let c = 0; c < dim; c++) mean[c] /= count;
  const a = new Float64Array(dim * dim);
  for (let i = 0; i < count; i++) {
    for (let p = 0; p < dim; p++) {
      const dp = coords[i * dim + p] - mean[p];
      for (let q = p; q < dim; q++) a[p * dim + q] += dp * (coords[i * dim + q] - mean[q]);
    }
  }
  for (let p = 0; p < dim; p++) {
    for (let q = p; q < dim; q++) {
      a[p * dim + q] /= count - 1;
      a[q * dim + p] = a[p * dim + q];
    }
  }
  const values = jacobiEigenvalues(a, dim);
  values.sort((x, y) => y - x);
  out.set(values.subarray(0, Math.min(dim, out.length)));
}

/** Eigenvalues of a symmetric matrix by cyclic Jacobi rotations (Golub & Van Loan, "Matrix Computations", §8.5). */
export function jacobiEigenvalues(matrix: Float64Array, n: number): Float64Array {
  const a = Float64Array.from(matrix);
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p * n + q] ** 2;
    if (off < 1e-30) break;
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p * n + q];
        if (Math.abs(apq) < 1e-300) continue;
        const theta = (a[q * n + q] - a[p * n + p]) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        // Invariant: rows and columns other than p and q are rotated in place, keeping `a` symmetric.
        for (let k = 0; k < n; k++) {
          const akp = a[k * n + p];
          const akq = a[k * n + q];
          a[k * n + p] = c * akp - s * akq;
          a[k * n + q] = s * akp + c * akq;
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p * n + k];
          const aqk = a[q * n + k];
          a[p * n + k] = c * apk - s * aqk;
          a[q * n + k] = s * apk + c * aqk;
        }
      }
    }
  }
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = a[i * n + i];
  return out;
}

/** Linear interpolation of `values` at `out.length` evenly spaced positions from the first to the last. */
export function resample(values: Float64Array, out: Float64Array): void {
  const n = values.length;
  if (n === 0) {
    out.fill(0);
    return;
  }
  if (n === 1) {
    out.fill(values[0]);
    return;
  }
  const m = out.length;
  for (let i = 0; i < m; i++) {
    const x = (i * (n - 1)) / (m - 1);
    const lo = Math.min(Math.floor(x), n - 2);
    const f = x - lo;
    out[i] = values[lo] * (1 - f) + values[lo + 1] * f;
  }
}

/**
 * Box-average downsampling of a row-major image or volume of `shape` to `target` (same number of axes).
 * Each output cell averages the input cells whose index falls in its box; a box with none takes the nearest.
 */
export function downsample(values: Float64Array, shape: number[], target: number[], out: Float64Array): void {
  if (shape.length !== target.length)
    throw new UserError(`image has ${shape.length} axes; the features were fitted on ${target.length}`);
  const [h, w, d] = shape.length === 2 ? [shape[0], shape[1], 1] : [shape[1], shape[2], shape[0]];
  const [th, tw, td] = target.length === 2 ? [target[0], target[1], 1] : [target[1], target[2], target[0]];
  const sums = new Float64Array(td * th * tw);
  const counts = new Int32Array(td * th * tw);
  for (let z = 0; z < d; z++) {
    const oz = Math.min(td - 1, Math.floor((z * td) / d));
    for (let y = 0; y < h; y++) {
      const oy = Math.min(th - 1, Math.floor((y * th) / h));
      for (let x = 0; x < w; x++) {
        const ox = Math.min(tw - 1, Math.floor((x * tw) / w));
        const o = (oz * th + oy) * tw + ox;
        sums[o] += values[(z * h + y) * w + x];
        counts[o]++;
      }
    }
  }
  for (let oz = 0; oz < td; oz++) {
    for (let oy = 0; oy < th; oy++) {
      for (let ox = 0; ox < tw; ox++) {
        const o = (oz * th + oy) * tw + ox;
        if (counts[o] > 0) out[o] = sums[o] / counts[o];
        else {
          const z = Math.min(d - 1, Math.floor(((oz + 0.5) * d) / td));
          const y = Math.min(h - 1, Math.floor(((oy + 0.5) * h) / th));
          const x = Math.min(w - 1, Math.floor(((ox + 0.5) * w) / tw));
          out[o] = values[(z * h + y) * w + x];
        }
      }
    }
  }
}
