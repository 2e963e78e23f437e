import type { Command } from 'commander';
import { UserError } from '../../core/errors.js';
import { sampleShapeOf } from '../../core/sample.js';
import type { FeatureData } from '../../features/combined.js';
import { checkOutputPath } from '../../io/output-guard.js';
import { diagramsForCommand } from '../dataset-input.js';
import { reportWritten } from '../finish.js';
import { parseProgressMode, startPhases } from '../progress.js';
import { addStudyOptions, type StudyFlags } from '../shared-options.js';
import { parseStudy } from './evaluate.js';

interface TrainCommandOptions extends StudyFlags {
  save?: string;
  force?: boolean;
}

/**
 * `landform train <dataset> --save models/NAME`: chooses hyperparameters (and the landscape depth and grid)
 * by inner cross-validation on all the data, fits on all of it, and saves a model folder.
 */
export function defineTrain(program: Command): Command {
  const command = program
    .command('train')
    .description(
      'fit one feature set and model on all the samples (hyperparameters by inner cross-validation) and save it',
    )
    .argument('<dataset>', 'labelled dataset the loader reads')
    .option('--save <dir>', 'model folder to write, e.g. models/lattice (replaced as a whole)')
    .option('--force', 'replace --save even if it is a non-empty folder landform did not make');
  addStudyOptions(command, true);
  return command
    .addHelpText(
      'after',
      `
The folder is written whole and swapped in only when complete; an earlier model there is replaced, and a
non-empty folder landform did not make is refused unless --force. It holds manifest.json (options, the learned grid, classes, versions, checksums) and the classifier.
'landform predict DIR <dataset>' labels new samples with it; 'landform vectorize --from-model DIR' exports the
features it computes. Estimate accuracy with 'landform evaluate' first: a saved model carries no guarantee.

Example:
  npx landform train datasets/lattice.csv --feature-set landscape --model pca-svm --save my-lattice-model`,
    )
    .action(async (input: string, o: TrainCommandOptions) => {
      if (o.save === undefined)
        throw new UserError('no --save DIR given; name the model folder to write, e.g. models/NAME');
      const { savedModelNames } = await import('../../learn/model-folder.js');
      checkOutputPath(o.save, [input], {
        folder: true,
        force: o.force === true,
        option: '--save',
        known: savedModelNames(o.save),
      });
      const study = await parseStudy(input, o, true);
      const { dataset, parsed } = study;
      const labels = dataset.samples.map((s) => s.label);
      const unlabelled = dataset.samples.find((s) => s.label === '');
      if (unlabelled)
        throw new UserError(`sample '${unlabelled.id}' has no label; training needs every label`, {
          file: input,
        });
      const features = study.featureSets[0];
      const diagrams =
        features === 'raw'
          ? undefined
          : await diagramsForCommand(dataset, parsed, o.quiet === true, parseProgressMode(o.progress));
      const data: FeatureData = {
        samples: dataset.samples,
        ...(diagrams ? { diagrams } : {}),
        ...(dataset.columns ? { columns: dataset.columns } : {}),
      };
      const { Pipeline } = await import('../../learn/pipeline.js');
      const { saveModelFolder } = await import('../../learn/model-folder.js');
      const options = study.options;
      const pipeline = new Pipeline({
        features,
        model: study.models[0],
        featureOptions: { ...(options.landscape ? { landscape: options.landscape } : {}) },
        ...(options.landscapeCandidates ? { landscapeCandidates: options.landscapeCandidates } : {}),
        ...(options.innerFolds !== undefined ? { innerFolds: options.innerFolds } : {}),
        ...(options.seed !== undefined ? { seed: options.seed } : {}),
      });
      try {
        const { defaultModelFactory, withFixed } = await import('../../learn/evaluate.js');
        const progress = await startPhases(parseProgressMode(o.progress), o.quiet === true);
        try {
          await pipeline.fit(
            data,
            labels,
            withFixed(await defaultModelFactory(), options.fixed),
            (phase, done, total) => progress.update(phase, done, total),
          );
        } finally {
          progress.stop();
        }
        const { manifest, files } = await pipeline.toFolder({
          ...options.record,
          diagramOptions: dataset.kind === 'diagrams' ? null : parsed.diagramOptions,
          columns: dataset.columns ?? null,
          // What predict checks new samples against (the dimension of points, the axes of images, columns).
          sampleShape: sampleShapeOf(dataset),
        });
        await saveModelFolder(o.save, { ...manifest }, files);
        const chosen = Object.entries(pipeline.chosen())
          .map(([k, v]) => `${k}=${v}`)
          .join(' ');
        process.stdout.write(
          `trained ${features} + ${study.models[0]} on ${dataset.samples.length} samples (${manifest.classes.length} classes); chosen ${chosen}\n`,
        );
        reportWritten(
          'train',
          o.save,
          `model folder of ${features} + ${study.models[0]}`,
          dataset.samples.length,
          o.quiet,
        );
      } finally {
        pipeline.dispose();
      }
    });
}
