import { type Command, Option } from 'commander';
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
import { diagramsForCommand, loadStudyDataset } from '../dataset-input.js';
import { reportWritten } from '../finish.js';
import {
  parseChoiceOption,
  parseGridOption,
  parseIntegerOption,
  parseWorkersOption,
  renamedOption,
} from '../options.js';
import {
  addDiagramOptions,
  addLandscapeOptions,
  type DiagramFlags,
  diagramRecord,
  type LandscapeFlags,
  MAX_WORKERS,
  type ParsedDiagramOptions,
  parseDiagramOptions,
  parseLandscapeOptions,
} from '../shared-options.js';
import { refuseBinaryOnTerminal } from '../stdout.js';

interface VectorizeCommandOptions extends DiagramFlags, LandscapeFlags {
  featureSet?: string;
  /** The old name of --feature-set. */
  features?: string;
  grid?: string;
  bins: string;
  standardize?: boolean;
  fromModel?: string;
  /** The old name of --from-model. */
  model?: string;
  out?: string;
  shard?: string;
  force?: boolean;
  format?: string;
}

/** Grid points per degree and layer when --grid-size is not given. */
export const VECTORIZE_GRID_SIZE = 50;

/**
 * `landform vectorize <dataset> --out FILE`: the feature vectors of every sample, with readable column names,
 * as CSV (`sample,label,<names>`) or NPY (+ sample and column sidecars). The vectoriser is fitted on all the
 * given samples, or taken from a saved model with --model (transform only).
 */
