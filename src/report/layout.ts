import { channelsOf, type DiagramSet, type InfinitePolicy } from '../core/diagram.js';
import { classesOf, type Dataset } from '../core/sample.js';
import { version } from '../core/version.js';
import { FeatureExtractor } from '../features/combined.js';
import type { LandscapeVectorizerOptions } from '../features/landscape-vectorizer.js';
import type { RawFeaturesOptions } from '../features/raw-features.js';
import type { DiagramOptions } from '../homology/compute.js';
import type { EvaluationResult } from '../learn/evaluate.js';
import { bestResult, discriminativeMaps } from '../learn/explain.js';
import { chosenRows } from './chosen.js';
import { contrastDiagrams } from './contrast.js';
import {
  chooseMapChannel,
  DISTANCE_MAP_SAMPLES,
  DISTANCE_MAP_WORK,
  type DistanceMap,
  diagramDistanceMap,
} from './distance-map.js';
import { findingsOf } from './findings.js';
import type { DatasetReport } from './html.js';
import { classMeans, type DegreeMeans } from './means.js';
import { BASE_PERMUTATIONS, type ContrastTest, PERMUTATION_BUDGET, permutationReach } from './permutation.js';
import { type SampleMap, sampleMap } from './scatter.js';

/**
 * The layout of one dataset's part of the report: given a dataset, its diagrams and an evaluation
 * (src/learn/evaluate.ts), it adds the readable parts — class means with bands, contrasts, discriminative maps
 * (src/learn/explain.ts), example diagrams, plain-words findings (findings.ts) — and shapes everything for
 * `renderReport` (html.ts).
 */
export interface ReportOptions {
  /** Degrees of the class means, contrasts and maps. Default: the evaluation's landscape degrees. */
  degrees?: number[];
  /** Layers shown and tested. Default 5. */
  depth?: number;
  /** Grid points of the class means and contrasts. Default 100. */
  gridSize?: number;
  /** Band level. Default 0.95. */
  level?: number;
  /** Bootstrap draws of the bands. Default 1000. */
  draws?: number;
  /**
   * Permutations of each contrast, as given. Default: `basePermutations`, raised for a large family so that
   * its smallest adjusted p can reach 0.01, at most PERMUTATION_BUDGET (see `permutationsForFamily`).
   */
  permutations?: number;
  /** The least permutations of each contrast when `permutations` is not given. Default 999. */
  basePermutations?: number;
  /** Samples of the diagram-distance map at most (evenly per class). Default DISTANCE_MAP_SAMPLES (48). */
  mapSamples?: number;
  /** Shuffles per group and fold of the permutation importance. Default 5. */
  importanceRepeats?: number;
  /** Default 1. */
  seed?: number;
  infinite?: InfinitePolicy;
}

export const DEFAULT_REPORT_OPTIONS = {
  depth: 5,
  gridSize: 100,
  level: 0.95,
  draws: 1000,
  basePermutations: BASE_PERMUTATIONS,
  mapSamples: DISTANCE_MAP_SAMPLES,
  importanceRepeats: 5,
  seed: 1,
} as const;

export interface ReportPieces {
  report: DatasetReport;
  means: DegreeMeans[];
  contrasts: ContrastTest[];
  /** Permutations per contrast actually used (0 without diagrams). */
  permutations: number;
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
    /** Options of the raw features for the sample map. Default: those the evaluation recorded. */
    raw?: RawFeaturesOptions;
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
        gridSize: o.gridSize,
        infinite,
        exact: false,
        band: { level: o.level, draws: o.draws, seed: o.seed },
      });
  const contrast = !shaped
    ? { tests: [] as ContrastTest[], permutations: 0 }
    : contrastDiagrams(diagrams, {
        degrees,
        depth: o.depth,
        gridSize: o.gridSize,
        ...(options.permutations !== undefined ? { permutations: options.permutations } : {}),
        basePermutations: o.basePermutations,
        seed: o.seed,
        infinite,
      });
  const permutations = contrast.permutations;
  const reach = permutationReach(contrast.tests.length, permutations);
  const permutationWords =
    options.permutations !== undefined
      ? `${permutations} permutations per test (as given)`
      : permutations > o.basePermutations
        ? `${permutations} permutations per test (raised from ${o.basePermutations} for a family of ${contrast.tests.length} tests, budget ${PERMUTATION_BUDGET})`
        : `${permutations} permutations per test`;
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
  const sampleMaps = await sampleMapsOf(dataset, diagrams, evaluation, input.landscape, input.raw);
  const distanceMap = !shaped ? undefined : distanceMapOf(diagrams, degrees, contrast.tests, infinite, o);
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
      'class means': `depth ${o.depth}, ${o.gridSize}-point grid, ${Math.round(o.level * 100)}% band from ${o.draws} multiplier draws`,
      ...(shaped
        ? {
            contrasts: `${permutationWords}, L2 distance, Holm over all ${contrast.tests.length} pairs × degrees`,
          }
        : {}),
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
    chosen: chosenRows(evaluation.results),
    ...(sampleMaps.length > 0 ? { sampleMaps } : {}),
    ...(distanceMap ? { distanceMap } : {}),
    contrasts: contrast.tests,
    contrastNote: `${permutationWords}, L2 distance between sampled means (depth ${o.depth}); with ${contrast.tests.length} tests the smallest possible adjusted p is ${reach.floor.toPrecision(2)}.`,
    ...(shaped ? { contrastReach: reach } : {}),
    ...(maps ? { maps } : {}),
    examples,
    findings: findingsOf(evaluation, contrast.tests, shaped ? permutations : undefined),
  };
  return { report, means, contrasts: contrast.tests, permutations };
}

