import type { Command } from 'commander';
import { checkFeatureColumns } from '../../core/budgets.js';
import { describeInfinitePolicy } from '../../core/diagram.js';
import { UserError } from '../../core/errors.js';
import {
  recordedSampleShape,
  type SampleKind,
  type SampleShape,
  sampleShapeProblem,
} from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import {
  checkFeatureSet,
  FEATURE_SET_NAMES,
  type FeatureData,
  FeatureExtractor,
  type FeatureSetName,
} from '../../features/combined.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { parseShape } from '../../io/load.js';
import { checkFileOutput } from '../../io/output-guard.js';
import {
  parseChoiceOption,
  parseGridOption,
  parseInfiniteOption,
  parseIntegerOption,
  parseWorkersOption,
} from '../options.js';
import {
  addDiagramOptions,
  diagramRecord,
  diagramsForCommand,
  loadStudyDataset,
  type ParsedDiagramOptions,
  parseDiagramOptions,
  type StudyCommandOptions,
} from './evaluate.js';

type VectorizeCommandOptions = Pick<
  StudyCommandOptions,
  | 'kind'
  | 'degrees'
  | 'maxScale'
  | 'metric'
  | 'embed'
  | 'superlevel'
  | 'workers'
  | 'quiet'
  | 'infinite'
  | 'shape'
> & {
  features: string;
  depth: string;
  gridSize: string;
  grid?: string;
  bins: string;
  standardize?: boolean;
  model?: string;
  out?: string;
  shard?: string;
  force?: boolean;
  format?: string;
};

/**
 * `landform vectorize <dataset> --out FILE`: the feature vectors of every sample, with readable column names,
 * as CSV (`sample,label,<names>`) or NPY (+ sample and column sidecars). The vectoriser is fitted on all the
 * given samples, or taken from a saved model with --model (transform only).
 */
