import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import { checkFeatureColumns } from '../../core/budgets.js';
import type { DiagramSet } from '../../core/diagram.js';
import { UserError } from '../../core/errors.js';
import type { Dataset, SampleKind } from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import {
  checkFeatureSet,
  FEATURE_SET_NAMES,
  type FeatureSetName,
  featureSetsFor,
} from '../../features/combined.js';
import type { LandscapeVectorizerOptions } from '../../features/landscape-vectorizer.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { filtrationList } from '../../homology/filtration.js';
import { METRICS, type Metric } from '../../homology/metric.js';
import { acquireOutputLock, writeFileAtomic, writeFolderAtomic } from '../../io/atomic.js';
import { loadDataset, parseKind, parseShape } from '../../io/load.js';
import { checkOutputPath } from '../../io/output-guard.js';
import { provenancePath } from '../../io/provenance-file.js';
import {
  DEFAULT_MODEL_NAMES,
  type Hyperparameters,
  MODEL_NAMES,
  type ModelName,
} from '../../learn/classifier.js';
import type { EvaluationOptions, EvaluationResult } from '../../learn/evaluate.js';
import type { PairedComparison } from '../../learn/paired.js';
import type { LandscapeCandidate } from '../../learn/select.js';
import { noteOption } from '../dataset-input.js';
import { addFiltrationOptions, filtrationRecord, parseFiltrationOptions } from '../filtration-options.js';
import {
  parseChoiceOption,
  parseDegreesOption,
  parseInfiniteOption,
  parseIntegerOption,
  parseListOption,
  parseNumberOption,
  parseWorkersOption,
} from '../options.js';
import { type ProgressMode, parseProgressMode, startPhases } from '../progress.js';
import { parseEmbedOption } from './diagrams.js';

/** Options shared by `evaluate` and `train`: the data, the diagrams and the feature/model search. */
export interface StudyCommandOptions {
  kind?: string;
  degrees: string;
  seed: string;
  models?: string;
  features?: string;
  innerFolds: string;
  depths: string;
  gridSizes: string;
  infinite: string;
  maxScale?: string;
  metric: string;
  embed?: string;
  superlevel?: boolean;
  workers?: string;
  quiet?: boolean;
  filtration?: string;
  subsample?: string;
  threshold?: string;
  shape?: string;
  svmKernel?: string;
  svmC?: string;
  svmGamma?: string;
  pcaVariance?: string;
  progress?: string;
}

/** Adds the options that say how diagrams are computed (shared by evaluate, train, vectorize). */
export function addDiagramOptions(command: Command): Command {
  return addFiltrationOptions(command)
    .option('--kind <kind>', 'sample kind (default: detected from the input)')
    .option('--shape <RxC>', 'image table CSV: the shape of every image, ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS')
    .option('--degrees <list>', 'homology degrees for the diagrams and landscapes, from 0, 1, 2', '0,1')
    .option('--max-scale <r>', 'largest Rips scale kept (default: none)')
    .option('--metric <name>', `distance between points: ${METRICS.join(', ')}`, 'euclidean')
    .option('--embed <DIM:DELAY[:STRIDE]>', 'turn each signal into a cloud of delay windows before Rips')
    .option('--superlevel', 'images and signals: superlevel sets (bright first)')
    .option('--workers <n>', 'worker threads for the diagrams and the learning (default: every core)')
    .option('--infinite <policy>', "essential classes: 'drop' or 'clip:VALUE'", 'drop');
}

