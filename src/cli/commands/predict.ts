import { resolve } from 'node:path';
import type { Command } from 'commander';
import { UserError } from '../../core/errors.js';
import {
  recordedSampleShape,
  SAMPLE_KINDS,
  type SampleKind,
  type SampleShape,
  sampleShapeProblem,
} from '../../core/sample.js';
import { shown } from '../../core/text.js';
import { provenance } from '../../core/version.js';
import type { FeatureData } from '../../features/combined.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { writeFileAtomic } from '../../io/atomic.js';
import { csvField, csvNumber } from '../../io/csv.js';
import { formatJsonOutput } from '../../io/json-output.js';
import { parseShape } from '../../io/load.js';
import { checkFileOutput, checkOutputPath } from '../../io/output-guard.js';
import { provenancePath, writeWithProvenance } from '../../io/provenance-file.js';
import type { LabelledScores } from '../../learn/metrics.js';
import { diagramsForCommand, loadStudyDataset } from '../dataset-input.js';
import { reportWritten } from '../finish.js';
import { parseChoiceOption, parseWorkersOption } from '../options.js';
import { MAX_WORKERS } from '../shared-options.js';

interface PredictCommandOptions {
  kind?: string;
  shape?: string;
  out?: string;
  scores?: string;
  workers?: string;
  quiet?: boolean;
}

/** The predictions CSV: `sample,predicted,score:<class>…` with one probability column per class. */
export function formatPredictionsCsv(
  ids: readonly string[],
  predicted: readonly string[],
  classes: readonly string[],
  scores: { rows: number; cols: number; data: Float64Array },
): string {
  const lines = [['sample', 'predicted', ...classes.map((c) => `score:${c}`)].map(csvField).join(',')];
  for (let i = 0; i < ids.length; i++) {
    let line = `${csvField(ids[i])},${csvField(predicted[i])}`;
    for (let k = 0; k < scores.cols; k++) line += `,${csvNumber(scores.data[i * scores.cols + k])}`;
    lines.push(line);
  }
  return lines.join('\n') + '\n';
}

/** What `--scores` holds beside the provenance: counts, accuracy and the confusion matrix, null when unscored. */
export function scoresBody(
  s: LabelledScores,
  samples: number,
  model: { folder: string; features: string; model: string },
): Record<string, unknown> {
  const value = (v: number): number | null => (Number.isFinite(v) ? v : null);
  return {
    model: { ...model, classes: s.classes },
    samples,
    scored: s.scored,
    correct: s.correct,
    accuracy: value(s.accuracy),
    balancedAccuracy: value(s.balancedAccuracy),
    macroF1: value(s.macroF1),
    confusion: { rows: 'true', columns: 'predicted', classes: s.classes, counts: s.confusion },
    unknownLabels: s.unknown.map((u) => ({
      label: u.label,
      count: u.count,
      predicted: Object.fromEntries(s.classes.map((c, k) => [c, u.predicted[k]])),
    })),
    unlabelled: s.unlabelled,
  };
}

/**
 * The summary printed on standard error after the predictions: nothing when no sample has a label; else the
 * accuracy over the samples whose label is a class of the model and their confusion matrix, one line for
 * labels the model does not know, and one for samples without a label among labelled ones.
 */
export function scoreLines(
  s: LabelledScores,
  confusionText: (classes: readonly string[], counts: number[][]) => string[],
): string[] {
  const unknown = s.unknown.reduce((n, u) => n + u.count, 0);
  if (s.scored === 0 && unknown === 0) return [];
  const lines: string[] = [];
  const plural = (n: number, word: string): string => `${n} ${word}${n === 1 ? '' : 's'}`;
  if (s.scored > 0) {
    lines.push(
      `landform: ${plural(s.scored, 'labelled sample')} scored: accuracy ${s.accuracy.toFixed(3)} (${s.correct} correct), ` +
        `balanced ${s.balancedAccuracy.toFixed(3)}, macro-F1 ${s.macroF1.toFixed(3)} — an estimate from these samples only`,
    );
    lines.push(...confusionText(s.classes, s.confusion));
  } else lines.push('landform: no sample has a label the model knows; no accuracy');
  if (unknown > 0) {
    const names = s.unknown.map((u) => `${shown(u.label)} ${u.count}`);
    const listed = names.length > 5 ? `${names.slice(0, 5).join(', ')}, …` : names.join(', ');
    lines.push(
      `landform: ${unknown === 1 ? '1 sample has a label' : `${unknown} samples have labels`} the model does not know (${listed}); not scored`,
    );
  }
  if (s.unlabelled > 0) lines.push(`landform: ${plural(s.unlabelled, 'sample')} without a label; not scored`);
  return lines;
}

