import type { DiagramSet, InfinitePolicy } from '../core/diagram.js';
import { classesOf, type Dataset } from '../core/sample.js';
import { version } from '../core/version.js';
import type { LandscapeVectorizerOptions } from '../features/landscape-vectorizer.js';
import type { DiagramOptions } from '../homology/compute.js';
import type { EvaluationResult } from '../learn/evaluate.js';
import { discriminativeMaps } from '../learn/explain.js';
import { contrastDiagrams } from './contrast.js';
import { findingsOf } from './findings.js';
import type { DatasetReport } from './html.js';
import { classMeans, type DegreeMeans } from './means.js';
import type { ContrastTest } from './permutation.js';

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
