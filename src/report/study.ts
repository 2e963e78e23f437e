import { resolve } from 'node:path';
import { channelName, type DiagramSet, type InfinitePolicy } from '../core/diagram.js';
import type { Matrix } from '../core/matrix.js';
import { classesOf, type Dataset, type SampleKind } from '../core/sample.js';
import { packageRoot, version } from '../core/version.js';
import { FeatureExtractor } from '../features/combined.js';
import {
  type LandscapeVectorizerOptions,
  parseLandscapeFeatureName,
} from '../features/landscape-vectorizer.js';
import type { RawFeaturesOptions } from '../features/raw-features.js';
import type { DiagramOptions } from '../homology/compute.js';
import type { Hyperparameters, ModelName } from '../learn/classifier.js';
import type { EvaluationResult, StudyResult } from '../learn/evaluate.js';
import type { ModelFactory } from '../learn/select.js';
import type { WeightCurve } from './charts.js';
import { contrastDiagrams } from './contrast.js';
import type { DatasetReport, ReportInput } from './html.js';
import {
  combinePairWeights,
  type FeatureLocation,
  groupsByDegreeLayer,
  permutationImportance,
  weightCurves,
} from './importance.js';
import { classMeans, type DegreeMeans } from './means.js';
import type { ContrastTest } from './permutation.js';

/**
 * The study behind the report: given a dataset, its diagrams and an evaluation (src/learn/evaluate.ts), it adds
 * the readable parts — class means with bands, contrasts, discriminative maps, example diagrams, plain-words
 * findings — and shapes everything for `renderReport`. `runDemo` runs the whole study on the shipped datasets.
 */
export interface ReportOptions {
  /** Degrees of the class means, contrasts and maps. Default: the evaluation's landscape degrees. */
  degrees?: number[];
  /** Layers shown and tested. Default 5. */
  depth?: number;
  /** Grid points of the class means and contrasts. Default 100. */
  gridCount?: number;
  /** Band level. Default 0.95. */
  level?: number;
  /** Bootstrap draws of the bands. Default 1000. */
  draws?: number;
  /** Permutations of each contrast. Default 999. */
  permutations?: number;
  /** Shuffles per group and fold of the permutation importance. Default 5. */
  importanceRepeats?: number;
  /** Default 1. */
  seed?: number;
  infinite?: InfinitePolicy;
}

export const DEFAULT_REPORT_OPTIONS = {
  depth: 5,
  gridCount: 100,
  level: 0.95,
  draws: 1000,
  permutations: 999,
  importanceRepeats: 5,
  seed: 1,
} as const;

export interface ReportPieces {
  report: DatasetReport;
  means: DegreeMeans[];
  contrasts: ContrastTest[];
}

/** Facts about the samples for the summary table. */
export function sampleFacts(dataset: Dataset): Array<[string, string]> {
  const range = (values: number[]): string => {
    const lo = Math.min(...values);
    const hi = Math.max(...values);
    return lo === hi ? String(lo) : `${lo}–${hi}`;
  };
  const s = dataset.samples;
  const facts: Array<[string, string]> = [['source', dataset.source]];
  if (s.length === 0) return facts;
  switch (s[0].kind) {
    case 'points':
      facts.push(['points per sample', range(s.map((x) => (x.kind === 'points' ? x.count : 0)))]);
      facts.push(['dimension', range(s.map((x) => (x.kind === 'points' ? x.dim : 0)))]);
      break;
    case 'signal':
      facts.push(['values per signal', range(s.map((x) => (x.kind === 'signal' ? x.values.length : 0)))]);
      break;
    case 'image':
      facts.push([
        'image shape',
        [...new Set(s.map((x) => (x.kind === 'image' ? x.shape.join(' × ') : '')))].join(', '),
      ]);
      break;
    case 'distances':
      facts.push(['matrix size', range(s.map((x) => (x.kind === 'distances' ? x.size : 0)))]);
      break;
    case 'table':
      facts.push(['columns', String(dataset.columns?.length ?? 0)]);
      break;
    case 'diagrams':
      break;
  }
  return facts;
}

