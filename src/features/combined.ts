import type { DiagramSet } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { concatColumns, type Matrix } from '../core/matrix.js';
import type { Sample, SampleKind } from '../core/sample.js';
import { type BettiCurveJSON, type BettiCurveOptions, BettiCurveVectorizer } from './betti-curve.js';
import {
  LandscapeVectorizer,
  type LandscapeVectorizerJSON,
  type LandscapeVectorizerOptions,
} from './landscape-vectorizer.js';
import {
  type PersistenceImageJSON,
  type PersistenceImageOptions,
  PersistenceImageVectorizer,
} from './persistence-image.js';
import {
  PersistenceStatistics,
  type PersistenceStatisticsJSON,
  type PersistenceStatisticsOptions,
} from './persistence-statistics.js';
import { RawFeatures, type RawFeaturesJSON, type RawFeaturesOptions } from './raw-features.js';

/**
 * The feature sets compared in a study: `landscape` (the landscape vectoriser), `raw` (the raw-feature
 * baseline of the sample kind), `combined` (landscape columns, then raw columns), and three other
 * vectorisations of the diagrams for comparison: `betti` (Betti curves), `stats` (persistence statistics with
 * persistent entropy) and `pimage` (persistence images). `FeatureExtractor` fits and transforms any of them
 * with one interface, so the evaluation loop treats them alike.
 */
export type FeatureSetName = 'landscape' | 'raw' | 'combined' | 'betti' | 'stats' | 'pimage';

export const FEATURE_SET_NAMES: readonly FeatureSetName[] = [
  'landscape',
  'raw',
  'combined',
  'betti',
  'stats',
  'pimage',
];

/** The sets built from the diagrams alone (a diagrams dataset allows these). */
export const DIAGRAM_FEATURE_SETS: readonly FeatureSetName[] = ['landscape', 'betti', 'stats', 'pimage'];

/** What the extractors read: the samples, their diagrams (for landscape features) and table column names. */
export interface FeatureData {
  samples: readonly Sample[];
  /** Diagrams, one set per sample in the same order; required by `landscape` and `combined`. */
  diagrams?: readonly DiagramSet[];
  /** Column names of a table dataset. */
  columns?: readonly string[];
}

/**
 * The feature sets a study compares by default for a sample kind: tables only `raw`, diagrams only
 * `landscape`. `betti`, `stats` and `pimage` are asked for by name (`--feature-sets`), so a default study keeps
 * its cost and its rows (see DEVELOPERS.md, "How to add a feature type").
 */
export function featureSetsFor(kind: SampleKind): FeatureSetName[] {
  if (kind === 'table') return ['raw'];
  if (kind === 'diagrams') return ['landscape'];
  return ['landscape', 'raw', 'combined'];
}

/** Throws the user's error when `set` cannot be built from samples of `kind`. */
export function checkFeatureSet(set: FeatureSetName, kind: SampleKind, option = '--feature-sets'): void {
  if (kind === 'table' && set !== 'raw') {
    throw new UserError(
      `${option} ${set} needs diagrams, but a table dataset has only its columns; use ${option} raw`,
    );
  }
  if (kind === 'diagrams' && !DIAGRAM_FEATURE_SETS.includes(set)) {
    throw new UserError(
      `${option} ${set} needs the original samples, but a diagrams dataset has none; use ${option} ${DIAGRAM_FEATURE_SETS.join(', ')}`,
    );
  }
}

export function usesLandscape(set: FeatureSetName): boolean {
  return set === 'landscape' || set === 'combined';
}

/** Whether a set is computed from the samples' diagrams (every set but `raw`). */
export function needsDiagrams(set: FeatureSetName): boolean {
  return set !== 'raw';
}

export interface FeatureExtractorOptions {
  landscape?: LandscapeVectorizerOptions;
  raw?: RawFeaturesOptions;
  /**
   * Options of the other diagram vectorisers. Degrees, the essential-class policy and the upper quantile
   * not given here are those of `landscape` (so `--degrees` and `--infinite` apply to every diagram set);
   * Betti curves also take the landscape's grid size and explicit range.
   */
  betti?: BettiCurveOptions;
  stats?: PersistenceStatisticsOptions;
  pimage?: PersistenceImageOptions;
}

export interface FeatureExtractorJSON {
  kind: 'landform.features';
  format: 1;
  set: FeatureSetName;
  landscape?: LandscapeVectorizerJSON;
  raw?: RawFeaturesJSON;
  /** Present for the set of the same name (format 1 files of the first three sets have none of them). */
  betti?: BettiCurveJSON;
  stats?: PersistenceStatisticsJSON;
  pimage?: PersistenceImageJSON;
}

/** The one diagram vectoriser of a `betti`, `stats` or `pimage` set. */
export type DiagramVectorizer = BettiCurveVectorizer | PersistenceStatistics | PersistenceImageVectorizer;

export class FeatureExtractor {
  readonly set: FeatureSetName;
  readonly landscape?: LandscapeVectorizer;
  readonly raw?: RawFeatures;
  /** The vectoriser of a `betti`, `stats` or `pimage` set. */
  readonly diagram?: DiagramVectorizer;

