import type { Command } from 'commander';
import { UserError } from '../../core/errors.js';
import { reportWritten } from '../finish.js';
import { startProgress } from '../progress.js';

interface MergeOptions {
  out?: string;
  format?: string;
  quiet?: boolean;
}

/**
 * `landform merge <shard outputs…> --out FILE`: joins the outputs of `diagrams … --shard I/N` or
 * `vectorize … --shard I/N` into the file an unsharded run would have written, after checking that the
 * shards are complete, given once, disjoint and made with the same settings from the same data.
 */
export function defineMerge(program: Command): Command {
  return program
    .command('merge')
    .description('join the shard outputs of a sharded diagrams or vectorize run into one file')
    .argument(
      '<files...>',
      'the shard outputs (e.g. out/diagrams.shard-*.csv), each with its .provenance.json beside it',
    )
    .option('--out <file>', 'the merged file (.csv, .arrow, or .npy for features); format from its extension')
    .option('--format <format>', 'csv, npy or arrow, when the extension should not decide')
    .addHelpText(
      'after',
      `
Samples are written in the order of the original dataset, so the merged file equals the output of the same
command run without --shard, byte for byte. A missing or repeated shard, shards of different runs, options
or data are refused and nothing is written.

Example:
  npx landform diagrams datasets/lattice.csv --shard 2/7 --out out/diagrams.csv   # one of seven jobs
  npx landform merge out/diagrams.shard-*-of-7.csv --out lattice-diagrams.csv`,
    )
    .action(async (files: string[], options: MergeOptions) => {
      if (options.out === undefined)
        throw new UserError('--out FILE is required: where to write the merged file');
      const { mergeShards } = await import('../../io/merge.js');
      const { formatFromPath } = await import('../../io/outputs.js');
      const { checkFileOutput } = await import('../../io/output-guard.js');
      const format = options.format ?? formatFromPath(options.out);
      checkFileOutput(options.out, files, format === 'npy' ? 'npy' : undefined);
      const progress = await startProgress('merge', files.length, options.quiet === true);
      try {
        const summary = await mergeShards(files, options.out, {
          format: options.format,
          onProgress: (done, total) => progress.update(done, total),
        });
        progress.stop();
        const what = `${summary.output === 'table' ? 'features' : 'diagrams'} merged from ${summary.shards} shard${summary.shards === 1 ? '' : 's'}`;
        reportWritten('merge', summary.out, what, summary.samples, options.quiet);
      } finally {
        progress.stop();
      }
    });
}