function complement(n: number, test: ArrayLike<number>): Int32Array {
  const held = new Uint8Array(n);
  for (let i = 0; i < test.length; i++) held[test[i]] = 1;
  const out: number[] = [];
  for (let i = 0; i < n; i++) if (!held[i]) out.push(i);
  return Int32Array.from(out);
}

function take(m: Matrix, rows: ArrayLike<number>): Matrix {
  const data = new Float64Array(rows.length * m.cols);
  for (let k = 0; k < rows.length; k++)
    data.set(m.data.subarray(rows[k] * m.cols, (rows[k] + 1) * m.cols), k * m.cols);
  return { rows: rows.length, cols: m.cols, data };
}

/** Sample standard deviation of each column (0 for a constant column). */
function columnSd(m: Matrix): Float64Array {
  const mean = new Float64Array(m.cols);
  const sd = new Float64Array(m.cols);
  for (let i = 0; i < m.rows; i++)
    for (let j = 0; j < m.cols; j++) mean[j] += m.data[i * m.cols + j] / m.rows;
  for (let i = 0; i < m.rows; i++)
    for (let j = 0; j < m.cols; j++) sd[j] += (m.data[i * m.cols + j] - mean[j]) ** 2;
  for (let j = 0; j < m.cols; j++) sd[j] = m.rows > 1 ? Math.sqrt(sd[j] / (m.rows - 1)) : 0;
  return sd;
}

/** Linear interpolation of (t, v) at x; 0 outside [t0, tlast]. */
function interpolate(t: ArrayLike<number>, v: ArrayLike<number>, x: number): number {
  const n = t.length;
  if (n === 0 || x < t[0] || x > t[n - 1]) return 0;
  if (n === 1) return v[0];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t[mid] <= x) lo = mid;
    else hi = mid;
  }
  const w = t[hi] === t[lo] ? 0 : (x - t[lo]) / (t[hi] - t[lo]);
  return v[lo] * (1 - w) + v[hi] * w;
}

function best(results: readonly StudyResult[], features: string): StudyResult | undefined {
  let out: StudyResult | undefined;
  for (const r of results)
    if (r.features === features && (!out || r.accuracy.mean > out.accuracy.mean)) out = r;
  return out;
}

function modelPart(chosen: Hyperparameters): Hyperparameters {
  const out: Hyperparameters = {};
  for (const [k, v] of Object.entries(chosen)) if (k !== 'depth' && k !== 'gridSize') out[k] = v;
  return out;
}

/**
 * Discriminative maps from refits on the evaluation's own outer folds (training part only):
 * - weights: a linear pca-svm (C as chosen in that fold when the chosen kernel was linear, else 1) on the
 *   landscape features; its weights carried back onto (degree, layer, t), interpolated onto `axes` and
 *   averaged over folds;
 * - importance: the best landscape model with the fold's chosen hyperparameters, permutation importance
 *   per (degree, layer) on the held-out part, mean ± sd over folds.
 */
