import type { Command } from 'commander';
import { channelsOf, type DiagramSet } from '../../core/diagram.js';
import { UserError } from '../../core/errors.js';
import type { Dataset } from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import type { DiagramOptions } from '../../homology/compute.js';
import type { Metric } from '../../homology/metric.js';
import { checkOutputPath } from '../../io/output-guard.js';
import { addFiltrationOptions, filtrationRecord, parseFiltrationOptions } from '../filtration-options.js';
import {
  parseChoiceOption,
  parseDegreesOption,
  parseInfiniteOption,
  parseIntegerOption,
  parseNumberOption,
  parseWorkersOption,
} from '../options.js';
import { startProgress } from '../progress.js';

interface ContrastFlags {
  kind?: string;
  shape?: string;
  degrees: string;
  depth: string;
  gridCount: string;
  permutations?: string;
  seed: string;
  p: string;
  format: string;
  infinite: string;
  maxScale?: string;
  metric?: string;
  embed?: string;
  superlevel?: boolean;
  workers?: string;
  out?: string;
  quiet?: boolean;
  filtration?: string;
  subsample?: string;
}

/** `--p 2`, `--p 1.5` or `--p inf`. */
export function parsePOption(text: string): number {
  if (text === 'inf' || text === 'Infinity') return Infinity;
  return parseNumberOption(text, '--p', { min: 1 });
}

/** `DIM:DELAY` or `DIM:DELAY:STRIDE` → a delay embedding. */
export function parseEmbedOption(text: string): { dimension: number; delay: number; stride?: number } {
  const parts = text.split(':');
  if (parts.length < 2 || parts.length > 3)
    throw new UserError(`--embed '${text}' must look like DIM:DELAY or DIM:DELAY:STRIDE, e.g. 3:8`);
  const dimension = parseIntegerOption(parts[0], '--embed DIM', 1, 64);
  const delay = parseIntegerOption(parts[1], '--embed DELAY', 1);
  const stride = parts.length === 3 ? parseIntegerOption(parts[2], '--embed STRIDE', 1) : undefined;
  return { dimension, delay, ...(stride === undefined ? {} : { stride }) };
}

/** The diagrams of every sample: read from a diagrams dataset, or computed with the diagram options. */
export async function diagramsOfDataset(
  dataset: Dataset,
  options: DiagramOptions,
  run: { workers?: number; onProgress?: (done: number, total: number) => void } = {},
): Promise<DiagramSet[]> {
  if (dataset.kind === 'table') {
    throw new UserError(
      'a table dataset has feature columns but no shape; contrast needs point clouds, signals, images, distances or diagrams',
      {
        file: dataset.source,
      },
    );
  }
  if (dataset.kind === 'diagrams') {
    return dataset.samples.map((s) => ({
      sample: s.id,
      label: s.label,
      diagrams: s.kind === 'diagrams' ? s.diagrams : [],
    }));
  }
  const { computeDiagramsParallel } = await import('../../homology/parallel.js');
  return computeDiagramsParallel(dataset.samples, options, run);
}