export function defineVectorize(program: Command): Command {
  const command = program
    .command('vectorize')
    .description(
      'feature vectors (landscape, raw, combined, betti, stats or pimage) of every sample, as CSV, NPY or Arrow with named columns',
    )
    .argument('<dataset>', 'dataset the loader reads')
    .option('--feature-set <name>', `feature set: ${FEATURE_SET_NAMES.join(', ')}`, 'landscape')
    .addOption(new Option('--features <name>').hideHelp());
  addLandscapeOptions(command, {
    depth: 5,
    gridSize: VECTORIZE_GRID_SIZE,
    gridHelp: 'grid points per degree and layer; the range is learned from the samples',
  });
  command
    .option('--grid <START:STOP:COUNT>', 'explicit grid for every degree instead of a learned range')
    .option('--bins <n>', 'bins of the raw distance histogram', '32')
    .option('--standardize', 'centre and scale every feature (with the moments of the given samples)')
    .option(
      '--from-model <dir>',
      'take the fitted features of a model saved by train (transform only; other feature options are ignored)',
    )
    .addOption(new Option('--model <dir>').hideHelp())
    .option(
      '--out <file>',
      'file to write: .csv, .arrow, or .npy with FILE.samples.csv and FILE.columns.csv beside it (default: the CSV on standard output)',
    )
    .option(
      '--shard <I/N>',
      "only shard I of N (from 1), written as FILE.shard-I-of-N; needs --out, and --from-model or a fixed --grid; default: from a Slurm array or Kubernetes indexed job, 'none' to turn off",
    )
    .option('--force', 'recompute a shard that is already finished')
    .option(
      '--format <format>',
      'csv, npy or arrow (default: from the extension of --out; csv on standard output)',
    );
  addDiagramOptions(command);
  return command
    .addHelpText(
      'after',
      `
Without --from-model the vectoriser is fitted on all the samples given (their range and scaling), which is
right for exporting features but not for estimating accuracy: use 'landform evaluate', which fits inside each
fold. Landscape columns read H<degree>/L<layer>/t=<scale>; raw columns D2/r=<distance>, eig/<k>,
signal/i=<index>, pixel/y=<row>,x=<column>. Without --out the CSV goes to standard output (no sidecars);
NPY needs --out, Arrow is refused on a terminal.

Examples:
  npx landform vectorize datasets/lattice.csv --depth 3 --grid-size 40 --out lattice-features.csv
  npx landform vectorize datasets/lattice.csv --from-model models/lattice --out lattice-features.npy`,
    )
    .action(async (input: string, o: VectorizeCommandOptions) => {
      const { chooseFormat, writeFeaturesOutput } = await import('../../io/outputs.js');
      const { planShard, resolveShard } = await import('../../io/shard.js');
      const modelDir = renamedOption(o, {
        key: 'fromModel',
        flag: '--from-model',
        oldKey: 'model',
        oldFlag: '--model',
      });
      const format =
        o.out === undefined
          ? parseChoiceOption(o.format ?? 'csv', '--format', ['csv', 'npy', 'arrow'] as const)
          : chooseFormat(o.out, o.format, ['csv', 'npy', 'arrow']);
      if (o.out === undefined) {
        if (format === 'npy')
          throw new UserError('NPY needs --out FILE: its sample and column lists are written beside it');
        if (format === 'arrow') refuseBinaryOnTerminal('Arrow');
        if (o.shard !== undefined && o.shard !== 'none')
          throw new UserError(
            '--shard needs --out FILE: each shard is written beside it as FILE.shard-I-of-N',
          );
      } else checkFileOutput(o.out, [input, modelDir], format);
      const shard = o.out === undefined ? undefined : resolveShard(o.shard);
      let learnsFromSamples = false;
      let extractor: FeatureExtractor;
      let parsed: Omit<ParsedDiagramOptions, 'choice'>;
      let fitted = false;
      let source: Record<string, unknown>;
      let modelShape: SampleShape | undefined;
      let landscapeColumns: number | undefined;
      if (modelDir !== undefined) {
        const { loadModelFolder } = await import('../../learn/model-folder.js');
        const { manifest } = await loadModelFolder(modelDir);
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
            { file: modelDir },
          );
        extractor = FeatureExtractor.fromJSON(m.extractor);
        const diagramOptions = m.record?.diagramOptions ?? { degrees: [0, 1] };
        parsed = {
          degrees: diagramOptions.degrees,
          diagramOptions,
          ...(m.record?.kind ? { kind: m.record.kind } : {}),
          ...(o.shape !== undefined ? { shape: parseShape(o.shape) } : {}),
        };
        if (o.workers !== undefined)
          parsed.workers = parseWorkersOption(o.workers, o.quiet === true, MAX_WORKERS);
        fitted = true;
        source = { model: modelDir };
      } else {
        parsed = parseDiagramOptions(o);
        const setText = renamedOption(o, {
          key: 'featureSet',
          flag: '--feature-set',
          oldKey: 'features',
          oldFlag: '--features',
        });
        const set = parseChoiceOption(
          setText ?? 'landscape',
          '--feature-set',
          FEATURE_SET_NAMES,
        ) as FeatureSetName;
        const landscape = parseLandscapeOptions(o, { gridSize: VECTORIZE_GRID_SIZE });
        const { depth, gridSize, infinite } = landscape;
        const grid = o.grid === undefined ? undefined : parseGridOption(o.grid, '--grid');
        if (grid !== undefined && landscape.gridSizeGiven)
          throw new UserError('--grid START:STOP:COUNT sets the grid size itself; drop --grid-size');
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
      checkFeatureSet(extractor.set, dataset.kind, '--feature-set');
      if (landscapeColumns !== undefined)
        checkFeatureColumns(landscapeColumns, COLUMN_OPTIONS, dataset.samples.length);
      const shapeProblem = modelShape && sampleShapeProblem(modelShape, dataset);
      if (shapeProblem) throw new UserError(shapeProblem, { file: input });
      if (shard !== undefined && learnsFromSamples) {
        throw new UserError(
          '--shard needs features fixed in advance, the same in every shard: give --from-model models/NAME, or --feature-set landscape with --grid START:STOP:COUNT and no --standardize',
        );
      }
      const plan = planShard({
        samples: dataset.samples,
        out: o.out ?? 'features.csv',
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
      if (o.out !== undefined && plan.out !== o.out) checkFileOutput(plan.out, [input, modelDir], format);
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
      const table = {
        ids: part.samples.map((s) => s.id),
        labels: part.samples.map((s) => s.label),
        names: extractor.featureNames(),
        matrix,
      };
      const made = plan.stamp(provenance('vectorize', record));
      if (o.out === undefined) {
        if (format === 'arrow') {
          const { formatFeatureArrow } = await import('../../io/arrow.js');
          process.stdout.write(await formatFeatureArrow(table, made));
        } else {
          const { formatFeatureCsv } = await import('../../io/feature-table.js');
          process.stdout.write(formatFeatureCsv(table));
        }
        return;
      }
      await writeFeaturesOutput(plan.out, table, made, format);
      reportWritten(
        'vectorize',
        plan.out,
        `${matrix.cols} ${extractor.set} features fitted on ${record.fittedOn}`,
        matrix.rows,
        o.quiet,
      );
    });
}

/** The options that set the landscape columns, as the budget's message names them. */
const COLUMN_OPTIONS = '--degrees × --depth × --grid-size';