export async function discriminativeMaps(
  sets: readonly DiagramSet[],
  samples: Dataset['samples'],
  evaluation: EvaluationResult,
  landscape: LandscapeVectorizerOptions,
  axes: ReadonlyArray<{ degree: number; filtration?: string; t: Float64Array }>,
  options: { repeats: number; seed: number },
): Promise<DatasetReport['maps']> {
  const chosenResult = best(evaluation.results, 'landscape');
  if (!chosenResult) return undefined;
  const { createClassifier } = await import('../learn/models.js');
  const y = evaluation.labels;
  const classCount = evaluation.classes.length;
  const data = { samples, diagrams: sets };
  const sums = new Map<
    string,
    { degree: number; filtration?: string; layer: number; t: Float64Array; sum: Float64Array }
  >();
  let weightFolds = 0;
  let signed = true;
  const importanceByGroup = new Map<string, number[]>();
  for (const fold of chosenResult.folds) {
    const train = complement(y.length, fold.test);
    const depth = Number(fold.chosen.depth ?? landscape.depth ?? 5);
    const gridSize = Number(fold.chosen.gridSize ?? landscape.gridSize ?? 50);
    const extractor = new FeatureExtractor('landscape', { landscape: { ...landscape, depth, gridSize } });
    extractor.fit(data, train);
    const x = extractor.transform(data);
    const locations: Array<FeatureLocation | undefined> = extractor
      .featureNames()
      .map((n) => parseLandscapeFeatureName(n));
    const xTrain = take(x, train);
    const xTest = take(x, fold.test);
    const yTrain = Int32Array.from(train, (i) => y[i]);
    const yTest = Int32Array.from(fold.test, (i) => y[i]);
    const seed = (options.seed * 1009 + fold.fold * 31 + fold.repeat) >>> 0;

    // Linear weights on the landscape axis.
    const chosenModel = modelPart(fold.chosen);
    const C = chosenModel.kernel === 'linear' && typeof chosenModel.C === 'number' ? chosenModel.C : 1;
    const linear = createClassifier('pca-svm', { kernel: 'linear', C }, seed);
    try {
      await linear.fit(xTrain, yTrain, classCount);
      const lw = (
        linear as unknown as { linearWeights?: () => { weights: Matrix } | undefined }
      ).linearWeights?.();
      if (lw) {
        // Standardised weights: w_j × sd_j of the training features, so a feature that is nearly constant
        // (tiny sd, huge raw weight) does not dominate the map (common practice, no source).
        const sd = columnSd(xTrain);
        const scaled: Matrix = {
          rows: lw.weights.rows,
          cols: lw.weights.cols,
          data: lw.weights.data.slice(),
        };
        for (let r = 0; r < scaled.rows; r++)
          for (let j = 0; j < scaled.cols; j++) scaled.data[r * scaled.cols + j] *= sd[j];
        const combined = combinePairWeights(scaled);
        signed = combined.signed;
        for (const curve of weightCurves(combined.values, locations)) {
          const axis = axes.find((a) => a.degree === curve.degree && a.filtration === curve.filtration);
          if (!axis) continue;
          const key = `${curve.filtration ?? ''}/${curve.degree}/${curve.layer}`;
          const entry = sums.get(key) ?? {
            degree: curve.degree,
            ...(curve.filtration !== undefined ? { filtration: curve.filtration } : {}),
            layer: curve.layer,
            t: axis.t,
            sum: new Float64Array(axis.t.length),
          };
          for (let j = 0; j < axis.t.length; j++)
            entry.sum[j] += interpolate(curve.t, curve.value, axis.t[j]);
          sums.set(key, entry);
        }
        weightFolds++;
      }
    } finally {
      linear.dispose();
    }

    // Permutation importance of the best landscape model.
    const model = createClassifier(chosenResult.model as ModelName, chosenModel, seed);
    try {
      await model.fit(xTrain, yTrain, classCount);
      const result = await permutationImportance(model, xTest, yTest, groupsByDegreeLayer(locations), {
        repeats: options.repeats,
        seed,
      });
      for (const g of result.groups)
        importanceByGroup.set(g.group, [...(importanceByGroup.get(g.group) ?? []), g.mean]);
    } finally {
      model.dispose();
    }
  }
  // Map order is the features' channel order (filtration-major), so only degree and layer are sorted within.
  const channelRank = new Map<string, number>();
  for (const c of sums.values())
    if (!channelRank.has(c.filtration ?? '')) channelRank.set(c.filtration ?? '', channelRank.size);
  const rankOf = (c: { filtration?: string }) => channelRank.get(c.filtration ?? '') ?? 0;
  const curves: WeightCurve[] = [...sums.values()]
    .sort((a, b) => rankOf(a) - rankOf(b) || a.degree - b.degree || a.layer - b.layer)
    .filter((c) => c.layer <= 4)
    .map((c) => ({
      degree: c.degree,
      ...(c.filtration !== undefined ? { filtration: c.filtration } : {}),
      layer: c.layer,
      t: c.t,
      value: c.sum.map((v) => v / Math.max(1, weightFolds)),
    }));
  const rows = [...importanceByGroup.entries()].map(([group, drops]) => {
    const mean = drops.reduce((s, v) => s + v, 0) / drops.length;
    const sd =
      drops.length > 1 ? Math.sqrt(drops.reduce((s, v) => s + (v - mean) ** 2, 0) / (drops.length - 1)) : 0;
    return { group, mean, std: sd };
  });
  const folds = chosenResult.folds.length;
  return {
    ...(curves.length > 0
      ? {
          weights: {
            curves,
            note: `${signed ? 'Signed weight (positive favours the first class)' : 'Weight magnitude (root mean square over the one-vs-one class pairs)'} of a linear pca-svm on the landscape features, carried back through the PCA loadings and the scaler onto (degree, layer, t) and multiplied by each feature's standard deviation; mean of ${weightFolds} refits, one per outer training fold. First four layers shown.`,
          },
        }
      : {}),
    ...(rows.length > 0
      ? {
          importance: {
            rows,
            note: `Drop in held-out accuracy of the best landscape model (${chosenResult.model}) when one degree and layer is shuffled across samples; mean ± sd over ${folds} outer folds, ${options.repeats} shuffles each.`,
          },
        }
      : {}),
  };
}

