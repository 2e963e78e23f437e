import type { Command } from 'commander';
import { UserError } from '../../core/errors.js';
import {
  recordedSampleShape,
  SAMPLE_KINDS,
  type SampleKind,
  type SampleShape,
  sampleShapeProblem,
} from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import type { FeatureData } from '../../features/combined.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { csvField, csvNumber } from '../../io/csv.js';
import { parseShape } from '../../io/load.js';
import { checkFileOutput } from '../../io/output-guard.js';
import { writeWithProvenance } from '../../io/provenance-file.js';
import { diagramsForCommand, loadStudyDataset } from '../dataset-input.js';
import { reportWritten } from '../finish.js';
import { parseChoiceOption, parseWorkersOption } from '../options.js';
import { MAX_WORKERS } from '../shared-options.js';

interface PredictCommandOptions {
  kind?: string;
  shape?: string;
  out?: string;
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

/** `landform predict models/NAME <dataset>`: labels new samples with a saved model. */
export function definePredict(program: Command): Command {
  return program
    .command('predict')
    .description('label new samples with a model saved by train')
    .argument('<model>', 'model folder written by landform train --save')
    .argument('<dataset>', 'samples of the kind the model was trained on (labels may be empty)')
    .option('--out <file>', 'predictions CSV to write (default: print to standard output)')
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

Example:
  npx landform predict models/lattice datasets/lattice.csv --out predictions.csv   # the shipped samples stand in for new ones`,
    )
    .action(async (modelDir: string, input: string, o: PredictCommandOptions) => {
      if (o.out !== undefined) checkFileOutput(o.out, [input, modelDir]);
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
        if (o.out === undefined) process.stdout.write(text);
        else {
          writeWithProvenance(
            o.out,
            text,
            provenance('predict', { model: modelDir, input, samples: dataset.samples.length, classes }),
          );
          reportWritten('predict', o.out, 'predictions', dataset.samples.length, o.quiet);
        }
      } finally {
        pipeline.dispose();
      }
    });
}