/** Adds the options shared by `evaluate` and `train` (`single`: one model and one feature set). */
export function addStudyOptions(command: Command, single = false): Command {
  addDiagramOptions(command).option('--seed <n>', 'seed of every split and model', '1');
  if (single) {
    command
      .option('--models <name>', `the model: ${MODEL_NAMES.join(', ')}`, 'pca-svm')
      .option(
        '--features <set>',
        `the feature set: ${FEATURE_SET_NAMES.join(', ')} (default: landscape; raw for tables)`,
      );
  } else {
    command
      .option(
        '--models <list>',
        `models: ${MODEL_NAMES.join(', ')} (default: ${DEFAULT_MODEL_NAMES.join(', ')})`,
      )
      .option(
        '--features <list>',
        `feature sets: ${FEATURE_SET_NAMES.join(', ')} (default: landscape, raw, combined, those the kind allows)`,
      );
  }
  return command
    .option('--inner-folds <k>', 'folds of the inner cross-validation that chooses hyperparameters', '3')
    .option('--depths <list>', 'landscape depths K tried by the inner cross-validation', '5,3')
    .option('--grid-sizes <list>', 'landscape grid sizes G tried by the inner cross-validation', '50,25')
    .option('--svm-kernel <kernel>', 'pca-svm: fix the kernel, linear or rbf (default: searched)')
    .option('--svm-c <C>', 'pca-svm: fix the cost C > 0 (default: searched)')
    .option(
      '--svm-gamma <gamma>',
      'pca-svm: fix the RBF width γ > 0 (default: searched, scaled by 1/features)',
    )
    .option('--pca-variance <share>', "pca-svm: share of variance the PCA keeps, in (0, 1], or 'all'", '0.95')
    .option(
      '--progress <mode>',
      'auto (a bar on a terminal), lines (plain lines on stderr, also in pipes) or none',
    );
}

/**
 * The pca-svm values fixed by --svm-kernel, --svm-c, --svm-gamma and --pca-variance (the inner search then
 * keeps only candidates with them), and what metrics.json and the manifest record of them.
 */
export function parseModelOptions(
  o: Pick<StudyCommandOptions, 'svmKernel' | 'svmC' | 'svmGamma' | 'pcaVariance'>,
  models: readonly ModelName[],
): { fixed: Partial<Record<ModelName, Hyperparameters>>; record: Record<string, unknown> } {
  const fixed: Hyperparameters = {};
  if (o.svmKernel !== undefined)
    fixed.kernel = parseChoiceOption(o.svmKernel, '--svm-kernel', ['linear', 'rbf']);
  if (o.svmC !== undefined) fixed.C = parseNumberOption(o.svmC, '--svm-c', { positive: true });
  if (o.svmGamma !== undefined) {
    if (fixed.kernel === 'linear')
      throw new UserError('--svm-gamma applies to the rbf kernel; drop it or use --svm-kernel rbf');
    fixed.gamma = parseNumberOption(o.svmGamma, '--svm-gamma', { positive: true });
  }
  const variance = o.pcaVariance ?? '0.95';
  let pcaVariance: number | 'all' = 'all';
  if (variance !== 'all') {
    pcaVariance = Number(variance);
    if (variance.trim() === '' || !(pcaVariance > 0 && pcaVariance <= 1))
      throw new UserError(`--pca-variance '${variance}' must be a share in (0, 1] such as 0.95, or 'all'`);
    if (pcaVariance !== 0.95) fixed.varianceKept = pcaVariance;
  } else fixed.varianceKept = 1;
  const given = Object.keys(fixed).length > 0;
  if (given && !models.includes('pca-svm')) {
    throw new UserError(
      '--svm-kernel, --svm-c, --svm-gamma and --pca-variance apply to pca-svm, which is not among --models; add it or drop them',
    );
  }
  const record = models.includes('pca-svm')
    ? {
        'pca-svm': {
          kernel: fixed.kernel ?? 'searched',
          C: fixed.C ?? 'searched',
          gamma: fixed.gamma ?? (fixed.kernel === 'linear' ? null : 'searched'),
          pcaVariance,
        },
      }
    : {};
  return { fixed: given ? { 'pca-svm': fixed } : {}, record };
}

/** The parsed diagram options and what metrics.json / a manifest records of them. */
export interface ParsedDiagramOptions {
  degrees: number[];
  diagramOptions: DiagramOptions;
  workers?: number;
  kind?: SampleKind;
  shape?: number[];
}

