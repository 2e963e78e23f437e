import { availableParallelism } from 'node:os';
import type { Command } from 'commander';
import { UserError } from '../../core/errors.js';
import type { SampleKind } from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { METRICS, type Metric } from '../../homology/metric.js';
import { computeDiagramsParallel, startDiagramWorkers } from '../../homology/parallel.js';
import type { DelayEmbedding } from '../../homology/signal.js';
import { expectKind, loadDataset, parseKind, parseShape } from '../../io/load.js';
import { checkFileOutput } from '../../io/output-guard.js';
import { noteOption } from '../dataset-input.js';
import { addFiltrationOptions, filtrationRecord, parseFiltrationOptions } from '../filtration-options.js';
import {
  parseChoiceOption,
  parseDegreesOption,
  parseIntegerOption,
  parseNumberOption,
  parseWorkersOption,
} from '../options.js';
import { startProgress } from '../progress.js';

interface DiagramsCommandOptions {
  kind?: string;
  degrees: string;
  maxScale?: string;
  metric: string;
  embed?: string;
  superlevel?: boolean;
  workers?: string;
  out?: string;
  quiet?: boolean;
  filtration?: string;
  subsample?: string;
  threshold?: string;
  shape?: string;
  shard?: string;
  force?: boolean;
  format?: string;
  timings?: boolean;
}

const INPUT_KINDS = ['points', 'distances', 'signal', 'image'] as const;

/** `DIM:DELAY[:STRIDE]` → a delay embedding. */
export function parseEmbedOption(text: string, option = '--embed'): DelayEmbedding {
  const parts = text.split(':');
  if (parts.length < 2 || parts.length > 3) {
    throw new UserError(
      `${option} '${text}' must look like DIM:DELAY or DIM:DELAY:STRIDE, e.g. 3:4 or 3:4:2`,
    );
  }
  const dimension = parseIntegerOption(parts[0], `${option} DIM`, 1, 1000);
  const delay = parseIntegerOption(parts[1], `${option} DELAY`, 1, 1_000_000);
  const stride =
    parts.length === 3 ? parseIntegerOption(parts[2], `${option} STRIDE`, 1, 1_000_000) : undefined;
  return stride === undefined ? { dimension, delay } : { dimension, delay, stride };
}

/**
 * `landform diagrams <input> --out FILE`: the persistence diagrams of every sample of a dataset, as the
 * diagram CSV with a provenance sidecar. Samples run on worker threads, one sample per task.
 */
