import {
  type Channel,
  channelName,
  DEFAULT_INFINITE_POLICY,
  type DiagramSet,
  type InfinitePolicy,
} from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import {
  allIndices,
  channelValues,
  checkChannelOptions,
  checkSaved,
  copyChannelRanges,
  decimalsFor,
  finiteChannel,
  trainingChannels,
} from './diagram-channels.js';
import { quantileSorted } from './landscape-vectorizer.js';

/**
 * Persistence images (Adams, Emerson, Kirby, Neville, Peterson, Shipman, Chepushtanova, Hanson, Motta,
 * Ziegelmeier, "Persistence images: a stable vector representation of persistent homology", JMLR 18, 2017).
 * Each finite pair (b, d) becomes the point u = (b, p) with p = d − b; the persistence surface is
 *   ρ(z) = Σ_u w(u) · φ_u(z),   φ_u the 2-D Gaussian of mean u and standard deviation σ on both axes,
 *   w(u) = p / P for p < P, 1 for p ≥ P (their piecewise-linear weight, P = the largest persistence),
 * and the image is ρ integrated over each of R × R pixels of a rectangle [b0, b1] × [0, P]. A Gaussian's
 * pixel integral is a product of two normal-distribution differences, so the values are exact up to the
 * error function's approximation (fractional error < 1.2e-7).
 *
 * Learned per channel in `fit`, from the training pairs only (the landscape vectoriser's rule on each axis):
 *   birth axis       b0 = the smallest birth, b1 = the `upperQuantile` quantile of the births
 *                    (when b1 = b0, as for H0 of a Rips filtration where every birth is 0, the axis is
 *                    centred on b0 with the persistence axis's width),
 *   persistence axis [0, P], P = the `upperQuantile` quantile of the persistences (also the weight's P),
 *   σ = `sigma` if given, else `relativeSigma` × P.
 * Essential classes follow `infinite` (dropped by default).
 *
 * Feature layout: channel-major, then persistence row (low to high), then birth column; names read
 * `H1/pimage/p=0.0250/b=0.3750` (pixel centres).
 */
export interface PersistenceImageOptions {
  /** Homology degrees to use. Default [0, 1]. */
  degrees?: number[];
  /** Pixels per side R. Default 20. */
  resolution?: number;
  /** Gaussian standard deviation, in the diagram's units; default: relativeSigma × the persistence range. */
  sigma?: number;
  /** σ as a fraction of each channel's learned persistence range when `sigma` is not given. Default 0.05. */
  relativeSigma?: number;
  /** Essential classes: 'drop' (default) or clip to a value. */
  infinite?: InfinitePolicy;
  /** Quantile of the training births / persistences that ends each axis. Default 0.99. */
  upperQuantile?: number;
}

export const DEFAULT_PERSISTENCE_IMAGE_OPTIONS = {
  degrees: [0, 1],
  resolution: 20,
  relativeSigma: 0.05,
  infinite: DEFAULT_INFINITE_POLICY,
  upperQuantile: 0.99,
} as const;

/** What `fit` learns for one channel: the image's rectangle and the kernel width. */
export interface ImageFrame {
  birthStart: number;
  birthStop: number;
  /** The persistence axis is [0, persistenceStop]; also the weight's P. */
  persistenceStop: number;
  sigma: number;
}

export interface PersistenceImageJSON {
  kind: 'landform.persistence-images';
  format: 1;
  options: {
    degrees: number[];
    resolution: number;
    sigma?: number;
    relativeSigma: number;
    infinite: InfinitePolicy;
    upperQuantile: number;
  };
  state: { frames: Array<{ channel: Channel; frame: ImageFrame }> };
}

export class PersistenceImageVectorizer {
  readonly degrees: number[];
  readonly resolution: number;
  readonly sigma?: number;
  readonly relativeSigma: number;
  readonly infinite: InfinitePolicy;
  readonly upperQuantile: number;
  state?: { frames: Array<{ channel: Channel; frame: ImageFrame }> };

