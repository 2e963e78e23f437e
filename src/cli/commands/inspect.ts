import type { Command } from 'commander';
import { SAMPLE_KINDS } from '../../core/sample.js';

interface InspectOptions {
  kind?: string;
  shape?: string;
  json?: boolean;
  quiet?: boolean;
}

/**
 * `landform inspect <dataset> [--kind KIND] [--json]`: loads a dataset as every other command would and
 * prints what it found (kind, sample count, classes with counts, sizes), or the first thing wrong with it.
 */
export function defineInspect(program: Command): Command {
  return program
    .command('inspect')
    .description('load a dataset and summarise it: kind, samples, classes, sizes')
    .argument('<dataset>', 'a CSV or .npy file, or a folder with labels.csv')
    .option('--kind <kind>', `force the sample kind: ${SAMPLE_KINDS.join(', ')} (default: detected)`)
    .option('--shape <RxC>', 'image table CSV: the shape of every image, ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS')
    .option('--json', 'print the summary as JSON')
    .addHelpText(
      'after',
      '\nExamples:\n  npx landform inspect datasets/lattice.csv\n  npx landform inspect datasets/field --json',
    )
    .action(async (path: string, options: InspectOptions) => {
      const { loadInput } = await import('../dataset-input.js');
      const { formatSummary, summarizeDataset } = await import('../../io/summary.js');
      const { version } = await import('../../core/version.js');
      const dataset = await loadInput(path, {
        kind: options.kind,
        ...(options.shape !== undefined ? { shape: options.shape } : {}),
        quiet: options.quiet,
      });
      const summary = summarizeDataset(dataset);
      if (options.json) {
        const out = { version: version(), options: { kind: options.kind ?? null }, ...summary };
        process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
      } else {
        process.stdout.write(formatSummary(summary));
      }
    });
}