export function defineDiagrams(program: Command): Command {
  const command = program.command('diagrams');
  addFiltrationOptions(command);
  return command
    .description(
      'persistence diagrams of every sample: Vietoris–Rips for clouds and matrices, cubical for images, sublevel sets or delay embeddings for signals',
    )
    .argument(
      '<input>',
      'dataset: points CSV (sample,label,x,y,…), long signal CSV (sample,label,value), or any format the loader reads',
    )
    .option('--kind <kind>', `sample kind: ${INPUT_KINDS.join(', ')} (default: detected from the file)`)
    .option(
      '--shape <RxC>',
      'image table CSV (sample,label, then the pixels row by row): the shape of every image, e.g. 28x28 or DEPTHxROWSxCOLUMNS',
    )
    .option('--degrees <list>', 'homology degrees, from 0, 1, 2', '0,1')
    .option('--max-scale <r>', 'largest Rips scale kept; classes alive there get death inf (default: none)')
    .option('--metric <name>', `distance between points: ${METRICS.join(', ')}`, 'euclidean')
    .option('--embed <DIM:DELAY[:STRIDE]>', 'turn each signal into a cloud of delay windows before Rips')
    .option(
      '--superlevel',
      'images and signals: superlevel sets (bright first), reported on the negated scale',
    )
    .option('--workers <n>', 'threads computing samples: this one and n − 1 workers (default: every core)')
    .option(
      '--shard <I/N>',
      "only shard I of N (from 1), written as FILE.shard-I-of-N; default: from a Slurm array or Kubernetes indexed job, 'none' to turn off",
    )
    .option('--force', 'recompute a shard that is already finished')
    .option('--format <format>', 'csv or arrow (default: from the extension of --out)')
    .option('--out <file>', 'the diagram CSV to write (a FILE.provenance.json sidecar is written beside it)')
    .option('--timings', 'print the time of each stage on stderr: start-up, reading, computing, writing')
    .addHelpText(
      'after',
      `
Output: sample,label,degree,birth,death — one row per pair with death > birth; essential classes have
death inf. With several filtrations (--filtration a,b,…) a filtration column follows label and rows go
filtration by filtration, in the order given. Superlevel diagrams are the sublevel diagrams of −values: a bright class born at 200 that dies
at 50 reads birth −200, death −50, so death ≥ birth holds in every file.

Example:
  landform diagrams lattice-clouds.csv --degrees 0,1 --out lattice-diagrams.csv
  landform diagrams pump-vibration.csv --embed 3:5 --degrees 0,1 --max-scale 2 --out pump-diagrams.csv
  landform diagrams parts.csv --shape 28x28 --filtration heights:8,radials:3,distance --out parts-diagrams.csv`,
    )
    .action(async (input: string, options: DiagramsCommandOptions) => {
      // Milliseconds since the process started, at the end of each stage.
      const started = performance.now();
      if (options.out === undefined)
        throw new UserError('no --out FILE given; name the diagram CSV to write');
      checkFileOutput(options.out, [input]);
      const degrees = parseDegreesOption(options.degrees, '--degrees', 2);
      const metric = parseChoiceOption(options.metric, '--metric', METRICS) as Metric;
      const maxScale =
        options.maxScale === undefined
          ? undefined
          : parseNumberOption(options.maxScale, '--max-scale', { positive: true });
      const embed = options.embed === undefined ? undefined : parseEmbedOption(options.embed);
      const choice = parseFiltrationOptions(options);
      const workers =
        options.workers === undefined
          ? availableParallelism()
          : parseWorkersOption(options.workers, options.quiet === true);
      let kind: SampleKind | undefined;
      if (options.kind !== undefined) {
        kind = parseKind(options.kind);
        parseChoiceOption(kind, '--kind', INPUT_KINDS);
      }
      // The worker threads start while the data loads (about 0.1 s each, on the cores loading leaves idle).
      if (workers > 1) void startDiagramWorkers(workers - 1);
      const shape = options.shape === undefined ? undefined : parseShape(options.shape);
      const dataset = expectKind(
        await loadDataset(input, {
          kind,
          ...(shape !== undefined ? { shape } : {}),
          ...noteOption(options.quiet === true),
        }),
        INPUT_KINDS,
        'landform diagrams',
      );
      if (embed !== undefined && dataset.kind !== 'signal') {
        throw new UserError(
          `--embed applies to signals, but this is a ${dataset.kind} dataset; drop --embed`,
          { file: input },
        );
      }
      if (dataset.samples.length === 0)
        throw new UserError('has no samples; nothing to compute', { file: input });
      const computeOptions: DiagramOptions = { degrees, metric, filtration: choice.filtration };
      if (choice.subsample !== undefined) computeOptions.subsample = choice.subsample;
      if (choice.threshold !== undefined) computeOptions.threshold = choice.threshold;
      if (maxScale !== undefined) computeOptions.maxScale = maxScale;
      if (embed !== undefined) computeOptions.embed = embed;
      if (options.superlevel) computeOptions.superlevel = true;
      const { chooseFormat, writeDiagramsOutput } = await import('../../io/outputs.js');
      const { planShard, resolveShard } = await import('../../io/shard.js');
      const format = chooseFormat(options.out, options.format, ['csv', 'arrow']);
      const settings = {
        input,
        kind: dataset.kind,
        degrees,
        metric,
        maxScale: maxScale ?? null,
        embed: embed ?? null,
        superlevel: options.superlevel === true,
        ...(shape !== undefined ? { shape } : {}),
        samples: dataset.samples.length,
      };
      const plan = planShard({
        samples: dataset.samples,
        out: options.out,
        shard: resolveShard(options.shard),
        output: 'diagrams',
        settings: { ...settings, ...filtrationRecord(choice) },
        force: options.force === true,
      });
      if (plan.message !== undefined && options.quiet !== true) process.stderr.write(`${plan.message}\n`);
      if (plan.finished) return;
      if (plan.out !== options.out) checkFileOutput(plan.out, [input]);
      const progress = await startProgress('diagrams', plan.samples.length, options.quiet === true);
      let sets: Awaited<ReturnType<typeof computeDiagramsParallel>>;
      const computing = performance.now();
      try {
        sets = await computeDiagramsParallel(plan.samples, computeOptions, {
          workers,
          onProgress: (done) => progress.update(done),
        });
      } finally {
        progress.stop();
      }
      const computed = performance.now();
      const record = {
        ...settings,
        ...filtrationRecord(choice, sets as Array<{ sample: string; coveringRadius?: number }>),
      };
      await writeDiagramsOutput(plan.out, sets, plan.stamp(provenance('diagrams', record)), format);
      if (options.timings) {
        const s = (ms: number): string => `${(ms / 1000).toFixed(3)} s`;
        const threads = Math.min(workers, plan.samples.length);
        process.stderr.write(
          `landform: timings: start-up ${s(started)}, reading ${s(computing - started)}, ` +
            `computing ${s(computed - computing)} (${plan.samples.length} samples, ${threads} thread${threads === 1 ? '' : 's'}), ` +
            `writing ${s(performance.now() - computed)}\n`,
        );
      }
    });
}