/**
 * The sample maps: the landscape features (with the depth and grid the best landscape model chose most
 * often) and the raw features, each standardised and projected on its first two principal components, fitted
 * on all samples (a picture, not a model).
 */
async function sampleMapsOf(
  dataset: Dataset,
  diagrams: readonly DiagramSet[],
  evaluation: EvaluationResult,
  landscape: LandscapeVectorizerOptions,
  raw: RawFeaturesOptions | undefined,
): Promise<SampleMap[]> {
  if (dataset.samples.length < 3) return [];
  const data = {
    samples: dataset.samples,
    ...(diagrams.length > 0 ? { diagrams } : {}),
    ...(dataset.columns ? { columns: dataset.columns } : {}),
  };
  const ids = dataset.samples.map((s) => ({ id: s.id, label: s.label }));
  const out: SampleMap[] = [];
  const best = bestResult(evaluation.results, 'landscape');
  if (best && diagrams.length > 0) {
    const chosen = best.chosen.mostFrequent;
    const depth = Number(chosen.depth ?? landscape.depth ?? 5);
    const gridSize = Number(chosen.gridSize ?? landscape.gridSize ?? 50);
    const extractor = new FeatureExtractor('landscape', { landscape: { ...landscape, depth, gridSize } });
    const x = extractor.fit(data).transform(data);
    out.push(
      await sampleMap(
        x,
        ids,
        'landscape',
        `depth ${depth}, grid ${gridSize}, as chosen most often for ${best.model}`,
      ),
    );
  }
  if (dataset.kind !== 'diagrams' && evaluation.results.some((r) => r.features === 'raw')) {
    const recorded = (evaluation.options.raw ?? {}) as Record<string, unknown>;
    const options: RawFeaturesOptions = raw ?? {
      ...(typeof recorded.bins === 'number' ? { bins: recorded.bins } : {}),
      ...(typeof recorded.upperQuantile === 'number' ? { upperQuantile: recorded.upperQuantile } : {}),
      ...(typeof recorded.signalLength === 'number' ? { signalLength: recorded.signalLength } : {}),
      ...(typeof recorded.imageSize === 'number' ? { imageSize: recorded.imageSize } : {}),
    };
    const extractor = new FeatureExtractor('raw', { raw: options });
    const x = extractor.fit(data).transform(data);
    out.push(await sampleMap(x, ids, 'raw'));
  }
  return out;
}

/** The diagram-distance map of the channel whose contrasts are clearest (see `chooseMapChannel`). */
function distanceMapOf(
  diagrams: readonly DiagramSet[],
  degrees: readonly number[],
  contrasts: readonly ContrastTest[],
  infinite: InfinitePolicy,
  o: { mapSamples: number; seed: number },
): DistanceMap | undefined {
  if (diagrams.length < 2) return undefined;
  const plan = chooseMapChannel(diagrams, channelsOf(diagrams, degrees), contrasts, {
    infinite,
    cap: o.mapSamples,
    work: DISTANCE_MAP_WORK,
  });
  if (!plan) return undefined;
  return diagramDistanceMap(diagrams, plan.channel, {
    perClass: plan.perClass,
    seed: o.seed,
    infinite,
    reason: plan.reason,
  });
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
