import type { Matrix } from '../core/matrix.js';
import type { ChartSpec } from './charts.js';
import { classColour } from './charts.js';
import { INK } from './palette.js';

/**
 * Sample maps: every sample as a point in the plane of the first two principal components of a feature set
 * (standardised columns, then PCA on the sample covariance — the projection the pca-svm model starts from),
 * coloured by class. Scaler and PCA are fitted on all samples: the map is a picture of the data, not a model,
 * and says nothing about held-out accuracy. The learn stage's StandardScaler and Pca do the work (loaded
 * lazily, with ml-pca behind them).
 */
export interface SampleMap {
  /** The feature set drawn ('landscape', 'raw', …). */
  features: string;
  /** How the features were made, for the caption (e.g. 'depth 6, grid 20'). */
  made?: string;
  /** Columns of the feature matrix. */
  columns: number;
  /** Share of the standardised variance of PC1 and PC2 (0 when there is no second component). */
  explained: [number, number];
  points: ReadonlyArray<{ sample: string; label: string; pc1: number; pc2: number }>;
}

/**
 * Scores of every row on the first two principal components of the standardised columns, and each one's
 * share of the total variance. A matrix with one useful direction gets zeros as its second scores.
 */
export async function principalPlane(x: Matrix): Promise<{ scores: Matrix; explained: [number, number] }> {
  const [{ StandardScaler }, { Pca }] = await Promise.all([
    import('../learn/scaler.js'),
    import('../learn/pca.js'),
  ]);
  const standardised = new StandardScaler().fitTransform(x);
  const pca = new Pca({ components: 2 }).fit(standardised);
  const projected = pca.transform(standardised);
  const kept = pca.explainedVariance();
  const scores = new Float64Array(x.rows * 2);
  for (let i = 0; i < x.rows; i++)
    for (let c = 0; c < Math.min(2, projected.cols); c++)
      scores[i * 2 + c] = projected.data[i * projected.cols + c];
  return { scores: { rows: x.rows, cols: 2, data: scores }, explained: [kept[0] ?? 0, kept[1] ?? 0] };
}

/** The sample map of a feature matrix whose rows are `samples` (in order). */
export async function sampleMap(
  x: Matrix,
  samples: ReadonlyArray<{ id: string; label: string }>,
  features: string,
  made?: string,
): Promise<SampleMap> {
  if (x.rows !== samples.length) throw new Error(`sampleMap: ${x.rows} rows for ${samples.length} samples`);
  const { scores, explained } = await principalPlane(x);
  return {
    features,
    ...(made ? { made } : {}),
    columns: x.cols,
    explained,
    points: samples.map((s, i) => ({
      sample: s.id,
      label: s.label,
      pc1: scores.data[2 * i],
      pc2: scores.data[2 * i + 1],
    })),
  };
}

function round(v: number): number {
  return Number.isFinite(v) ? Number(v.toPrecision(5)) : v;
}

/** 'PC1 · 41.3% of variance'. */
export function axisTitle(component: 1 | 2, share: number): string {
  return `PC${component} · ${(100 * share).toFixed(1)}% of variance`;
}

/** A scatter of PC1 against PC2, one colour per class (the page's class colours, in `classes` order). */
export function sampleMapChart(map: SampleMap, classes: readonly string[], title: string): ChartSpec {
  const values = map.points.map((p) => ({
    sample: p.sample,
    class: p.label,
    pc1: round(p.pc1),
    pc2: round(p.pc2),
  }));
  return {
    title: { text: title },
    width: 280,
    height: 240,
    data: { values },
    mark: { type: 'point', filled: true, size: 34, opacity: 0.8, stroke: INK, strokeWidth: 0.3 },
    encoding: {
      x: {
        field: 'pc1',
        type: 'quantitative',
        title: axisTitle(1, map.explained[0]),
        scale: { zero: false },
      },
      y: {
        field: 'pc2',
        type: 'quantitative',
        title: axisTitle(2, map.explained[1]),
        scale: { zero: false },
      },
      color: { field: 'class', type: 'nominal', title: 'class', scale: classColour(classes) },
      shape: { field: 'class', type: 'nominal', title: 'class', scale: { domain: [...classes] } },
    },
  } as ChartSpec;
}
