import { join, resolve } from 'node:path';
import type { Dataset, SampleKind } from '../core/sample.js';
import { packageRoot, version } from '../core/version.js';
import type { LandscapeVectorizerOptions } from '../features/landscape-vectorizer.js';
import type { RawFeaturesOptions } from '../features/raw-features.js';
import type { DiagramOptions } from '../homology/compute.js';
import type { ModelName } from '../learn/classifier.js';
import type { EvaluationResult } from '../learn/evaluate.js';
import { bestResult } from '../learn/explain.js';
import type { ModelFactory } from '../learn/select.js';
import type { ReportInput } from '../report/html.js';
import { buildDatasetReport, type ReportOptions, type ReportPieces } from '../report/layout.js';
import { SCENARIOS, type Scenario } from './scenarios/index.js';

/**
 * The demo study: the whole job (diagrams → landscapes → cross-validated models → report) on every shipped
 * scenario, with the options each scenario's catalogue entry gives.
 */

/** One shipped dataset of the demo and the options the study uses on it (from the scenario catalogue). */
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

/** A catalogue entry as the demo runs it: its files under datasets/, its words, its study options. */
export function demoDatasetOf(scenario: Scenario): DemoDataset {
  return {
    name: scenario.name,
    path: join('datasets', scenario.path),
    kind: scenario.kind,
    description: `${scenario.summary} ${scenario.advice}`,
    ...scenario.study,
  };
}

export const DEMO_DATASETS: readonly DemoDataset[] = SCENARIOS.map(demoDatasetOf);

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
    ? { folds: 3, models: ['pca-svm'], report: { basePermutations: 199, draws: 300, importanceRepeats: 2 } }
    : {
        folds: 5,
        models: ['pca-svm', 'dense'],
        report: { basePermutations: 999, draws: 1000, importanceRepeats: 5 },
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
      contrastPermutations: o.pieces.permutations,
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
      const b = bestResult(o.evaluation.results, s);
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