/** How the findings name each feature set built from diagrams alone. */
const SHAPE_SET_WORDS: Record<string, string> = {
  landscape: 'landscape features',
  betti: 'Betti-curve features',
  stats: 'persistence statistics',
  pimage: 'persistence-image features',
};

/** The best result among the feature sets built from diagrams alone (landscape, betti, stats, pimage). */
function bestShape(results: readonly StudyResult[]): { result: StudyResult; words: string } | undefined {
  let out: { result: StudyResult; words: string } | undefined;
  for (const set of Object.keys(SHAPE_SET_WORDS)) {
    const r = best(results, set);
    if (r && (!out || r.accuracy.mean > out.result.accuracy.mean))
      out = { result: r, words: SHAPE_SET_WORDS[set] };
  }
  return out;
}

/**
 * Plain-words findings: how the best features built from diagrams alone compare with the raw baseline, and
 * what the contrasts say.
 */
export function findingsOf(evaluation: EvaluationResult, contrasts: readonly ContrastTest[]): string[] {
  const out: string[] = [];
  const pct = (v: number) => `${(100 * v).toFixed(0)}%`;
  const shape = bestShape(evaluation.results);
  const land = shape?.result;
  const words = shape?.words ?? 'landscape features';
  const Words = words.charAt(0).toUpperCase() + words.slice(1);
  const raw = best(evaluation.results, 'raw');
  const combined = best(evaluation.results, 'combined');
  if (land && raw) {
    const gap = land.accuracy.mean - raw.accuracy.mean;
    const spread = Math.max(land.accuracy.std, raw.accuracy.std);
    const l = `${words} (${land.model}) reach ${pct(land.accuracy.mean)} ± ${pct(land.accuracy.std)}`;
    const r = `the raw baseline (${raw.model}) ${pct(raw.accuracy.mean)} ± ${pct(raw.accuracy.std)}`;
    if (gap >= 0.1 && gap > spread) out.push(`Shape helps here: ${l}, clearly above ${r}.`);
    else if (gap > 0.02)
      out.push(
        `${Words} are somewhat ahead: ${l} against ${r}; the gap is within about one fold-to-fold spread, so treat it as suggestive.`,
      );
    else if (gap >= -0.02) out.push(`No gain from shape on this set: ${l} and ${r} perform alike.`);
    else
      out.push(
        `The raw baseline wins on this set: ${r} against ${l}. A plain summary of the data already separates these classes; persistent homology adds nothing here.`,
      );
  } else if (land) {
    out.push(`${Words} (${land.model}) reach ${pct(land.accuracy.mean)} ± ${pct(land.accuracy.std)}.`);
  }
  if (combined && land && raw) {
    const top = Math.max(land.accuracy.mean, raw.accuracy.mean);
    out.push(
      combined.accuracy.mean > top + 0.02
        ? `Landscape and raw features together (${pct(combined.accuracy.mean)}) beat either alone: they carry different information.`
        : `Combining landscape and raw features gives ${pct(combined.accuracy.mean)}, no better than the better of the two alone.`,
    );
  }
  if (contrasts.length > 0) {
    const differ = contrasts.filter((t) => t.pAdjusted <= 0.05);
    out.push(
      `${differ.length} of ${contrasts.length} class-pair × degree contrasts show different mean landscapes at the 5% level after Holm's correction` +
        (differ.length > 0
          ? ` (${differ
              .slice(0, 4)
              .map((t) => `${channelName(t)} ${t.a} vs ${t.b}`)
              .join('; ')}${differ.length > 4 ? '; …' : ''}).`
          : '.'),
    );
  }
  return out;
}

