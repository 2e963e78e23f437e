import type { Command } from 'commander';
import { channelsOf, type DiagramSet } from '../../core/diagram.js';
import { UserError } from '../../core/errors.js';
import type { Dataset } from '../../core/sample.js';
import { provenance } from '../../core/version.js';
import type { DiagramOptions } from '../../homology/compute.js';
import { checkOutputPath } from '../../io/output-guard.js';
import { reportWritten } from '../finish.js';
import { parseChoiceOption, parseIntegerOption, parseNumberOption } from '../options.js';
import { startProgress } from '../progress.js';
import {
  addDiagramOptions,
  addLandscapeOptions,
  type DiagramFlags,
  filtrationRecord,
  type LandscapeFlags,
  parseDiagramOptions,
  parseLandscapeOptions,
} from '../shared-options.js';

interface ContrastFlags extends DiagramFlags, LandscapeFlags {
  permutations?: string;
  seed: string;
  p: string;
  format: string;
  out?: string;
}

/** Grid points per degree on which contrast compares class means, when --grid-size is not given. */
export const CONTRAST_GRID_SIZE = 200;

/** `--p 2`, `--p 1.5` or `--p inf`. */
export function parsePOption(text: string): number {
  if (text === 'inf' || text === 'Infinity') return Infinity;
  return parseNumberOption(text, '--p', { min: 1 });
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
  const command = program
    .command('contrast')
    .description(
      'test, for every pair of classes and degree, whether their mean landscapes differ (permutation test, Holm-corrected)',
    )
    .argument('<dataset>', 'samples file or folder (points, distances, signals, images or diagrams)');
  addDiagramOptions(command);
  addLandscapeOptions(command, {
    depth: 5,
    gridSize: CONTRAST_GRID_SIZE,
    gridHelp: 'grid points per degree on which mean landscapes are compared',
    oldGridCount: true,
  });
  return command
    .option(
      '--permutations <R>',
      'random relabellings per test (default: 999, raised for a large family so its adjusted p can reach 0.01, at most 9,999)',
    )
    .option('--seed <n>', 'seed of the relabellings', '1')
    .option('--p <p>', 'p of the Lp distance between class means (≥ 1, or inf)', '2')
    .option('--format <format>', 'json or text', 'json')
    .option('--out <file>', 'write the result to FILE instead of standard output')
    .addHelpText(
      'after',
      `
The family corrected by Holm is every pair of classes × every degree (× every filtration) of the run: each
degree added makes every test's correction stricter, so name fewer with --degrees when one matters.

Examples:
  npx landform contrast datasets/lattice.csv --format text
  npx landform contrast datasets/field --superlevel --degrees 1 --out field-contrast.json`,
    )
    .action(async (path: string, flags: ContrastFlags) => {
      if (flags.out) checkOutputPath(flags.out, [path]);
      const parsed = parseDiagramOptions(flags);
      const { degrees, choice } = parsed;
      const { depth, gridSize, infinite } = parseLandscapeOptions(flags, { gridSize: CONTRAST_GRID_SIZE });
      const permutations =
        flags.permutations === undefined
          ? undefined
          : parseIntegerOption(flags.permutations, '--permutations', 1, 10_000_000);
      const seed = parseIntegerOption(flags.seed, '--seed', 0, 2 ** 32 - 1);
      const p = parsePOption(flags.p);
      const format = parseChoiceOption(flags.format, '--format', ['json', 'text'] as const);
      const { workers } = parsed;
      const diagramOptions: DiagramOptions = parsed.diagramOptions;
      const { loadInput } = await import('../dataset-input.js');
      const { classesOf } = await import('../../core/sample.js');
      const dataset = await loadInput(path, {
        ...(parsed.kind !== undefined ? { kind: parsed.kind } : {}),
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
          gridSize,
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
        gridSize,
        permutations: result.permutations,
        ...(permutations === undefined ? { permutationsChosen: 'for the family' } : {}),
        p: p === Infinity ? 'inf' : p,
        infinite: flags.infinite ?? 'drop',
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
        reportWritten('contrast', flags.out, `${format} class contrasts`, sets.length, flags.quiet);
      } else {
        process.stdout.write(text);
      }
    });
}