export function defineContrast(program: Command): Command {
  return addFiltrationOptions(program.command('contrast'))
    .description(
      'test, for every pair of classes and degree, whether their mean landscapes differ (permutation test, Holm-corrected)',
    )
    .argument('<dataset>', 'samples file or folder (points, distances, signals, images or diagrams)')
    .option('--kind <kind>', 'sample kind instead of detecting it')
    .option('--shape <RxC>', 'image table CSV: the shape of every image, ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS')
    .option('--degrees <list>', 'homology degrees to compare', '1')
    .option('--depth <K>', 'landscape layers 1..K', '5')
    .option('--grid-count <N>', 'grid points per degree on which mean landscapes are compared', '200')
    .option(
      '--permutations <R>',
      'random relabellings per test (default: 999, raised for a large family so its adjusted p can reach 0.01, at most 9,999)',
    )
    .option('--seed <n>', 'seed of the relabellings', '1')
    .option('--p <p>', 'p of the Lp distance between class means (≥ 1, or inf)', '2')
    .option('--format <format>', 'json or text', 'json')
    .option('--infinite <policy>', "essential classes: 'drop' or 'clip:VALUE'", 'drop')
    .option('--max-scale <R>', 'largest Rips filtration value')
    .option('--metric <metric>', 'distance between points: euclidean, manhattan, chebyshev')
    .option('--embed <DIM:DELAY[:STRIDE]>', 'delay embedding of signals into point clouds')
    .option('--superlevel', 'superlevel sets for images and signals')
    .option('--workers <n>', 'worker threads for the diagrams')
    .option('--out <file>', 'write the result to FILE instead of standard output')
    .addHelpText(
      'after',
      '\nThe family corrected by Holm is every pair of classes × every degree of the run.\n' +
        'Example: landform contrast datasets/lattice/clouds.csv --degrees 0,1 --format text',
    )
    .action(async (path: string, flags: ContrastFlags) => {
      if (flags.out) checkOutputPath(flags.out, [path]);
      const degrees = parseDegreesOption(flags.degrees);
      const depth = parseIntegerOption(flags.depth, '--depth', 1, 100);
      const gridCount = parseIntegerOption(flags.gridCount, '--grid-count', 2, 100_000);
      const permutations =
        flags.permutations === undefined
          ? undefined
          : parseIntegerOption(flags.permutations, '--permutations', 1, 10_000_000);
      const seed = parseIntegerOption(flags.seed, '--seed', 0, 2 ** 32 - 1);
      const p = parsePOption(flags.p);
      const format = parseChoiceOption(flags.format, '--format', ['json', 'text'] as const);
      const infinite = parseInfiniteOption(flags.infinite);
      const workers =
        flags.workers === undefined
          ? undefined
          : parseWorkersOption(flags.workers, flags.quiet === true, 256);
      const choice = parseFiltrationOptions(flags);
      const diagramOptions: DiagramOptions = {
        degrees,
        ...(choice.filtration === 'rips' ? {} : { filtration: choice.filtration }),
        ...(choice.subsample === undefined ? {} : { subsample: choice.subsample }),
        ...(choice.threshold === undefined ? {} : { threshold: choice.threshold }),
        ...(flags.maxScale === undefined
          ? {}
          : { maxScale: parseNumberOption(flags.maxScale, '--max-scale', { positive: true }) }),
        ...(flags.metric === undefined
          ? {}
          : {
              metric: parseChoiceOption(flags.metric, '--metric', [
                'euclidean',
                'manhattan',
                'chebyshev',
              ] as const) as Metric,
            }),
        ...(flags.embed === undefined ? {} : { embed: parseEmbedOption(flags.embed) }),
        ...(flags.superlevel ? { superlevel: true } : {}),
      };
      const { loadInput } = await import('../dataset-input.js');
      const { classesOf } = await import('../../core/sample.js');
      const dataset = await loadInput(path, {
        kind: flags.kind,
        ...(flags.shape !== undefined ? { shape: flags.shape } : {}),
        quiet: flags.quiet === true,
      });
      const classes = classesOf(dataset.samples);
      if (classes.length < 2) {
        throw new UserError(
          `found ${classes.length} class${classes.length === 1 ? '' : 'es'}; contrast needs samples of at least two labelled classes`,
          {
            file: path,
          },
        );
      }
      for (const label of classes) {
        if (label === '')
          throw new UserError(
            'some samples have no label; contrast compares labelled classes — label every sample',
            { file: path },
          );
      }
      const quiet = flags.quiet === true;
      const bar = await startProgress('diagrams', dataset.samples.length, quiet);
      let sets: DiagramSet[];
      try {
        sets = await diagramsOfDataset(dataset, diagramOptions, {
          workers,
          onProgress: (d, t) => bar.update(d, t),
        });
      } finally {
        bar.stop();
      }
      const { contrastDiagrams, contrastJson, contrastText } = await import('../../report/contrast.js');
      const pairs = (classes.length * (classes.length - 1)) / 2;
      const { permutationsForFamily } = await import('../../report/permutation.js');
      const family = pairs * channelsOf(sets, degrees).length;
      const used = permutations ?? permutationsForFamily(family);
      const testBar = await startProgress('permutations', family * used, quiet);
      let result: ReturnType<typeof contrastDiagrams>;
      try {
        result = contrastDiagrams(sets, {
          degrees,
          depth,
          gridCount,
          permutations: used,
          p,
          seed,
          infinite,
          onProgress: (d, t) => testBar.update(d, t),
        });
      } finally {
        testBar.stop();
      }
      const options = {
        kind: dataset.kind,
        ...diagramOptions,
        ...filtrationRecord(choice, sets),
        depth,
        gridCount,
        permutations: result.permutations,
        ...(permutations === undefined ? { permutationsChosen: 'for the family' } : {}),
        p: p === Infinity ? 'inf' : p,
        infinite: flags.infinite,
      };
      const made = provenance('contrast', options, seed);
      const text =
        format === 'json'
          ? contrastJson(result, {
              tool: made.tool,
              version: made.version,
              options: made.options,
              seed,
              family: result.grids.some((g) => g.filtration !== undefined)
                ? 'all pairs of classes × all filtrations × all degrees'
                : 'all pairs of classes × all degrees',
              grids: result.grids,
            })
          : contrastText(result);
      if (flags.out) {
        const { writeFileAtomic } = await import('../../io/atomic.js');
        writeFileAtomic(flags.out, text);
        process.stderr.write(`landform: wrote ${flags.out}\n`);
      } else {
        process.stdout.write(text);
      }
    });
}
