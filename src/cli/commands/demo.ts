import { join, relative } from 'node:path';
import type { Command } from 'commander';
import { parseIntegerOption, parseWorkersOption } from '../options.js';
import { startProgress } from '../progress.js';

interface DemoFlags {
  out: string;
  force?: boolean;
  quick?: boolean;
  seed: string;
  workers?: string;
  quiet?: boolean;
}

/**
 * `landform demo`: the whole study on the shipped datasets — diagrams, landscapes, cross-validated models
 * beside raw baselines, class means with bands, contrasts — written to OUT/metrics.json and OUT/report.html.
 */
export function defineDemo(program: Command): Command {
  return program
    .command('demo')
    .description('run the whole study on the shipped demo datasets and write metrics.json and report.html')
    .option('--out <dir>', 'folder for metrics.json and report.html', 'results/demo')
    .option('--quick', 'fewer folds, permutations and bootstrap draws, one model: a quick look')
    .option('--seed <n>', 'seed of every split, model, band and permutation', '1')
    .option('--workers <n>', 'worker threads for the diagrams (default: every core)')
    .option('--force', 'write into a non-empty folder landform did not make')
    .addHelpText(
      'after',
      '\nExample:\n  npx landform demo --quick --out /tmp/demo   # then open /tmp/demo/report.html',
    )
    .action(async (flags: DemoFlags) => {
      const seed = parseIntegerOption(flags.seed, '--seed', 0, 2 ** 32 - 1);
      const workers =
        flags.workers === undefined
          ? undefined
          : parseWorkersOption(flags.workers, flags.quiet === true, 256);
      const quiet = flags.quiet === true;
      // Refused before the study runs: special files, links, the shipped datasets, a folder of someone else's.
      const { checkOutputPath } = await import('../../io/output-guard.js');
      const { packageRoot } = await import('../../core/version.js');
      checkOutputPath(flags.out, [join(packageRoot(), 'datasets')], {
        folder: true,
        force: flags.force === true,
        known: ['metrics.json', 'report.html'],
        addsFiles: true,
      });
      const { runDemo, accuracyTable } = await import('../../demo/study.js');
      const bar = await startProgress('demo', 100, quiet);
      let result: Awaited<ReturnType<typeof runDemo>>;
      try {
        result = await runDemo({
          quick: flags.quick === true,
          seed,
          workers,
          onProgress: (done, total) => bar.update(done, total),
          onDataset: (name, i, n) => {
            if (!quiet && !process.stderr.isTTY)
              process.stderr.write(`landform: demo ${i + 1}/${n}: ${name}\n`);
          },
        });
      } finally {
        bar.stop();
      }
      const { renderReport } = await import('../../report/html.js');
      const html = await renderReport(result.report);
      const { writeFilesAtomic } = await import('../../io/atomic.js');
      const metricsPath = join(flags.out, 'metrics.json');
      const reportPath = join(flags.out, 'report.html');
      writeFilesAtomic([
        { path: metricsPath, data: result.metrics },
        { path: reportPath, data: html },
      ]);
      const shown = (p: string) =>
        relative(process.cwd(), p).startsWith('..') ? p : relative(process.cwd(), p) || p;
      process.stdout.write(
        [
          `Cross-validated accuracy (mean ± sd over ${result.outcomes[0]?.evaluation.folds ?? 0} folds; estimates, not guarantees):`,
          accuracyTable(result.outcomes),
          '',
          `metrics: ${shown(metricsPath)}`,
          `report:  ${shown(reportPath)}`,
          'The data are synthetic; validate on independent data before any real decision.',
          '',
        ].join('\n'),
      );
      const { reportWritten } = await import('../finish.js');
      const samples = result.outcomes.reduce((n, o) => n + o.evaluation.sampleIds.length, 0);
      reportWritten('demo', flags.out, 'metrics.json and report.html', samples, quiet);
    });
}
