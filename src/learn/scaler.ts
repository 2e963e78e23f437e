import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';

/** Hyperparameters of the scaler. */
export interface StandardScalerOptions {
  /** Subtract each column's mean. Default true. */
  center?: boolean;
  /** Divide each column by its standard deviation (population form, divisor n). Default true. */
  scale?: boolean;
}

/** What `fit` learned: per column, the value subtracted and the value divided by. */
export interface StandardScalerState {
  mean: Float64Array;
  /** Standard deviation per column; 1 for a constant column, so that it maps to 0 rather than NaN. */
  scale: Float64Array;
}

export interface StandardScalerJSON {
  kind: 'landform.standard-scaler';
  format: 1;
  options: Required<StandardScalerOptions>;
  mean: number[];
  scale: number[];
}

/** Relative spread below which a column counts as constant (common practice, no source). */
const CONSTANT_TOLERANCE = 1e-12;

/**
 * Standardises columns: x' = (x − mean) / sd, with mean and sd learned from the training rows only.
 * A constant column (sd ≤ 1e-12 × (|mean| + 1)) gets scale 1, so it becomes a column of zeros.
 */
export class StandardScaler {
  readonly options: Required<StandardScalerOptions>;
  state: StandardScalerState | undefined;

  constructor(options: StandardScalerOptions = {}) {
    this.options = { center: options.center ?? true, scale: options.scale ?? true };
  }

  fit(x: Matrix): this {
    if (x.rows < 1)
      throw new UserError('cannot standardise features from zero training samples: give at least one');
    const { rows, cols, data } = x;
    const mean = new Float64Array(cols);
    const scale = new Float64Array(cols).fill(1);
    // Invariant: after row i, mean[j] holds the sum of column j over rows 0..i.
    for (let i = 0; i < rows; i++) {
      const base = i * cols;
      for (let j = 0; j < cols; j++) mean[j] += data[base + j];
    }
    for (let j = 0; j < cols; j++) mean[j] /= rows;
    if (this.options.scale) {
      const sq = new Float64Array(cols);
      // Invariant: after row i, sq[j] holds the sum of squared deviations of column j over rows 0..i.
      for (let i = 0; i < rows; i++) {
        const base = i * cols;
        for (let j = 0; j < cols; j++) {
          const d = data[base + j] - mean[j];
          sq[j] += d * d;
        }
      }
      for (let j = 0; j < cols; j++) {
        const sd = Math.sqrt(sq[j] / rows);
        scale[j] = sd > CONSTANT_TOLERANCE * (Math.abs(mean[j]) + 1) ? sd : 1;
      }
    }
    if (!this.options.center) mean.fill(0);
    this.state = { mean, scale };
    return this;
  }

  transform(x: Matrix): Matrix {
    const state = this.fitted();
    if (x.cols !== state.mean.length) {
      throw new UserError(
        `the scaler was fitted on ${state.mean.length} features but got ${x.cols}: use vectors made the same way as the training vectors`,
      );
    }
    const { rows, cols, data } = x;
    const out = new Float64Array(rows * cols);
    const { mean, scale } = state;
    // Invariant: out holds the standardised values of rows 0..i-1.
    for (let i = 0; i < rows; i++) {
      const base = i * cols;
      for (let j = 0; j < cols; j++) out[base + j] = (data[base + j] - mean[j]) / scale[j];
    }
    return { rows, cols, data: out };
  }

  fitTransform(x: Matrix): Matrix {
    return this.fit(x).transform(x);
  }

  toJSON(): StandardScalerJSON {
    const state = this.fitted();
    return {
      kind: 'landform.standard-scaler',
      format: 1,
      options: { ...this.options },
      mean: Array.from(state.mean),
      scale: Array.from(state.scale),
    };
  }

  static fromJSON(json: unknown): StandardScaler {
    const j = json as Partial<StandardScalerJSON> | null;
    if (j?.kind !== 'landform.standard-scaler')
      throw new UserError(
        'not a saved standard scaler (kind tag missing or different): save the model again with this version',
      );
    if (j.format !== 1)
      throw new UserError(
        `saved standard scaler has format ${String(j.format)}, this version reads format 1: save the model again with this version`,
      );
    if (!Array.isArray(j.mean) || !Array.isArray(j.scale) || j.mean.length !== j.scale.length)
      throw new UserError(
        'saved standard scaler is damaged (mean and scale missing or of different lengths)',
      );
    const scaler = new StandardScaler(j.options);
    scaler.state = { mean: Float64Array.from(j.mean), scale: Float64Array.from(j.scale) };
    return scaler;
  }

  private fitted(): StandardScalerState {
    if (!this.state) throw new Error('StandardScaler: call fit before transform');
    return this.state;
  }
}
