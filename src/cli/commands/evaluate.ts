import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import { checkFeatureColumns } from '../../core/budgets.js';
import { UserError } from '../../core/errors.js';
import type { Dataset } from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import { checkFeatureSet, type FeatureSetName, featureSetsFor } from '../../features/combined.js';
import type { LandscapeVectorizerOptions } from '../../features/landscape-vectorizer.js';
import { acquireOutputLock, writeFileAtomic, writeFolderAtomic } from '../../io/atomic.js';
import { checkOutputPath } from '../../io/output-guard.js';
import { provenancePath } from '../../io/provenance-file.js';
import type { ModelName } from '../../learn/classifier.js';
import type { EvaluationOptions, EvaluationResult } from '../../learn/evaluate.js';
import type { PairedComparison } from '../../learn/paired.js';
import { loadStudyDataset } from '../dataset-input.js';
import { reportWritten } from '../finish.js';
import { parseIntegerOption } from '../options.js';
import { parseProgressMode, startPhases } from '../progress.js';
import {
  addStudyOptions,
  diagramRecord,
  type ParsedDiagramOptions,
  parseStudyOptions,
  STUDY_COLUMN_OPTIONS,
  type StudyFlags,
  usesLandscape,
} from '../shared-options.js';

/** What a study command parsed: the dataset and the library options (without folds). */
export interface ParsedStudy {
  dataset: Dataset;
  options: EvaluationOptions;
  featureSets: FeatureSetName[];
  models: ModelName[];
  parsed: ParsedDiagramOptions;
}

/** Loads the dataset and turns the shared study options (src/cli/shared-options.ts) into the library's. */
export async function parseStudy(input: string, o: StudyFlags, single = false): Promise<ParsedStudy> {
  const study = parseStudyOptions(o, single);
  parseProgressMode(o.progress);
  const parsed = study.diagrams;
  const dataset = await loadStudyDataset(input, parsed, o.quiet === true);
  const featureSets =
    study.featureSets ?? (single ? featureSetsFor(dataset.kind).slice(0, 1) : featureSetsFor(dataset.kind));
  for (const set of featureSets)
    checkFeatureSet(set, dataset.kind, single ? '--feature-set' : '--feature-sets');
  if (usesLandscape(featureSets))
    checkFeatureColumns(study.landscapeColumns, STUDY_COLUMN_OPTIONS, dataset.samples.length);
  const landscape: LandscapeVectorizerOptions = { degrees: parsed.degrees, infinite: study.infinite };
  const options: EvaluationOptions = {
    featureSets,
    models: study.models,
    seed: study.seed,
    innerFolds: study.innerFolds,
    landscape,
    landscapeCandidates: study.landscapeCandidates,
    diagramOptions: parsed.diagramOptions,
    ...(parsed.workers !== undefined ? { workers: parsed.workers } : {}),
    ...(Object.keys(study.model.fixed).length > 0 ? { fixed: study.model.fixed } : {}),
    record: {
      kind: dataset.kind,
      ...(parsed.shape !== undefined ? { shape: parsed.shape } : {}),
      samples: dataset.samples.length,
      diagrams: diagramRecord(dataset.kind, parsed.diagramOptions),
      modelOptions: study.model.record,
    },
  };
  return { dataset, options, featureSets, models: study.models, parsed };
}

interface EvaluateCommandOptions extends StudyFlags {
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
Choose sets and models with --feature-sets and --models (lists; train takes one of each).

The defaults keep the search small (3 inner folds, 4 landscape candidates, tried first with the model's
default hyperparameters, then each model candidate with the best landscape): F + M − 1 inner runs per fold.

The folder is written as a whole: metrics.json (with per-fold scores and, per model, each feature set's
paired difference against raw with a corrected resampled t interval), predictions.csv (out-of-fold
predictions) and folds.csv first (so a failing report loses no work), then report.html; files of an earlier
run in it are replaced, and a folder landform did not make is refused unless --force.

Cross-validated accuracy is an estimate: validate on independent data before it feeds a decision.

Examples:
  npx landform evaluate datasets/lattice.csv --folds 5 --seed 1 --out results/lattice
  npx landform evaluate datasets/pump.csv --embed 4:8:2 --models pca-svm --feature-sets landscape,raw --out results/pump`,
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
        await writeEvaluation(
          o.out,
          result,
          o.report,
          async () => {
            progress.update('report', 0, 1);
            const { evaluationReportHtml } = await import('../../report/layout.js');
            const html = await evaluationReportHtml(input, study.dataset, result, study.options.landscape);
            progress.update('report', 1, 1);
            return html;
          },
          o.quiet,
        );
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

/** The caution printed under the accuracy table. */
const CAUTION =
  'These are cross-validated estimates: validate on independent data before a result feeds a decision.\n';

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
  quiet?: boolean,
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
    process.stdout.write(CAUTION);
    if (!withReport) {
      reportWritten(
        'evaluate',
        out,
        `metrics.json + ${PREDICTIONS_FILE} + ${FOLDS_FILE}`,
        result.sampleIds.length,
        quiet,
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
    reportWritten(
      'evaluate',
      out,
      `metrics.json + ${PREDICTIONS_FILE} + ${FOLDS_FILE} + report.html`,
      result.sampleIds.length,
      quiet,
    );
  } finally {
    release();
  }
}
