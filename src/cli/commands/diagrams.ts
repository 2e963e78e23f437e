import { availableParallelism } from 'node:os';
import type { Command } from 'commander';
import { UserError } from '../../core/errors.js';
import { provenance } from '../../core/version.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { computeDiagramsParallel, startDiagramWorkers } from '../../homology/parallel.js';
import { expectKind, loadDataset } from '../../io/load.js';
import { checkFileOutput } from '../../io/output-guard.js';
import { noteOption } from '../dataset-input.js';
import { reportWritten } from '../finish.js';
import { parseChoiceOption } from '../options.js';
import { startProgress } from '../progress.js';
import {
  addDiagramOptions,
  type DiagramFlags,
  filtrationRecord,
  parseDiagramOptions,
} from '../shared-options.js';
import { refuseBinaryOnTerminal } from '../stdout.js';

interface DiagramsCommandOptions extends DiagramFlags {
  out?: string;
  shard?: string;
  force?: boolean;
  format?: string;
  timings?: boolean;
}

const INPUT_KINDS = ['points', 'distances', 'signal', 'image'] as const;

/**
 * `landform diagrams <input> [--out FILE]`: the persistence diagrams of every sample of a dataset, as the
 * diagram CSV (or Arrow) with a provenance sidecar, or the CSV on standard output without --out. Samples run
 * on worker threads, one sample per task.
 */
export function defineDiagrams(program: Command): Command {
  const command = program.command('diagrams');
  addDiagramOptions(command);
  return command
    .description(
      'persistence diagrams of every sample: Vietoris–Rips for clouds and matrices, cubical for images, sublevel sets or delay embeddings for signals',
    )
    .argument(
      '<input>',
      'dataset: points CSV (sample,label,x,y,…), long signal CSV (sample,label,value), or any format the loader reads',
    )
    .option(
      '--shard <I/N>',
      "only shard I of N (from 1), written as FILE.shard-I-of-N; default: from a Slurm array or Kubernetes indexed job, 'none' to turn off",
    )
    .option('--force', 'recompute a shard that is already finished')
    .option(
      '--format <format>',
      'csv or arrow (default: from the extension of --out; csv on standard output)',
    )
    .option(
      '--out <file>',
      'the diagram file to write, with a FILE.provenance.json sidecar (default: the CSV on standard output)',
    )
    .option('--timings', 'print the time of each stage on stderr: start-up, reading, computing, writing')
    .addHelpText(
      'after',
      `
Output: sample,label,degree,birth,death — one row per pair with death > birth; essential classes have
death inf. With several filtrations (--filtration a,b,…) a filtration column follows label and rows go
filtration by filtration, in the order given. Superlevel diagrams are the sublevel diagrams of −values: a bright class born at 200 that dies
at 50 reads birth −200, death −50, so death ≥ birth holds in every file.

Without --out the CSV goes to standard output (no provenance sidecar: use --out to keep one); Arrow is
refused on a terminal. --shard needs --out.

Examples:
  npx landform diagrams datasets/lattice.csv --degrees 0,1 --out lattice-diagrams.csv
  npx landform diagrams datasets/pump.csv --embed 4:8:2 --max-scale 3 | head
  npx landform diagrams datasets/field --superlevel --out field-diagrams.csv`,
    )
    .action(async (input: string, options: DiagramsCommandOptions) => {
      // Milliseconds since the process started, at the end of each stage.
      const started = performance.now();
      if (options.out !== undefined) checkFileOutput(options.out, [input]);
      const parsed = parseDiagramOptions(options);
      const { degrees, choice } = parsed;
      const metric = parsed.diagramOptions.metric;
      const maxScale = parsed.diagramOptions.maxScale;
      const embed = parsed.diagramOptions.embed;
      const shape = parsed.shape;
      const workers = parsed.workers ?? availableParallelism();
      const kind =
        parsed.kind === undefined ? undefined : parseChoiceOption(parsed.kind, '--kind', INPUT_KINDS);
      const { chooseFormat, writeDiagramsOutput } = await import('../../io/outputs.js');
      const format =
        options.out === undefined
          ? parseChoiceOption(options.format ?? 'csv', '--format', ['csv', 'arrow'] as const)
          : chooseFormat(options.out, options.format, ['csv', 'arrow']);
      if (options.out === undefined) {
        if (format === 'arrow') refuseBinaryOnTerminal('Arrow');
        if (options.shard !== undefined && options.shard !== 'none')
          throw new UserError(
            '--shard needs --out FILE: each shard is written beside it as FILE.shard-I-of-N',
          );
      }
      // The worker threads start while the data loads (about 0.1 s each, on the cores loading leaves idle).
      if (workers > 1) void startDiagramWorkers(workers - 1);
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
      const computeOptions: DiagramOptions = { ...parsed.diagramOptions, filtration: choice.filtration };
      const { planShard, resolveShard } = await import('../../io/shard.js');
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
        out: options.out ?? 'diagrams.csv',
        shard: options.out === undefined ? undefined : resolveShard(options.shard),
        output: 'diagrams',
        settings: { ...settings, ...filtrationRecord(choice) },
        force: options.force === true,
      });
      if (plan.message !== undefined && options.quiet !== true) process.stderr.write(`${plan.message}\n`);
      if (plan.finished) return;
      if (options.out !== undefined && plan.out !== options.out) checkFileOutput(plan.out, [input]);
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
      if (options.out === undefined) {
        const { formatDiagramCsv } = await import('../../io/diagram-csv.js');
        const { formatDiagramArrow } = await import('../../io/arrow.js');
        const made = provenance('diagrams', record);
        process.stdout.write(
          format === 'arrow' ? await formatDiagramArrow(sets, made) : formatDiagramCsv(sets),
        );
      } else {
        await writeDiagramsOutput(plan.out, sets, plan.stamp(provenance('diagrams', record)), format);
      }
      if (options.timings) {
        const s = (ms: number): string => `${(ms / 1000).toFixed(3)} s`;
        const threads = Math.min(workers, plan.samples.length);
        process.stderr.write(
          `landform: timings: start-up ${s(started)}, reading ${s(computing - started)}, ` +
            `computing ${s(computed - computing)} (${plan.samples.length} samples, ${threads} thread${threads === 1 ? '' : 's'}), ` +
            `writing ${s(performance.now() - computed)}\n`,
        );
      }
      // The completion line comes last, after the timings.
      if (options.out !== undefined)
        reportWritten(
          'diagrams',
          plan.out,
          `${format.toUpperCase()} diagrams`,
          plan.samples.length,
          options.quiet,
        );
    });
}