export function parseDiagramOptions(
  o: Pick<
    StudyCommandOptions,
    | 'kind'
    | 'degrees'
    | 'maxScale'
    | 'metric'
    | 'embed'
    | 'superlevel'
    | 'workers'
    | 'quiet'
    | 'filtration'
    | 'subsample'
    | 'threshold'
    | 'shape'
  >,
): ParsedDiagramOptions {
  const degrees = parseDegreesOption(o.degrees, '--degrees', 2);
  const metric = parseChoiceOption(o.metric, '--metric', METRICS) as Metric;
  const maxScale =
    o.maxScale === undefined ? undefined : parseNumberOption(o.maxScale, '--max-scale', { positive: true });
  const embed = o.embed === undefined ? undefined : parseEmbedOption(o.embed);
  const workers = o.workers === undefined ? undefined : parseWorkersOption(o.workers, o.quiet === true);
  const kind = o.kind === undefined ? undefined : parseKind(o.kind);
  const diagramOptions: DiagramOptions = { degrees, metric };
  if (maxScale !== undefined) diagramOptions.maxScale = maxScale;
  if (embed !== undefined) diagramOptions.embed = embed;
  if (o.superlevel) diagramOptions.superlevel = true;
  const choice = parseFiltrationOptions(o);
  if (choice.filtration !== 'rips') diagramOptions.filtration = choice.filtration;
  if (choice.subsample !== undefined) diagramOptions.subsample = choice.subsample;
  if (choice.threshold !== undefined) diagramOptions.threshold = choice.threshold;
  return {
    degrees,
    diagramOptions,
    ...(workers !== undefined ? { workers } : {}),
    ...(kind !== undefined ? { kind } : {}),
    ...(o.shape !== undefined ? { shape: parseShape(o.shape) } : {}),
  };
}

/** How the diagrams were computed, as recorded in metrics.json and manifests (stable key order). */
export function diagramRecord(kind: SampleKind, d: DiagramOptions): Record<string, unknown> | string {
  if (kind === 'diagrams') return 'given';
  return {
    degrees: d.degrees,
    metric: d.metric ?? 'euclidean',
    maxScale: d.maxScale ?? null,
    embed: d.embed ?? null,
    superlevel: d.superlevel === true,
    ...filtrationRecord({
      filtration: d.filtration === undefined ? 'rips' : [...filtrationList(d.filtration)],
      ...(d.subsample ? { subsample: d.subsample } : {}),
      ...(d.threshold !== undefined ? { threshold: d.threshold } : {}),
    }),
  };
}

/** Loads a dataset and refuses an empty one or --embed on non-signals. */
export async function loadStudyDataset(
  input: string,
  parsed: ParsedDiagramOptions,
  quiet = false,
): Promise<Dataset> {
  const dataset = await loadDataset(input, {
    ...(parsed.kind === undefined ? {} : { kind: parsed.kind }),
    ...(parsed.shape === undefined ? {} : { shape: parsed.shape }),
    ...noteOption(quiet),
  });
  if (dataset.samples.length === 0) throw new UserError('has no samples; nothing to do', { file: input });
  if (parsed.diagramOptions.embed !== undefined && dataset.kind !== 'signal') {
    throw new UserError(`--embed applies to signals, but this is a ${dataset.kind} dataset; drop --embed`, {
      file: input,
    });
  }
  return dataset;
}

/** The diagrams of every sample (a diagrams dataset is used as it is), with a progress bar. */
export async function diagramsForCommand(
  dataset: Dataset,
  parsed: ParsedDiagramOptions,
  quiet: boolean,
  mode: ProgressMode = 'auto',
): Promise<DiagramSet[]> {
  if (dataset.kind === 'diagrams') {
    return dataset.samples.map((s) => ({
      sample: s.id,
      label: s.label,
      diagrams: s.kind === 'diagrams' ? s.diagrams : [],
    }));
  }
  const { computeDiagramsParallel } = await import('../../homology/parallel.js');
  const progress = await startPhases(mode, quiet);
  const total = dataset.samples.length;
  progress.update('diagrams', 0, total);
  try {
    return await computeDiagramsParallel(dataset.samples, parsed.diagramOptions, {
      ...(parsed.workers !== undefined ? { workers: parsed.workers } : {}),
      onProgress: (done) => progress.update('diagrams', done, total),
    });
  } finally {
    progress.stop();
  }
}