/** Everything one dataset's part of the report needs, from its evaluation and diagrams. */
export async function buildDatasetReport(
  input: {
    name: string;
    description?: string;
    dataset: Dataset;
    /** The diagrams of every sample; without them (a table dataset) the report shows accuracy only. */
    diagrams?: readonly DiagramSet[];
    evaluation: EvaluationResult;
    landscape: LandscapeVectorizerOptions;
    diagramOptions?: DiagramOptions | Record<string, unknown> | string;
  },
  options: ReportOptions = {},
): Promise<ReportPieces> {
  const { dataset, evaluation } = input;
  const diagrams = input.diagrams ?? [];
  const shaped = diagrams.length > 0;
  const o = { ...DEFAULT_REPORT_OPTIONS, ...options };
  const degrees = options.degrees ?? input.landscape.degrees ?? [0, 1];
  const infinite = options.infinite ?? input.landscape.infinite ?? { mode: 'drop' as const };
  const means = !shaped
    ? []
    : classMeans(diagrams, {
        degrees,
        depth: o.depth,
        gridCount: o.gridCount,
        infinite,
        exact: false,
        band: { level: o.level, draws: o.draws, seed: o.seed },
      });
  const contrast = !shaped
    ? { tests: [] as ContrastTest[] }
    : contrastDiagrams(diagrams, {
        degrees,
        depth: o.depth,
        gridCount: o.gridCount,
        permutations: o.permutations,
        seed: o.seed,
        infinite,
      });
  const axes = means.map((m) => {
    const t = new Float64Array(m.grid.count);
    for (let j = 0; j < m.grid.count; j++)
      t[j] = m.grid.start + (j * (m.grid.stop - m.grid.start)) / (m.grid.count - 1);
    return { degree: m.degree, ...(m.filtration !== undefined ? { filtration: m.filtration } : {}), t };
  });
  const maps = !shaped
    ? undefined
    : await discriminativeMaps(diagrams, dataset.samples, evaluation, input.landscape, axes, {
        repeats: o.importanceRepeats,
        seed: o.seed,
      });
  const classes = classesOf(dataset.samples);
  const examples = !shaped
    ? []
    : classes.map((label) => {
        const set = diagrams.find((d) => d.label === label) ?? diagrams[0];
        // With several filtrations, the first one's diagrams (a chart of all of them would mix scales).
        const filtration = set.diagrams.find((d) => d.filtration !== undefined)?.filtration;
        if (filtration === undefined) return { label, sample: set.sample, diagrams: set.diagrams };
        const shown = set.diagrams.filter((d) => d.filtration === filtration);
        return { label, sample: set.sample, filtration, diagrams: shown };
      });
  const report: DatasetReport = {
    name: input.name,
    ...(input.description ? { description: input.description } : {}),
    summary: {
      kind: dataset.kind,
      samples: dataset.samples.length,
      classes: classes.map((label) => ({
        label,
        count: dataset.samples.filter((s) => s.label === label).length,
      })),
      facts: sampleFacts(dataset),
    },
    options: {
      ...(input.diagramOptions ? { diagrams: input.diagramOptions } : {}),
      'feature sets': evaluation.options.features,
      models: evaluation.options.models,
      'outer folds × repeats': `${evaluation.folds} × ${evaluation.repeats}`,
      'inner folds': evaluation.options.innerFolds,
      ...(evaluation.options.landscapeCandidates !== undefined
        ? { 'landscape (K, G) candidates': evaluation.options.landscapeCandidates }
        : {}),
      seed: evaluation.seed,
      ...(shaped ? {} : { note: 'no diagrams (table data): accuracy only' }),
      'class means': `depth ${o.depth}, ${o.gridCount}-point grid, ${Math.round(o.level * 100)}% band from ${o.draws} multiplier draws`,
      contrasts: `${o.permutations} permutations, L2 distance, Holm over all pairs × degrees`,
    },
    accuracy: evaluation.results.map((r) => ({
      features: r.features,
      model: r.model,
      mean: r.accuracy.mean,
      std: r.accuracy.std,
      balancedAccuracy: r.balancedAccuracy.mean,
      macroF1: r.macroF1.mean,
    })),
    paired: evaluation.paired,
    confusions: evaluation.results.map((r) => ({
      features: r.features,
      model: r.model,
      classes: evaluation.classes,
      matrix: r.confusion as unknown as number[][],
    })),
    means: means.map((m) => ({
      degree: m.degree,
      ...(m.filtration !== undefined ? { filtration: m.filtration } : {}),
      classes: m.classes.map((c) => ({ label: c.label, band: c.band })),
    })),
    contrasts: contrast.tests,
    contrastNote: `${o.permutations} permutations per test, L2 distance between sampled means (depth ${o.depth}); with ${contrast.tests.length} tests the smallest possible adjusted p is ${(contrast.tests.length / (o.permutations + 1)).toPrecision(2)}.`,
    ...(maps ? { maps } : {}),
    examples,
    findings: findingsOf(evaluation, contrast.tests),
  };
  return { report, means, contrasts: contrast.tests };
}