  constructor(set: FeatureSetName, options: FeatureExtractorOptions = {}) {
    this.set = set;
    if (usesLandscape(set)) this.landscape = new LandscapeVectorizer(options.landscape);
    if (set === 'raw' || set === 'combined') this.raw = new RawFeatures(options.raw);
    const shared = sharedDiagramOptions(options.landscape);
    if (set === 'betti') {
      const l = options.landscape;
      this.diagram = new BettiCurveVectorizer({
        ...shared,
        ...(l?.gridSize !== undefined ? { gridSize: l.gridSize } : {}),
        ...(l?.range ? { range: l.range } : {}),
        ...options.betti,
      });
    }
    if (set === 'stats') {
      const { upperQuantile: _unused, ...rest } = shared;
      this.diagram = new PersistenceStatistics({ ...rest, ...options.stats });
    }
    if (set === 'pimage') this.diagram = new PersistenceImageVectorizer({ ...shared, ...options.pimage });
  }

  /** A copy with different landscape options (the inner cross-validation's depth K and grid G). */
  withLandscape(options: LandscapeVectorizerOptions): FeatureExtractor {
    return new FeatureExtractor(this.set, {
      ...(this.landscape ? { landscape: this.landscape.with(options).options() } : {}),
      ...(this.raw ? { raw: this.rawOptions() } : {}),
      ...this.diagramOptions(),
    });
  }

  /** Learns everything from `data` at `indices` only. */
  fit(data: FeatureData, indices?: ArrayLike<number>): this {
    if (this.landscape) this.landscape.fit(requireDiagrams(data), indices);
    if (this.raw) this.raw.fit(data.samples, indices, data.columns);
    if (this.diagram) this.diagram.fit(requireDiagrams(data), indices);
    return this;
  }

  transform(data: FeatureData, indices?: ArrayLike<number>): Matrix {
    const parts: Matrix[] = [];
    if (this.landscape) parts.push(this.landscape.transform(requireDiagrams(data), indices));
    if (this.raw) parts.push(this.raw.transform(data.samples, indices));
    if (this.diagram) parts.push(this.diagram.transform(requireDiagrams(data), indices));
    return parts.length === 1 ? parts[0] : concatColumns(parts[0], parts[1]);
  }

  featureNames(): string[] {
    return [
      ...(this.landscape ? this.landscape.featureNames() : []),
      ...(this.raw ? this.raw.featureNames() : []),
      ...(this.diagram ? this.diagram.featureNames() : []),
    ];
  }

  /** The options of this set's vectorisers as metrics.json records them (what no inner CV chooses). */
  describeOptions(): Record<string, unknown> {
    return this.diagram ? { [this.set]: this.diagram.options() } : {};
  }

  toJSON(): FeatureExtractorJSON {
    return {
      kind: 'landform.features',
      format: 1,
      set: this.set,
      ...(this.landscape ? { landscape: this.landscape.toJSON() } : {}),
      ...(this.raw ? { raw: this.raw.toJSON() } : {}),
      ...(this.diagram ? { [this.set]: this.diagram.toJSON() } : {}),
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
    if (j.set === 'raw' || j.set === 'combined') {
      if (!j.raw) throw new UserError('saved features lack their raw features');
      mutable.raw = RawFeatures.fromJSON(j.raw);
    }
    if (j.set === 'betti' || j.set === 'stats' || j.set === 'pimage') {
      const saved = j[j.set];
      if (!saved) throw new UserError(`saved features lack their ${j.set} vectoriser`);
      (e as { diagram?: DiagramVectorizer }).diagram =
        j.set === 'betti'
          ? BettiCurveVectorizer.fromJSON(saved)
          : j.set === 'stats'
            ? PersistenceStatistics.fromJSON(saved)
            : PersistenceImageVectorizer.fromJSON(saved);
    }
    return e;
  }

  private diagramOptions(): Pick<FeatureExtractorOptions, 'betti' | 'stats' | 'pimage'> {
    const d = this.diagram;
    if (d instanceof BettiCurveVectorizer) return { betti: d.options() };
    if (d instanceof PersistenceStatistics) return { stats: d.options() };
    if (d instanceof PersistenceImageVectorizer) return { pimage: d.options() };
    return {};
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

/** What every diagram vectoriser takes from the landscape options when not given its own. */
function sharedDiagramOptions(
  l: LandscapeVectorizerOptions | undefined,
): Pick<LandscapeVectorizerOptions, 'degrees' | 'infinite' | 'upperQuantile'> {
  return {
    ...(l?.degrees ? { degrees: l.degrees } : {}),
    ...(l?.infinite ? { infinite: l.infinite } : {}),
    ...(l?.upperQuantile !== undefined ? { upperQuantile: l.upperQuantile } : {}),
  };
}

function requireDiagrams(data: FeatureData): readonly DiagramSet[] {
  if (!data.diagrams) throw new Error('FeatureExtractor: diagram features need diagrams');
  if (data.diagrams.length !== data.samples.length && data.samples.length > 0) {
    throw new Error(
      `FeatureExtractor: ${data.diagrams.length} diagram sets for ${data.samples.length} samples`,
    );
  }
  return data.diagrams;
}