function parsePositiveList(text: string, option: string, min: number): number[] {
  const parts = text
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
  if (parts.length === 0)
    throw new UserError(`${option} is empty; give one or more whole numbers such as 3,5`);
  return [...new Set(parts.map((p) => parseIntegerOption(p, option, min, 10_000)))];
}

/** What a study command parsed: the dataset and the library options (without folds). */
export interface ParsedStudy {
  dataset: Dataset;
  options: EvaluationOptions;
  featureSets: FeatureSetName[];
  models: ModelName[];
  parsed: ParsedDiagramOptions;
}

/** Loads the dataset and turns the shared options into the library's options. */
export async function parseStudy(
  input: string,
  o: StudyCommandOptions,
  singleFeatureSet = false,
): Promise<ParsedStudy> {
  const parsed = parseDiagramOptions(o);
  parseProgressMode(o.progress);
  const seed = parseIntegerOption(o.seed, '--seed', 0, 2 ** 32 - 1);
  const innerFolds = parseIntegerOption(o.innerFolds, '--inner-folds', 2, 100);
  const depths = parsePositiveList(o.depths, '--depths', 1);
  const gridSizes = parsePositiveList(o.gridSizes, '--grid-sizes', 2);
  const infinite = parseInfiniteOption(o.infinite, '--infinite');
  const models =
    o.models === undefined ? [...DEFAULT_MODEL_NAMES] : parseListOption(o.models, '--models', MODEL_NAMES);
  const requested =
    o.features === undefined ? undefined : parseListOption(o.features, '--features', FEATURE_SET_NAMES);
  if (singleFeatureSet && models.length > 1)
    throw new UserError(`--models takes one model here, got ${models.join(',')}; pick one`);
  if (singleFeatureSet && requested && requested.length > 1) {
    throw new UserError(`--features takes one feature set here, got ${requested.join(',')}; pick one`);
  }
  // Landscape columns: every degree × the largest depth × the largest grid tried (refused before loading).
  const columns = parsed.degrees.length * Math.max(...depths) * Math.max(...gridSizes);
  const columnOptions = '--degrees × --depths × --grid-sizes';
  const landscapeAsked = (sets: readonly FeatureSetName[]): boolean =>
    sets.includes('landscape') || sets.includes('combined');
  if (requested === undefined || landscapeAsked(requested)) checkFeatureColumns(columns, columnOptions);
  const dataset = await loadStudyDataset(input, parsed, o.quiet === true);
  const featureSets =
    requested ?? (singleFeatureSet ? featureSetsFor(dataset.kind).slice(0, 1) : featureSetsFor(dataset.kind));
  for (const set of featureSets) checkFeatureSet(set, dataset.kind);
  if (landscapeAsked(featureSets)) checkFeatureColumns(columns, columnOptions, dataset.samples.length);
  const landscapeCandidates: LandscapeCandidate[] = [];
  for (const depth of depths) for (const gridSize of gridSizes) landscapeCandidates.push({ depth, gridSize });
  const landscape: LandscapeVectorizerOptions = { degrees: parsed.degrees, infinite };
  const model = parseModelOptions(o, models);
  const options: EvaluationOptions = {
    featureSets,
    models,
    seed,
    innerFolds,
    landscape,
    landscapeCandidates,
    diagramOptions: parsed.diagramOptions,
    ...(parsed.workers !== undefined ? { workers: parsed.workers } : {}),
    ...(Object.keys(model.fixed).length > 0 ? { fixed: model.fixed } : {}),
    record: {
      kind: dataset.kind,
      ...(parsed.shape !== undefined ? { shape: parsed.shape } : {}),
      samples: dataset.samples.length,
      diagrams: diagramRecord(dataset.kind, parsed.diagramOptions),
      modelOptions: model.record,
    },
  };
  return { dataset, options, featureSets, models, parsed };
}