/**
 * The report written beside `landform evaluate`'s metrics.json: one dataset, the same parts as the demo's.
 * `diagrams` and `landscape` come from the evaluation (a raw-only study has no diagrams and gets accuracy only).
 */
export async function evaluationReportHtml(
  input: string,
  dataset: Dataset,
  evaluation: EvaluationResult,
  landscape: LandscapeVectorizerOptions | undefined,
  options: ReportOptions = {},
): Promise<string> {
  const { renderReport } = await import('./html.js');
  const name =
    input
      .split(/[\\/]/)
      .filter((p) => p !== '')
      .pop() ?? input;
  const pieces = await buildDatasetReport(
    {
      name,
      dataset,
      ...(evaluation.diagrams ? { diagrams: evaluation.diagrams } : {}),
      evaluation,
      landscape: landscape ?? {},
      diagramOptions: evaluation.options.diagrams as Record<string, unknown> | string | undefined,
    },
    { seed: evaluation.seed, ...options },
  );
  return renderReport({
    title: `Shape study of ${name}`,
    lead: 'Cross-validated accuracy of topological and raw features, class means with bands, contrasts and discriminative maps.',
    version: version(),
    command: `landform evaluate ${input}`,
    seed: evaluation.seed,
    datasets: [pieces.report],
  });
}

/** One shipped dataset of the demo and the options the study uses on it. */
export interface DemoDataset {
  name: string;
  /** Path relative to the package root. */
  path: string;
  kind?: SampleKind;
  description: string;
  diagram: DiagramOptions;
  landscape: LandscapeVectorizerOptions;
  /** The (K, G) candidates of the inner cross-validation for this set. */
  landscapeCandidates: ReadonlyArray<{ depth: number; gridSize: number }>;
  raw?: RawFeaturesOptions;
}

export const DEMO_DATASETS: readonly DemoDataset[] = [
  {
    name: 'lattice',
    path: 'datasets/lattice.csv',
    description:
      'Synthetic cross-sections of printed lattice panels from an invented inspection line: intact, broken-strut and merged-cells. Vietoris–Rips on the 2-D points; the classes differ in the number and size of loops (H1).',
    diagram: { degrees: [0, 1] },
    // The classes differ in H1 only: intact panels have six cells, the others five, so depth 6 reaches the
    // sixth loop. H0 would add 150+ short bars of point spacing and stray points, i.e. noise features.
    landscape: { degrees: [1] },
    landscapeCandidates: [{ depth: 6, gridSize: 20 }],
  },
  {
    name: 'pump',
    path: 'datasets/pump.csv',
    kind: 'signal',
    description:
      'Synthetic vibration runs of an invented circulation pump: healthy, cavitating and misaligned. Each run is delay-embedded (dimension 4, delay 8, stride 2) into a point cloud; a periodic run traces a loop, a two-frequency run a torus.',
    diagram: { degrees: [0, 1], embed: { dimension: 4, delay: 8, stride: 2 } },
    landscape: { degrees: [0, 1] },
    landscapeCandidates: [{ depth: 3, gridSize: 20 }],
    raw: { signalLength: 64 },
  },
  {
    name: 'field',
    path: 'datasets/field',
    kind: 'image',
    description:
      'Synthetic 40 × 40 thermal frames of invented buried heating sensors: disc, ring and pair. Superlevel-set filtration of the grey levels (reported on the negated scale); a ring adds a loop, a pair a second long-lived piece.',
    diagram: { degrees: [0, 1], superlevel: true },
    landscape: { degrees: [0, 1] },
    landscapeCandidates: [{ depth: 3, gridSize: 15 }],
    raw: { imageSize: 10 },
  },
];