  constructor(options: PersistenceImageOptions = {}) {
    const o = { ...DEFAULT_PERSISTENCE_IMAGE_OPTIONS, ...options };
    this.degrees = checkChannelOptions('persistence images', o.degrees, o.upperQuantile);
    this.resolution = o.resolution;
    if (o.sigma !== undefined) this.sigma = o.sigma;
    this.relativeSigma = o.relativeSigma;
    this.infinite = o.infinite;
    this.upperQuantile = o.upperQuantile;
    if (!Number.isInteger(this.resolution) || this.resolution < 1)
      throw new UserError(`persistence image resolution ${this.resolution} must be a whole number ≥ 1`);
    if (this.sigma !== undefined && !(this.sigma > 0))
      throw new UserError(`persistence image sigma ${this.sigma} must be > 0`);
    if (!(this.relativeSigma > 0))
      throw new UserError(`persistence image relative sigma ${this.relativeSigma} must be > 0`);
  }

  options(): PersistenceImageJSON['options'] {
    return {
      degrees: [...this.degrees],
      resolution: this.resolution,
      ...(this.sigma !== undefined ? { sigma: this.sigma } : {}),
      relativeSigma: this.relativeSigma,
      infinite: this.infinite,
      upperQuantile: this.upperQuantile,
    };
  }

  with(options: PersistenceImageOptions): PersistenceImageVectorizer {
    return new PersistenceImageVectorizer({ ...this.options(), ...options });
  }

  /** Learns the channels and each channel's frame from `sets[indices]` only. */
  fit(sets: readonly DiagramSet[], indices?: ArrayLike<number>): this {
    const chosen = indices ?? allIndices(sets.length);
    const channels = trainingChannels(sets, chosen, this.degrees);
    this.state = {
      frames: channels.map((channel) => ({ channel, frame: this.learnFrame(sets, chosen, channel) })),
    };
    return this;
  }

  transform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    const { frames } = this.fitted();
    const chosen = indices ?? allIndices(sets.length);
    const R = this.resolution;
    const block = R * R;
    const cols = frames.length * block;
    const data = new Float64Array(chosen.length * cols);
    const scratch = { bx: new Float64Array(R), py: new Float64Array(R) };
    for (let r = 0; r < chosen.length; r++) {
      for (let c = 0; c < frames.length; c++) {
        const d = finiteChannel(sets[chosen[r]], frames[c].channel, this.infinite);
        persistenceImageInto(d.births, d.deaths, frames[c].frame, R, data, r * cols + c * block, scratch);
      }
    }
    return { rows: chosen.length, cols, data };
  }

  fitTransform(sets: readonly DiagramSet[], indices?: ArrayLike<number>): Matrix {
    return this.fit(sets, indices).transform(sets, indices);
  }

  featureNames(): string[] {
    const R = this.resolution;
    const names: string[] = [];
    for (const { channel, frame } of this.fitted().frames) {
      const bStep = (frame.birthStop - frame.birthStart) / R;
      const pStep = frame.persistenceStop / R;
      const bDec = decimalsFor(bStep, frame.birthStart, frame.birthStop);
      const pDec = decimalsFor(pStep, 0, frame.persistenceStop);
      const prefix = channelName(channel);
      for (let i = 0; i < R; i++) {
        const p = ((i + 0.5) * pStep).toFixed(pDec);
        for (let j = 0; j < R; j++)
          names.push(`${prefix}/pimage/p=${p}/b=${(frame.birthStart + (j + 0.5) * bStep).toFixed(bDec)}`);
      }
    }
    return names;
  }

  toJSON(): PersistenceImageJSON {
    return {
      kind: 'landform.persistence-images',
      format: 1,
      options: this.options(),
      state: {
        frames: copyChannelRanges(this.fitted().frames, 'frame'),
      },
    };
  }

  static fromJSON(json: unknown): PersistenceImageVectorizer {
    const j = checkSaved(
      json,
      'landform.persistence-images',
      'persistence image vectoriser',
    ) as unknown as PersistenceImageJSON;
    const v = new PersistenceImageVectorizer(j.options);
    v.state = {
      frames: copyChannelRanges(j.state.frames, 'frame'),
    };
    return v;
  }

  private learnFrame(sets: readonly DiagramSet[], indices: ArrayLike<number>, channel: Channel): ImageFrame {
    const births = channelValues(sets, indices, channel, this.infinite, 'birth');
    const lifetimes = channelValues(sets, indices, channel, this.infinite, 'persistence');
    let persistenceStop = 1;
    let birthStart = 0;
    let birthStop = 1;
    if (births.length > 0) {
      persistenceStop = quantileSorted(lifetimes, this.upperQuantile);
      if (!(persistenceStop > 0)) persistenceStop = lifetimes[lifetimes.length - 1];
      if (!(persistenceStop > 0)) persistenceStop = 1;
      birthStart = births[0];
      birthStop = quantileSorted(births, this.upperQuantile);
      if (!(birthStop > birthStart)) birthStop = births[births.length - 1];
      if (!(birthStop > birthStart)) {
        birthStart -= persistenceStop / 2;
        birthStop = birthStart + persistenceStop;
      }
    }
    return {
      birthStart,
      birthStop,
      persistenceStop,
      sigma: this.sigma ?? this.relativeSigma * persistenceStop,
    };
  }

  private fitted(): { frames: Array<{ channel: Channel; frame: ImageFrame }> } {
    if (!this.state) throw new Error('PersistenceImageVectorizer: call fit() before transform()');
    return this.state;
  }
}