interface EvaluateCommandOptions extends StudyCommandOptions {
  folds: string;
  repeats: string;
  out?: string;
  report: boolean;
  force?: boolean;
}

/** What an evaluation folder holds; a folder with only these names was written by an earlier landform. */
export const EVALUATION_FILES: readonly string[] = [
  'metrics.json',
  'predictions.csv',
  'predictions.csv.provenance.json',
  'folds.csv',
  'folds.csv.provenance.json',
  'report.html',
];

/**
 * `landform evaluate <dataset> --out DIR`: the cross-validated study (every feature set × model, inner-CV
 * hyperparameters inside each training fold) written as DIR/metrics.json.
 */
export function defineEvaluate(program: Command): Command {
  const command = program
    .command('evaluate')
    .description(
      'cross-validated accuracy of landscape, raw and combined features with each model, into DIR/metrics.json',
    )
    .argument(
      '<dataset>',
      'dataset the loader reads (points, distances, signal, image, table or diagram CSV / folder)',
    )
    .option('--folds <k>', 'outer stratified folds', '5')
    .option('--repeats <n>', 'repetitions of the outer split, each with its own shuffle', '1')
    .option('--out <dir>', 'folder to write metrics.json and report.html into (replaced as a whole)')
    .option('--no-report', 'write metrics.json only, without the HTML report')
    .option('--force', 'replace --out even if it is a non-empty folder landform did not make');
  addStudyOptions(command);
  return command
    .addHelpText(
      'after',
      `
Every feature set runs with every model (pca-svm, dense, forest): landscape (the landscape vectoriser), raw
(a baseline of the sample kind: pairwise-distance histogram and covariance spectrum for clouds, resampled
signals, downsampled images), combined (both). Asked for by name, three more vectorisations of the diagrams
compare with the landscape: betti (Betti curves), stats (persistence statistics and entropy), pimage
(persistence images). A table dataset runs only raw; a diagrams file only the diagram sets. Inside every
outer training fold an inner cross-validation (--inner-folds) chooses the model's hyperparameters and the
landscape depth and grid size (--depths × --grid-sizes); nothing is learned from the outer test fold.

The defaults keep the search small (3 inner folds, 4 landscape candidates, tried first with the model's
default hyperparameters, then each model candidate with the best landscape): F + M − 1 inner runs per fold.

The folder is written as a whole: metrics.json (with per-fold scores and, per model, each feature set's
paired difference against raw with a corrected resampled t interval), predictions.csv (out-of-fold
predictions) and folds.csv first (so a failing report loses no work), then report.html; files of an earlier
run in it are replaced, and a folder landform did not make is refused unless --force.

Cross-validated accuracy is an estimate: validate on independent data before it feeds a decision.

Example:
  landform evaluate lattice-clouds.csv --folds 5 --seed 1 --out results/lattice`,
    )
    .action(async (input: string, o: EvaluateCommandOptions) => {
      if (o.out === undefined) throw new UserError('no --out DIR given; name the folder for metrics.json');
      const folds = parseIntegerOption(o.folds, '--folds', 2, 1000);
      const repeats = parseIntegerOption(o.repeats, '--repeats', 1, 1000);
      checkOutputPath(o.out, [input], { folder: true, force: o.force === true, known: EVALUATION_FILES });
      const study = await parseStudy(input, o);
      const { checkStudy, runEvaluation } = await import('../../learn/evaluate.js');
      const options: EvaluationOptions = {
        ...study.options,
        folds,
        repeats,
        record: { input, ...study.options.record },
      };
      checkStudy(study.dataset, options);
      const progress = await startPhases(parseProgressMode(o.progress), o.quiet === true);
      try {
        const result = await runEvaluation(study.dataset, {
          ...options,
          onPhase: (phase, done, total) => progress.update(phase, done, total),
        });
        await writeEvaluation(o.out, result, o.report, async () => {
          progress.update('report', 0, 1);
          const { evaluationReportHtml } = await import('../../report/layout.js');
          const html = await evaluationReportHtml(input, study.dataset, result, study.options.landscape);
          progress.update('report', 1, 1);
          return html;
        });
      } finally {
        progress.stop();
      }
    });
}