export interface DemoOptions {
  datasets?: readonly DemoDataset[];
  /** Fewer folds, permutations and draws, one model: a quick look. Default false. */
  quick?: boolean;
  seed?: number;
  workers?: number;
  /** Progress of the whole demo, in steps (a dataset's diagrams, its evaluation units, its report). */
  onProgress?: (done: number, total: number) => void;
  /** Called as each dataset starts. */
  onDataset?: (name: string, index: number, total: number) => void;
}

export interface DemoDatasetOutcome {
  spec: DemoDataset;
  dataset: Dataset;
  evaluation: EvaluationResult;
  pieces: ReportPieces;
  seconds: number;
}

export interface DemoResult {
  outcomes: DemoDatasetOutcome[];
  report: ReportInput;
  /** The combined metrics.json text. */
  metrics: string;
}

/** The demo's settings, full or quick (documented in the README). */
export function demoSettings(quick: boolean): { folds: number; models: ModelName[]; report: ReportOptions } {
  return quick
    ? { folds: 3, models: ['pca-svm'], report: { permutations: 199, draws: 300, importanceRepeats: 2 } }
    : {
        folds: 5,
        models: ['pca-svm', 'dense'],
        report: { permutations: 999, draws: 1000, importanceRepeats: 5 },
      };
}

/**
 * The demo's inner-CV grid: a deliberately small one so that the whole study stays under a minute on two
 * cores — for pca-svm a linear kernel (C = 1) and an RBF kernel (C = 10, γ = 1/features); for other models
 * (the dense network, whose training is most of the cost) their first default candidate only, so no inner
 * search is run for them. `landform evaluate` searches the models' full default grids.
 */
export async function demoModelFactory(): Promise<ModelFactory> {
  const { createClassifier, candidateHyperparameters } = await import('../learn/models.js');
  return {
    create: createClassifier,
    candidates: (name, shape) =>
      name === 'pca-svm'
        ? [
            { kernel: 'linear', C: 1 },
            { kernel: 'rbf', C: 10, gamma: 1 / Math.max(1, shape.features) },
          ]
        : candidateHyperparameters(name, shape).slice(0, 1),
  };
}

/** The models of `wanted` that this build can create (a model stage not yet present is left out, and said so). */
export async function availableModels(wanted: readonly ModelName[]): Promise<ModelName[]> {
  const { createClassifier, candidateHyperparameters } = await import('../learn/models.js');
  return wanted.filter((name) => {
    try {
      const first = candidateHyperparameters(name, { samples: 10, features: 10 })[0] ?? {};
      createClassifier(name, first, 1).dispose();
      return true;
    } catch {
      return false;
    }
  });
}

