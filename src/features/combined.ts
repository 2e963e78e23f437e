import { UserError } from '../core/errors.js';
import type { DiagramSet } from '../homology/diagram.js';
import type { Sample, SampleKind } from '../io/dataset.js';
import { concatColumns, type Matrix } from '../learn/matrix.js';
import {
  LandscapeVectorizer,
  type LandscapeVectorizerJSON,
  type LandscapeVectorizerOptions,
} from './landscape-vectorizer.js';
import { RawFeatures, type RawFeaturesJSON, type RawFeaturesOptions } from './raw-features.js';

/**
 * The three feature sets compared in a study: `landscape` (the landscape vectoriser), `raw` (the raw-feature
 * baseline of the sample kind) and `combined` (landscape columns, then raw columns). `FeatureExtractor` fits
 * and transforms any of them with one interface, so the evaluation loop treats them alike.
 */
export type FeatureSetName = 'landscape' | 'raw' | 'combined';

export const FEATURE_SET_NAMES: readonly FeatureSetName[] = ['landscape', 'raw', 'combined'];

/** What the extractors read: the samples, their diagrams (for landscape features) and table column names. */
export interface FeatureData {
  samples: readonly Sample[];
  /** Diagrams, one set per sample in the same order; required by `landscape` and `combined`. */
  diagrams?: readonly DiagramSet[];
  /** Column names of a table dataset. */
  columns?: readonly string[];
}

/** The feature sets that make sense for a sample kind: tables only `raw`, diagrams only `landscape`. */
export function featureSetsFor(kind: SampleKind): FeatureSetName[] {
  if (kind === 'table') return ['raw'];
  if (kind === 'diagrams') return ['landscape'];
  return ['landscape', 'raw', 'combined'];
}

/** Throws the user's error when `set` cannot be built from samples of `kind`. */
export function checkFeatureSet(set: FeatureSetName, kind: SampleKind): void {
  if (kind === 'table' && set !== 'raw') {
    throw new UserError(
      `--features ${set} needs diagrams, but a table dataset has only its columns; use --features raw`,
    );
  }
  if (kind === 'diagrams' && set !== 'landscape') {
    throw new UserError(
      `--features ${set} needs the original samples, but a diagrams dataset has none; use --features landscape`,
    );
  }
}

export function usesLandscape(set: FeatureSetName): boolean {
  return set === 'landscape' || set === 'combined';
}

export interface FeatureExtractorOptions {
  landscape?: LandscapeVectorizerOptions;
  raw?: RawFeaturesOptions;
}

export interface FeatureExtractorJSON {
  kind: 'landform.features';
  format: 1;
  set: FeatureSetName;
  landscape?: LandscapeVectorizerJSON;
  raw?: RawFeaturesJSON;
}

export class FeatureExtractor {
  readonly set: FeatureSetName;
  readonly landscape?: LandscapeVectorizer;
  readonly raw?: RawFeatures;

  constructor(set: FeatureSetName, options: FeatureExtractorOptions = {}) {
    this.set = set;
    if (usesLandscape(set)) this.landscape = new LandscapeVectorizer(options.landscape);
    if (set === 'raw' || set === 'combined') this.raw = new RawFeatures(options.raw);
  }

  /** A copy with different landscape options (the inner cross-validation's depth K and grid G). */
  withLandscape(options: LandscapeVectorizerOptions): FeatureExtractor {
    return new FeatureExtractor(this.set, {
      ...(this.landscape ? { landscape: this.landscape.with(options).options() } : {}),
      ...(this.raw ? { raw: this.rawOptions() } : {}),
    });
  }

  /** Learns everything from `data` at `indices` only. */
  fit(data: FeatureData, indices?: ArrayLike<number>): this {
    if (this.landscape) this.landscape.fit(requireDiagrams(data), indices);
    if (this.raw) this.raw.fit(data.samples, indices, data.columns);
    return this;
  }

  transform(data: FeatureData, indices?: ArrayLike<number>): Matrix {
    const parts: Matrix[] = [];
    if (this.landscape) parts.push(this.landscape.transform(requireDiagrams(data), indices));
    if (this.raw) parts.push(this.raw.transform(data.samples, indices));
    return parts.length === 1 ? parts[0] : concatColumns(parts[0], parts[1]);
  }

  featureNames(): string[] {
    return [
      ...(this.landscape ? this.landscape.featureNames() : []),
      ...(this.raw ? this.raw.featureNames() : []),
    ];
  }

  toJSON(): FeatureExtractorJSON {
    return {
      kind: 'landform.features',
      format: 1,
      set: this.set,
      ...(this.landscape ? { landscape: this.landscape.toJSON() } : {}),
      ...(this.raw ? { raw: this.raw.toJSON() } : {}),
    };
  }

  static fromJSON(json: unknown): FeatureExtractor {
    const j = json as Partial<FeatureExtractorJSON> | null;
    if (j?.kind !== 'landform.features')
      throw new UserError('not saved features (kind tag missing or different)');
    if (j.format !== 1)
      throw new UserError(`saved features have format ${String(j.format)}; this landform reads format 1`);
    if (!j.set || !(FEATURE_SET_NAMES as readonly string[]).includes(j.set))
      throw new UserError('saved features name no known feature set');
    const e = new FeatureExtractor(j.set);
    const mutable = e as { landscape?: LandscapeVectorizer; raw?: RawFeatures };
    if (usesLandscape(j.set)) {
      if (!j.landscape) throw new UserError('saved features lack their landscape vectoriser');
      mutable.landscape = LandscapeVectorizer.fromJSON(j.landscape);
    }
    if (j.set !== 'landscape') {
      if (!j.raw) throw new UserError('saved features lack their raw features');
      mutable.raw = RawFeatures.fromJSON(j.raw);
    }
    return e;
  }

  private rawOptions(): RawFeaturesOptions {
    const r = this.raw!;
    return {
      bins: r.bins,
      upperQuantile: r.upperQuantile,
      signalLength: r.signalLength,
      ...(r.imageSize !== undefined ? { imageSize: r.imageSize } : {}),
    };
  }
}

function requireDiagrams(data: FeatureData): readonly DiagramSet[] {
  if (!data.diagrams) throw new Error('FeatureExtractor: landscape features need diagrams');
  if (data.diagrams.length !== data.samples.length && data.samples.length > 0) {
    throw new Error(
      `FeatureExtractor: ${data.diagrams.length} diagram sets for ${data.samples.length} samples`,
    );
  }
  return data.diagrams;
}