/** One paired comparison as a line: `landscape − raw  pca-svm  +0.030 [-0.020, 0.080] 95% over 5 folds`. */
export function pairedLine(p: PairedComparison): string {
  const signed = (v: number): string => (v > 0 ? '+' : '') + v.toFixed(3);
  return (
    `${`${p.features} − ${p.baseline}`.padEnd(19)} ${p.model.padEnd(8)} ${signed(p.mean)} ` +
    `[${signed(p.lower)}, ${signed(p.upper)}]  ${Math.round(p.level * 100)}% interval over ${p.pairs} paired folds (corrected resampled t)`
  );
}

/**
 * Writes an evaluation folder under its lock: the folder with metrics.json is committed first (replacing any
 * earlier one as a whole, so no old report is left beside new metrics), the summary lines are printed, then
 * the report is rendered and added. If the report fails, metrics.json stays and the error says so.
 */
async function writeEvaluation(
  out: string,
  result: EvaluationResult,
  withReport: boolean,
  renderReport: () => Promise<string>,
): Promise<void> {
  const { formatMetricsJson } = await import('../../learn/evaluate.js');
  const { FOLDS_FILE, formatFoldsCsv, formatStudyPredictionsCsv, PREDICTIONS_FILE } = await import(
    '../../learn/study-files.js'
  );
  const metricsPath = join(out, 'metrics.json');
  const release = acquireOutputLock(out);
  try {
    const metrics = formatMetricsJson(result);
    const tables: Array<[string, string]> = [
      [PREDICTIONS_FILE, formatStudyPredictionsCsv(result)],
      [FOLDS_FILE, formatFoldsCsv(result)],
    ];
    const recorded = `${JSON.stringify(provenance('evaluate', result.options, result.seed), null, 2)}\n`;
    await writeFolderAtomic(
      out,
      (tmp) => {
        writeFileSync(join(tmp, 'metrics.json'), metrics);
        for (const [name, text] of tables) {
          writeFileSync(join(tmp, name), text);
          writeFileSync(join(tmp, provenancePath(name)), recorded);
        }
      },
      { command: 'evaluate', lock: false },
    );
    for (const r of result.results) {
      process.stdout.write(
        `${r.features.padEnd(10)} ${r.model.padEnd(8)} accuracy ${r.accuracy.mean.toFixed(3)} ± ${r.accuracy.std.toFixed(3)}` +
          `  balanced ${r.balancedAccuracy.mean.toFixed(3)}  macro-F1 ${r.macroF1.mean.toFixed(3)}\n`,
      );
    }
    for (const p of result.paired) process.stdout.write(`${pairedLine(p)}\n`);
    if (!withReport) {
      process.stdout.write(
        `wrote ${metricsPath}, ${PREDICTIONS_FILE} and ${FOLDS_FILE} beside it (cross-validated estimates; validate on independent data)\n`,
      );
      return;
    }
    let html: string;
    try {
      html = await renderReport();
    } catch (error) {
      if (error instanceof Error)
        error.message = `the report failed after ${metricsPath} was written (rerun with --no-report to skip it): ${error.message}`;
      throw error;
    }
    writeFileAtomic(join(out, 'report.html'), html);
    process.stdout.write(
      `wrote ${metricsPath}, ${PREDICTIONS_FILE}, ${FOLDS_FILE} and report.html beside it (cross-validated estimates; validate on independent data)\n`,
    );
  } finally {
    release();
  }
}