export async function runDemo(options: DemoOptions = {}): Promise<DemoResult> {
  const specs = options.datasets ?? DEMO_DATASETS;
  const seed = options.seed ?? 1;
  const settings = demoSettings(options.quick === true);
  const { loadDataset } = await import('../io/load.js');
  const { computeDiagramsParallel } = await import('../homology/parallel.js');
  const { runEvaluation, formatMetricsJson } = await import('../learn/evaluate.js');
  const modelFactory = await demoModelFactory();
  const models = await availableModels(settings.models);
  const outcomes: DemoDatasetOutcome[] = [];
  // Progress in percent of each dataset: diagrams 0–20, evaluation 20–85, report 85–100.
  const total = 100 * specs.length;
  for (let i = 0; i < specs.length; i++) {
    const spec = specs[i];
    options.onDataset?.(spec.name, i, specs.length);
    const started = performance.now();
    const at = (from: number, to: number) => (done: number, of: number) =>
      options.onProgress?.(Math.round(100 * i + from + ((to - from) * done) / Math.max(1, of)), total);
    const loaded = await loadDataset(resolve(packageRoot(), spec.path), spec.kind ? { kind: spec.kind } : {});
    const dataset: Dataset = { ...loaded, source: spec.path };
    const diagrams = await computeDiagramsParallel(dataset.samples, spec.diagram, {
      workers: options.workers,
      onProgress: at(0, 20),
    });
    const evaluation = await runEvaluation(dataset, {
      diagrams,
      folds: settings.folds,
      seed,
      models,
      modelFactory,
      landscape: spec.landscape,
      landscapeCandidates: spec.landscapeCandidates,
      ...(spec.raw ? { raw: spec.raw } : {}),
      record: {
        diagrams: spec.diagram,
        modelCandidates:
          'demo grid: pca-svm linear C=1 and rbf C=10 γ=1/features; dense its first default candidate',
      },
      onProgress: at(20, 85),
    });
    const pieces = await buildDatasetReport(
      {
        name: spec.name,
        description: spec.description,
        dataset,
        diagrams,
        evaluation,
        landscape: spec.landscape,
        diagramOptions: spec.diagram,
      },
      { ...settings.report, seed },
    );
    at(85, 100)(1, 1);
    outcomes.push({ spec, dataset, evaluation, pieces, seconds: (performance.now() - started) / 1000 });
  }
  const metrics = demoMetricsJson(outcomes, seed, options.quick === true, formatMetricsJson);
  const report: ReportInput = {
    title: 'landform demo study',
    lead: 'Three invented inspection and sensing scenarios, each asking whether shape tells the classes apart, how well, and where along the scale. All data are synthetic.',
    version: version(),
    command: `landform demo${options.quick ? ' --quick' : ''}`,
    seed,
    datasets: outcomes.map((o) => o.pieces.report),
  };
  return { outcomes, report, metrics };
}

/**
 * The combined metrics.json of the demo: one entry per dataset, each holding exactly the layout of
 * `landform evaluate`'s metrics.json under `metrics`, plus the contrasts.
 */
export function demoMetricsJson(
  outcomes: readonly DemoDatasetOutcome[],
  seed: number,
  quick: boolean,
  format: (r: EvaluationResult) => string,
): string {
  const doc = {
    tool: 'landform',
    version: version(),
    command: 'demo',
    seed,
    quick,
    datasets: outcomes.map((o) => ({
      name: o.spec.name,
      source: o.spec.path,
      metrics: JSON.parse(format(o.evaluation)) as unknown,
      contrasts: o.pieces.contrasts.map((t) => ({
        a: t.a,
        b: t.b,
        degree: t.degree,
        statistic: Number(t.statistic.toPrecision(6)),
        p: Number(t.p.toPrecision(6)),
        pAdjusted: Number(t.pAdjusted.toPrecision(6)),
      })),
    })),
  };
  return `${JSON.stringify(doc, null, 2)}\n`;
}

/** The short table the demo prints: best accuracy per dataset and feature set. */
export function accuracyTable(outcomes: readonly DemoDatasetOutcome[]): string {
  const sets = ['landscape', 'raw', 'combined'];
  const header = ['dataset', ...sets.map((s) => `${s} (best model)`)];
  const rows = outcomes.map((o) => [
    o.spec.name,
    ...sets.map((s) => {
      const b = best(o.evaluation.results, s);
      return b ? `${b.accuracy.mean.toFixed(2)} ± ${b.accuracy.std.toFixed(2)} ${b.model}` : '—';
    }),
  ]);
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  return [header, ...rows]
    .map((r) =>
      r
        .map((c, i) => c.padEnd(widths[i]))
        .join('  ')
        .trimEnd(),
    )
    .join('\n');
}
