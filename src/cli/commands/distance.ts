import { type Command, Option } from 'commander';
import { type Diagram, diagramOfChannel, finitePairs, parseInfinitePolicy } from '../../core/diagram.js';
import { UserError } from '../../core/errors.js';
import { provenance } from '../../core/version.js';
import { type DiagramMetric, distanceMatrix } from '../../homology/distance.js';
import { csvField, csvNumber } from '../../io/csv.js';
import { readDiagramCsv } from '../../io/diagram-csv.js';
import { checkFileOutput } from '../../io/output-guard.js';
import { writeWithProvenance } from '../../io/provenance-file.js';
import { reportWritten } from '../finish.js';
import { renamedOption } from '../options.js';
import { startProgress } from '../progress.js';
import { chooseChannel } from './landscape.js';

interface DistanceOptions {
  degree?: string;
  from?: string;
  diagramDistance?: string;
  /** The old name of --diagram-distance, accepted for one release. */
  metric?: string;
  infinite: string;
  out?: string;
  quiet?: boolean;
}

/** `bottleneck`, `wasserstein` (p = 2) or `wasserstein:P` with P ≥ 1. */
export function parseDiagramDistance(text: string, option = '--diagram-distance'): DiagramMetric {
  if (text === 'bottleneck') return { kind: 'bottleneck' };
  if (text === 'wasserstein') return { kind: 'wasserstein', p: 2 };
  const m = /^wasserstein:(.+)$/.exec(text);
  if (m) {
    const p = m[1] === 'inf' ? Infinity : Number(m[1]);
    if (p >= 1) return { kind: 'wasserstein', p };
  }
  const known =
    option === '--metric' ? '; --metric is the distance between points, --diagram-distance this one' : '';
  throw new UserError(
    `${option} '${text}' must be 'bottleneck', 'wasserstein' or 'wasserstein:P' with P ≥ 1 (e.g. wasserstein:1)${known}`,
  );
}

export function describeMetric(metric: DiagramMetric): string {
  return metric.kind === 'bottleneck' ? 'bottleneck' : `wasserstein:${metric.p}`;
}

/**
 * `landform distance <a.csv> [<b.csv>]`: the matrix of diagram distances between the samples of one file
 * (symmetric, zero diagonal) or between the samples of two files (rows from a, columns from b), as CSV.
 */
export function defineDistance(program: Command): Command {
  return program
    .command('distance')
    .description('matrix of bottleneck or Wasserstein distances between the diagrams of samples (CSV)')
    .argument('<a.csv>', 'diagram CSV with the header sample,label,degree,birth,death')
    .argument('[b.csv]', 'a second diagram CSV: rows are the samples of a, columns those of b')
    .option('--degree <n>', 'homology degree (default: 1 if the file has it, else the lowest)')
    .option('--from <filtration>', "which filtration's diagrams, when the files hold several (e.g. erosion)")
    .option(
      '--diagram-distance <name>',
      "distance between diagrams: 'bottleneck', 'wasserstein' (order 2) or 'wasserstein:P' (default: bottleneck)",
    )
    .addOption(new Option('--metric <name>').hideHelp())
    .option(
      '--infinite <policy>',
      "essential classes: 'keep' (matched among themselves), 'drop' or 'clip:VALUE'",
      'keep',
    )
    .option(
      '--out <file>',
      'write the CSV here (with a .provenance.json beside it) instead of standard output',
    )
    .addHelpText(
      'after',
      `
Output: a header 'sample,<id>,<id>,…' then one row per sample. Points are compared in the L∞ metric;
unmatched points go to the diagonal. With 'keep', two diagrams with different numbers of essential
classes are 'inf' apart.

Examples:
  npx landform diagrams datasets/lattice.csv --out lattice-diagrams.csv
  npx landform distance lattice-diagrams.csv --degree 1 --diagram-distance wasserstein:1 --out lattice-distances.csv`,
    )
    .action(async (fileA: string, fileB: string | undefined, options: DistanceOptions) => {
      if (options.out !== undefined) checkFileOutput(options.out, [fileA, fileB]);
      const metricText = renamedOption(options, {
        key: 'diagramDistance',
        flag: '--diagram-distance',
        oldKey: 'metric',
        oldFlag: '--metric',
      });
      const metric = parseDiagramDistance(
        metricText ?? 'bottleneck',
        options.metric !== undefined ? '--metric' : '--diagram-distance',
      );
      const keep = options.infinite === 'keep';
      const policy = keep ? undefined : parseInfinitePolicy(options.infinite);
      if (!keep && policy === undefined) {
        throw new UserError(
          `--infinite '${options.infinite}' must be 'keep', 'drop' or 'clip:VALUE' with a finite VALUE`,
        );
      }
      const setsA = readDiagramCsv(fileA);
      const setsB = fileB === undefined ? setsA : readDiagramCsv(fileB);
      const channel = chooseChannel(setsA, options.degree, options.from, fileA);
      const { degree } = channel;
      if (fileB !== undefined) chooseChannel(setsB, String(degree), options.from, fileB);
      const prepare = (d: Diagram): Diagram => (policy === undefined ? d : finitePairs(d, policy));
      const rowsA = setsA.map((s) => prepare(diagramOfChannel(s, channel)));
      const rowsB = fileB === undefined ? rowsA : setsB.map((s) => prepare(diagramOfChannel(s, channel)));
      const n = rowsA.length;
      const m = rowsB.length;
      const symmetric = fileB === undefined;
      const progress = await startProgress(
        'distance',
        symmetric ? (n * (n - 1)) / 2 : n * m,
        options.quiet === true,
      );
      let values: Float64Array;
      try {
        values = distanceMatrix(rowsA, symmetric ? undefined : rowsB, {
          metric,
          onProgress: (done, total) => progress.update(done, total),
        }).data;
      } finally {
        progress.stop();
      }
      const lines = [['sample', ...setsB.map((s) => csvField(s.sample))].join(',')];
      for (let i = 0; i < n; i++) {
        const row = [csvField(setsA[i].sample)];
        for (let j = 0; j < m; j++) row.push(csvNumber(values[i * m + j]));
        lines.push(row.join(','));
      }
      const text = `${lines.join('\n')}\n`;
      if (options.out === undefined) process.stdout.write(text);
      else {
        writeWithProvenance(
          options.out,
          text,
          provenance('distance', {
            a: fileA,
            b: fileB ?? null,
            degree,
            ...(channel.filtration !== undefined ? { filtration: channel.filtration } : {}),
            diagramDistance: describeMetric(metric),
            infinite: options.infinite,
          }),
        );
        reportWritten(
          'distance',
          options.out,
          `${describeMetric(metric)} distances of degree ${degree}`,
          n,
          options.quiet,
        );
      }
    });
}