/**
 * Adds the persistence image of one diagram into `out` at `offset` (R × R values, persistence-row-major).
 * Pixel (i, j) gets Σ_u w(u) · [Φ((b_{j+1} − b)/σ) − Φ((b_j − b)/σ)] · [Φ((p_{i+1} − p)/σ) − Φ((p_i − p)/σ)].
 */
export function persistenceImageInto(
  births: Float64Array,
  deaths: Float64Array,
  frame: ImageFrame,
  R: number,
  out: Float64Array,
  offset: number,
  scratch: { bx: Float64Array; py: Float64Array } = { bx: new Float64Array(R), py: new Float64Array(R) },
): void {
  const { birthStart, birthStop, persistenceStop, sigma } = frame;
  const bStep = (birthStop - birthStart) / R;
  const pStep = persistenceStop / R;
  const { bx, py } = scratch;
  for (let k = 0; k < births.length; k++) {
    const b = births[k];
    const p = deaths[k] - b;
    const w = p >= persistenceStop ? 1 : p > 0 ? p / persistenceStop : 0;
    if (w === 0) continue;
    // bx[j], py[i]: the normal distribution's mass in pixel column j and row i.
    let previous = normalCdf((birthStart - b) / sigma);
    for (let j = 0; j < R; j++) {
      const next = normalCdf((birthStart + (j + 1) * bStep - b) / sigma);
      bx[j] = next - previous;
      previous = next;
    }
    previous = normalCdf(-p / sigma);
    for (let i = 0; i < R; i++) {
      const next = normalCdf(((i + 1) * pStep - p) / sigma);
      py[i] = w * (next - previous);
      previous = next;
    }
    for (let i = 0; i < R; i++) {
      const row = offset + i * R;
      const v = py[i];
      if (v === 0) continue;
      for (let j = 0; j < R; j++) out[row + j] += v * bx[j];
    }
  }
}

/** Φ(x), the standard normal distribution function, through erfc. */
export function normalCdf(x: number): number {
  return 0.5 * erfc(-x / Math.SQRT2);
}

/**
 * The complementary error function, fractional error < 1.2e-7 everywhere (Chebyshev fit of Press, Teukolsky,
 * Vetterling, Flannery, "Numerical Recipes in C", 2nd ed., 1992, section 6.2, `erfcc`).
 */
export function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t *
          (1.00002368 +
            t *
              (0.37409196 +
                t *
                  (0.09678418 +
                    t *
                      (-0.18628806 +
                        t *
                          (0.27886807 +
                            t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}