/** `landform predict models/NAME <dataset>`: labels new samples with a saved model. */
export function definePredict(program: Command): Command {
  return program
    .command('predict')
    .description('label new samples with a model saved by train')
    .argument('<model>', 'model folder written by landform train --save')
    .argument('<dataset>', 'samples of the kind the model was trained on (labels may be empty)')
    .option('--out <file>', 'predictions CSV to write (default: print to standard output)')
    .option('--scores <file>', 'labelled samples: write accuracy and the confusion matrix to this JSON file')
    .option(
      '--kind <kind>',
      'sample kind of the input (default: detected; must be the kind the model was trained on)',
    )
    .option('--shape <RxC>', 'image table CSV: the shape of every image, ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS')
    .option('--workers <n>', 'worker threads for the diagrams (default: every core)')
    .addHelpText(
      'after',
      `
Output: sample,predicted,score:<class>… — one probability column per class of the model. The samples are
treated exactly as in training (same diagram options, grid and scaling, read from the model's manifest).
When samples carry labels, the accuracy and the confusion matrix (rows true, columns predicted) follow on
standard error (not with --quiet), and in --scores FILE as JSON; labels the model does not know are counted
apart, empty labels (samples to predict) are not scored. Accuracy on a few labelled samples is an estimate.

Example:
  npx landform predict models/lattice datasets/lattice.csv --out predictions.csv   # the shipped samples stand in for new ones`,
    )
    .action(async (modelDir: string, input: string, o: PredictCommandOptions) => {
      if (o.out !== undefined) checkFileOutput(o.out, [input, modelDir]);
      if (o.scores !== undefined) {
        checkOutputPath(o.scores, [input, modelDir], { option: '--scores' });
        if (
          o.out !== undefined &&
          [o.out, provenancePath(o.out)].some((f) => resolve(f) === resolve(o.scores!))
        )
          throw new UserError('--scores names the predictions file or its sidecar; give another file', {
            file: o.scores,
          });
      }
      const workers =
        o.workers === undefined ? undefined : parseWorkersOption(o.workers, o.quiet === true, MAX_WORKERS);
      const { loadModelFolder } = await import('../../learn/model-folder.js');
      const { Pipeline } = await import('../../learn/pipeline.js');
      const { manifest, files } = await loadModelFolder(modelDir);
      const pipeline = await Pipeline.fromFolder(manifest, files, modelDir);
      try {
        const record = ((manifest as { record?: Record<string, unknown> }).record ?? {}) as {
          kind?: SampleKind;
          diagramOptions?: DiagramOptions | null;
          sampleShape?: SampleShape;
          columns?: string[] | null;
        };
        if (!record.kind)
          throw new UserError(
            "the model's manifest does not say which sample kind it takes; train it again",
            { file: modelDir },
          );
        const diagramOptions = record.diagramOptions ?? { degrees: [0, 1] };
        const parsed = {
          degrees: diagramOptions.degrees,
          diagramOptions,
          ...(o.kind !== undefined ? { kind: parseChoiceOption(o.kind, '--kind', SAMPLE_KINDS) } : {}),
          ...(o.shape !== undefined ? { shape: parseShape(o.shape) } : {}),
          ...(workers !== undefined ? { workers } : {}),
        };
        const dataset = await loadStudyDataset(input, parsed, o.quiet === true);
        if (dataset.kind !== record.kind) {
          throw new UserError(
            `is a ${dataset.kind} dataset, but the model was trained on ${record.kind} samples; give ${record.kind} samples`,
            { file: input },
          );
        }
        const shapeProblem = sampleShapeProblem(recordedSampleShape(record), dataset);
        if (shapeProblem !== undefined) throw new UserError(shapeProblem, { file: input });
        const diagrams =
          pipeline.features === 'raw'
            ? undefined
            : await diagramsForCommand(dataset, parsed, o.quiet === true);
        const data: FeatureData = {
          samples: dataset.samples,
          ...(diagrams ? { diagrams } : {}),
          ...(dataset.columns ? { columns: dataset.columns } : {}),
        };
        const { predicted, scores, classes } = await pipeline.predict(data);
        const text = formatPredictionsCsv(
          dataset.samples.map((s) => s.id),
          predicted,
          classes,
          scores,
        );
        const { formatConfusionText, scoreLabels } = await import('../../learn/metrics.js');
        const scored = scoreLabels(
          dataset.samples.map((s) => s.label),
          predicted,
          classes,
        );
        const seed = typeof manifest.seed === 'number' ? manifest.seed : undefined;
        const options = {
          model: modelDir,
          input,
          ...(o.out !== undefined ? { out: o.out } : {}),
          ...(o.scores !== undefined ? { scores: o.scores } : {}),
          samples: dataset.samples.length,
          classes,
        };
        const recorded = provenance('predict', options, seed);
        const scoresFile =
          o.scores === undefined
            ? undefined
            : {
                path: o.scores,
                data: formatJsonOutput(
                  scoresBody(scored, dataset.samples.length, {
                    folder: modelDir,
                    features: pipeline.features,
                    model: pipeline.model,
                  }),
                  recorded,
                ),
              };
        // The scores first, so that the completion line stays the last line on standard error.
        if (o.quiet !== true)
          for (const line of scoreLines(scored, formatConfusionText)) process.stderr.write(`${line}\n`);
        if (o.out === undefined) {
          process.stdout.write(text);
          if (scoresFile) writeFileAtomic(scoresFile.path, scoresFile.data);
        } else {
          writeWithProvenance(o.out, text, recorded, scoresFile ? [scoresFile] : []);
          reportWritten('predict', o.out, 'predictions', dataset.samples.length, o.quiet);
        }
      } finally {
        pipeline.dispose();
      }
    });
}