export function defineVectorize(program: Command): Command {
  const command = program
    .command('vectorize')
    .description(
      'feature vectors (landscape, raw, combined, betti, stats or pimage) of every sample, as CSV or NPY with named columns',
    )
    .argument('<dataset>', 'dataset the loader reads')
    .option('--features <set>', `feature set: ${FEATURE_SET_NAMES.join(', ')}`, 'landscape')
    .option('--depth <K>', 'landscape layers 1..K', '5')
    .option(
      '--grid-size <G>',
      'grid points per degree and layer; the range is learned from the samples',
      '50',
    )
    .option('--grid <START:STOP:COUNT>', 'explicit grid for every degree instead of a learned range')
    .option('--bins <n>', 'bins of the raw distance histogram', '32')
    .option('--standardize', 'centre and scale every feature (with the moments of the given samples)')
    .option(
      '--model <dir>',
      'take the fitted features of a saved model (transform only; other feature options are ignored)',
    )
    .option(
      '--out <file>',
      'file to write: .csv, or .npy with FILE.samples.csv and FILE.columns.csv beside it',
    )
    .option(
      '--shard <I/N>',
      "only shard I of N (from 1), written as FILE.shard-I-of-N; needs --model or a fixed --grid; default: from a Slurm array or Kubernetes indexed job, 'none' to turn off",
    )
    .option('--force', 'recompute a shard that is already finished')
    .option('--format <format>', 'csv, npy or arrow (default: from the extension of --out)');
  addDiagramOptions(command);
  return command
    .addHelpText(
      'after',
      `
Without --model the vectoriser is fitted on all the samples given (their range and scaling), which is right
for exporting features but not for estimating accuracy: use 'landform evaluate', which fits inside each fold.
Landscape columns read H<degree>/L<layer>/t=<scale>; raw columns D2/r=<distance>, eig/<k>, signal/i=<index>,
pixel/y=<row>,x=<column>.

Example:
  landform vectorize lattice-clouds.csv --depth 3 --grid-size 40 --out lattice-features.csv
  landform vectorize new-lattices.csv --model models/lattice --out new-features.npy`,
    )
    .action(async (input: string, o: VectorizeCommandOptions) => {
      if (o.out === undefined)
        throw new UserError('no --out FILE given; name the .csv or .npy file to write');
      const { chooseFormat, writeFeaturesOutput } = await import('../../io/outputs.js');
      const { planShard, resolveShard } = await import('../../io/shard.js');
      const format = chooseFormat(o.out, o.format, ['csv', 'npy', 'arrow']);
      checkFileOutput(o.out, [input, o.model], format);
      const shard = resolveShard(o.shard);
      let learnsFromSamples = false;
      let extractor: FeatureExtractor;
      let parsed: ParsedDiagramOptions;
      let fitted = false;
      let source: Record<string, unknown>;
      let modelShape: SampleShape | undefined;
      let landscapeColumns: number | undefined;
      if (o.model !== undefined) {
        const { loadModelFolder } = await import('../../learn/model-folder.js');
        const { manifest } = await loadModelFolder(o.model);
        const m = manifest as {
          extractor?: unknown;
          record?: {
            kind?: SampleKind;
            diagramOptions?: DiagramOptions | null;
            sampleShape?: SampleShape;
            columns?: string[] | null;
          };
        };
        modelShape = recordedSampleShape(m.record ?? {});
        if (!m.extractor)
          throw new UserError(
            'the model folder holds no feature extractor; train it again with landform train --save',
            { file: o.model },
          );
        extractor = FeatureExtractor.fromJSON(m.extractor);
        const diagramOptions = m.record?.diagramOptions ?? { degrees: [0, 1] };
        parsed = {
          degrees: diagramOptions.degrees,
          diagramOptions,
          ...(m.record?.kind ? { kind: m.record.kind } : {}),
          ...(o.shape !== undefined ? { shape: parseShape(o.shape) } : {}),
        };
        if (o.workers !== undefined) parsed.workers = parseWorkersOption(o.workers, o.quiet === true);
        fitted = true;
        source = { model: o.model };
      } else {
        parsed = parseDiagramOptions(o);
        const set = parseChoiceOption(o.features, '--features', FEATURE_SET_NAMES) as FeatureSetName;
        const depth = parseIntegerOption(o.depth, '--depth', 1, 1000);
        const gridSize = parseIntegerOption(o.gridSize, '--grid-size', 2, 100_000);
        const grid = o.grid === undefined ? undefined : parseGridOption(o.grid, '--grid');
        const infinite = parseInfiniteOption(o.infinite, '--infinite');
        const bins = parseIntegerOption(o.bins, '--bins', 1, 100_000);
        if (set === 'landscape' || set === 'combined') {
          landscapeColumns = parsed.degrees.length * depth * (grid ? grid.count : gridSize);
          checkFeatureColumns(landscapeColumns, COLUMN_OPTIONS);
        }
        extractor = new FeatureExtractor(set, {
          landscape: {
            degrees: parsed.degrees,
            depth,
            gridSize: grid ? grid.count : gridSize,
            infinite,
            standardize: o.standardize === true,
            ...(grid ? { range: { start: grid.start, stop: grid.stop } } : {}),
          },
          raw: { bins },
        });
        source = {
          features: set,
          depth,
          gridSize: grid ? grid.count : gridSize,
          grid: grid ?? 'learned',
          infinite: describeInfinitePolicy(infinite),
          bins,
          standardize: o.standardize === true,
        };
        learnsFromSamples = set !== 'landscape' || grid === undefined || o.standardize === true;
      }
      const dataset = await loadStudyDataset(input, parsed, o.quiet === true);
      checkFeatureSet(extractor.set, dataset.kind);
      if (landscapeColumns !== undefined)
        checkFeatureColumns(landscapeColumns, COLUMN_OPTIONS, dataset.samples.length);
      const shapeProblem = modelShape && sampleShapeProblem(modelShape, dataset);
      if (shapeProblem) throw new UserError(shapeProblem, { file: input });
      if (shard !== undefined && learnsFromSamples) {
        throw new UserError(
          '--shard needs features fixed in advance, the same in every shard: give --model models/NAME, or --features landscape with --grid START:STOP:COUNT and no --standardize',
        );
      }
      const plan = planShard({
        samples: dataset.samples,
        out: o.out,
        shard,
        output: 'table',
        settings: {
          input,
          kind: dataset.kind,
          samples: dataset.samples.length,
          ...source,
          diagrams: diagramRecord(dataset.kind, parsed.diagramOptions),
          ...(fitted ? { learned: extractor.toJSON() } : {}),
        },
        force: o.force === true,
        ...(dataset.columns ? { columns: dataset.columns } : {}),
      });
      if (plan.message !== undefined && o.quiet !== true) process.stderr.write(`${plan.message}\n`);
      if (plan.finished) return;
      if (plan.out !== o.out) checkFileOutput(plan.out, [input, o.model], format);
      const part = { ...dataset, samples: plan.samples };
      const diagrams =
        extractor.set === 'raw' ? undefined : await diagramsForCommand(part, parsed, o.quiet === true);
      const data: FeatureData = {
        samples: part.samples,
        ...(diagrams ? { diagrams } : {}),
        ...(dataset.columns ? { columns: dataset.columns } : {}),
      };
      if (!fitted) extractor.fit(data);
      const matrix = extractor.transform(data);
      const record = {
        input,
        kind: dataset.kind,
        samples: dataset.samples.length,
        ...source,
        fittedOn: fitted ? 'the saved model' : 'all the given samples',
        diagrams: diagramRecord(dataset.kind, parsed.diagramOptions),
        learned: extractor.toJSON(),
      };
      await writeFeaturesOutput(
        plan.out,
        {
          ids: part.samples.map((s) => s.id),
          labels: part.samples.map((s) => s.label),
          names: extractor.featureNames(),
          matrix,
        },
        plan.stamp(provenance('vectorize', record)),
        format,
      );
      process.stdout.write(
        `wrote ${plan.out}: ${matrix.rows} samples × ${matrix.cols} features (${extractor.set}; fitted on ${record.fittedOn})\n`,
      );
    });
}

/** The options that set the landscape columns, as the budget's message names them. */
const COLUMN_OPTIONS = '--degrees × --depth × --grid-size';
