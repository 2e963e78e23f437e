import type { Command } from 'commander';
import { checkLandscapeValues } from '../../core/budgets.js';
import {
  type Channel,
  type Diagram,
  type DiagramSet,
  describeInfinitePolicy,
  diagramOfChannel,
  finitePairs,
  type InfinitePolicy,
} from '../../core/diagram.js';
import { UserError } from '../../core/errors.js';
import { provenance } from '../../core/version.js';
import { writeFileAtomic } from '../../io/atomic.js';
import { MAX_DIAGRAM_DEGREE, readDiagramCsv } from '../../io/diagram-csv.js';
import { checkFileOutput, checkOutputPath } from '../../io/output-guard.js';
import { writeWithProvenance } from '../../io/provenance-file.js';
import { exactLandscape } from '../../landscape/exact-landscape.js';
import { coveringGrid, type Grid } from '../../landscape/grid.js';
import {
  exactToJson,
  LANDSCAPE_CSV_HEADER,
  landscapeCsvRows,
  sampledToJson,
} from '../../landscape/output.js';
import { sampleLandscape } from '../../landscape/sampled-landscape.js';
import { reportWritten } from '../finish.js';
import { parseChoiceOption, parseGridOption, parseIntegerOption } from '../options.js';
import { addLandscapeOptions, type LandscapeFlags, parseLandscapeOptions } from '../shared-options.js';

interface LandscapeOptions extends LandscapeFlags {
  sample?: string;
  degree?: string;
  from?: string;
  grid?: string;
  exact?: boolean;
  format: string;
  out?: string;
}

/** Grid points when neither `--grid` nor `--grid-size` is given. */
export const DEFAULT_GRID_COUNT = 100;
/** Layers when `--depth` is not given. */
export const DEFAULT_DEPTH = 5;

/**
 * `landform landscape <diagrams.csv>`: the persistence landscape of each sample's diagram of one degree,
 * sampled on a grid (the default) or exact (`--exact`), as JSON (one object per sample, one per line) or CSV.
 */
export function defineLandscape(program: Command): Command {
  const command = program
    .command('landscape')
    .description("persistence landscapes of the samples' diagrams: sampled on a grid, or exact breakpoints")
    .argument('<diagrams.csv>', 'diagram CSV with the header sample,label,degree,birth,death')
    .option('--sample <id>', 'only this sample (default: every sample, one JSON object per line)')
    .option('--degree <n>', 'homology degree (default: 1 if the file has it, else the lowest)')
    .option(
      '--from <filtration>',
      "which filtration's diagrams, when the file holds several (e.g. height:1:0)",
    );
  addLandscapeOptions(command, {
    depth: DEFAULT_DEPTH,
    gridSize: DEFAULT_GRID_COUNT,
    gridHelp: 'grid points of a grid covering the finite pairs',
  });
  return command
    .option('--grid <start:stop:count>', 'an explicit sampling grid instead of one covering the pairs')
    .option('--exact', 'print the breakpoints of the exact layers instead of sampled values')
    .option('--format <format>', 'json or csv', 'json')
    .option('--out <file>', 'write to this file instead of standard output')
    .addHelpText(
      'after',
      `
JSON, sampled: {"degree":1,"t":[t0,…],"layers":[[λ1(t0),…],…],…} with exactly K layers (zeros past the
pairs) and COUNT grid points START..STOP inclusive. JSON, --exact: {"degree":1,"layers":[[[t,v],…],…],…}
with the non-zero layers among the first K, breakpoints increasing in t, starting and ending at 0.
Each object also names its "sample", "label", the "infinite" policy applied and its "provenance".
With several samples and no --sample, one object per line (JSON lines) on one shared grid.
CSV: sample,degree,layer,t,value — one row per grid point (or breakpoint) per layer.

Examples:
  npx landform diagrams datasets/lattice.csv --out lattice-diagrams.csv
  npx landform landscape lattice-diagrams.csv --sample panel-001 --degree 1 --grid 0:0.8:50
  npx landform landscape lattice-diagrams.csv --exact --depth 2 --format csv --out lattice-landscapes.csv`,
    )
    .action((file: string, options: LandscapeOptions) => {
      const format = parseChoiceOption(options.format, '--format', ['json', 'csv'] as const);
      if (options.out !== undefined) {
        if (format === 'csv') checkFileOutput(options.out, [file]);
        else checkOutputPath(options.out, [file]);
      }
      const landscape = parseLandscapeOptions(options, { gridSize: DEFAULT_GRID_COUNT });
      const { depth } = landscape;
      const policy = landscape.infinite;
      if (options.exact && (options.grid !== undefined || landscape.gridSizeGiven)) {
        throw new UserError(
          `${options.grid !== undefined ? '--grid' : '--grid-size'} is for sampled landscapes; drop it with --exact (exact layers need no grid)`,
        );
      }
      if (options.grid !== undefined && landscape.gridSizeGiven)
        throw new UserError('--grid START:STOP:COUNT sets the grid size itself; drop --grid-size');
      let grid: Grid | undefined = options.grid === undefined ? undefined : parseGridOption(options.grid);
      const sets = selectSamples(readDiagramCsv(file), options.sample, file);
      const channel = chooseChannel(sets, options.degree, options.from, file);
      const { degree } = channel;
      const diagrams = sets.map((set) => diagramOfChannel(set, channel));
      const finite = diagrams.map((d) => finitePairs(d, policy));
      if (!options.exact && grid === undefined) {
        grid = coveringGrid(finite, landscape.gridSize);
        if (grid === undefined) {
          throw new UserError(
            `degree ${degree} has no finite pairs of positive length${sets.length === 1 ? ` in sample '${sets[0].sample}'` : ''}, so no grid range can be chosen; give --grid START:STOP:COUNT`,
            { file },
          );
        }
      }
      if (!options.exact) checkLandscapeValues(sets.length, depth, (grid as Grid).count);
      const recorded = {
        input: file,
        sample: options.sample ?? null,
        degree,
        ...(channel.filtration !== undefined ? { filtration: channel.filtration } : {}),
        depth,
        grid: grid ?? null,
        exact: options.exact === true,
        format,
        infinite: describeInfinitePolicy(policy),
      };
      const prov = provenance('landscape', recorded);
      const pieces: string[] = [];
      if (format === 'csv') pieces.push(LANDSCAPE_CSV_HEADER.join(','));
      for (let s = 0; s < sets.length; s++) {
        const landscape = options.exact
          ? exactLandscape(finite[s], { maxDepth: depth })
          : sampleLandscape(finite[s], grid as Grid, depth);
        if (format === 'csv') {
          pieces.push(...landscapeCsvRows(sets[s].sample, landscape));
        } else {
          const body = 'values' in landscape ? sampledToJson(landscape) : exactToJson(landscape);
          pieces.push(
            JSON.stringify({
              ...body,
              sample: sets[s].sample,
              label: sets[s].label,
              infinite: describeInfinitePolicy(policy),
              provenance: prov,
            }),
          );
        }
      }
      const text = `${pieces.join('\n')}\n`;
      noteEssentialClasses(diagrams, policy, degree, options.quiet === true);
      if (options.out === undefined) process.stdout.write(text);
      else {
        if (format === 'csv') writeWithProvenance(options.out, text, prov);
        else writeFileAtomic(options.out, text);
        const what = `${options.exact ? 'exact' : 'sampled'} ${format.toUpperCase()} landscapes of degree ${degree}`;
        reportWritten('landscape', options.out, what, sets.length, options.quiet);
      }
    });
}

/** Every sample, or only the one named by `--sample`. */
export function selectSamples(sets: DiagramSet[], sample: string | undefined, file: string): DiagramSet[] {
  if (sample === undefined) return sets;
  const found = sets.find((s) => s.sample === sample);
  if (found === undefined) {
    const some = sets
      .slice(0, 5)
      .map((s) => `'${s.sample}'`)
      .join(', ');
    throw new UserError(
      `no sample '${sample}' in the file; its samples include ${some}${sets.length > 5 ? ', …' : ''}`,
      { file },
    );
  }
  return [found];
}

/**
 * The channel a single-degree command reads: `--from F` names the filtration when the file's diagrams are
 * tagged with several (refused when they are not; required when they are), then `chooseDegree` among F's.
 */
export function chooseChannel(
  sets: readonly DiagramSet[],
  degreeText: string | undefined,
  fromText: string | undefined,
  file: string,
): Channel {
  const tags: string[] = [];
  for (const set of sets) {
    for (const d of set.diagrams)
      if (d.filtration !== undefined && !tags.includes(d.filtration)) tags.push(d.filtration);
  }
  if (tags.length === 0) {
    if (fromText !== undefined) {
      throw new UserError(
        `--from ${fromText}: the file's diagrams come from one filtration and carry no filtration names; drop --from`,
        { file },
      );
    }
    return { degree: chooseDegree(sets, degreeText, file) };
  }
  if (fromText === undefined) {
    throw new UserError(
      `the file holds diagrams of ${tags.length} filtrations (${tags.join(', ')}); choose one with --from`,
      { file },
    );
  }
  if (!tags.includes(fromText)) {
    throw new UserError(`--from ${fromText} is not in the file; it has ${tags.join(', ')}`, { file });
  }
  const only = sets.map((s) => ({ ...s, diagrams: s.diagrams.filter((d) => d.filtration === fromText) }));
  return { degree: chooseDegree(only, degreeText, file), filtration: fromText };
}

/** `--degree N` checked against the file's degrees, or 1 when the file has it, else the lowest degree present. */
export function chooseDegree(sets: readonly DiagramSet[], text: string | undefined, file: string): number {
  const present = sets.length > 0 ? [...new Set(sets[0].diagrams.map((d) => d.degree))] : [];
  if (text === undefined) {
    if (present.includes(1)) return 1;
    if (present.length === 0) throw new UserError('no diagrams in the file', { file });
    return Math.min(...present);
  }
  const degree = parseIntegerOption(text, '--degree', 0, MAX_DIAGRAM_DEGREE);
  if (!present.includes(degree)) {
    throw new UserError(
      `degree ${degree} is not in the file; it has degree${present.length === 1 ? '' : 's'} ${present.join(', ')}`,
      { file },
    );
  }
  return degree;
}

/** One line on stderr saying what the essential-class policy did, when there were any. */
function noteEssentialClasses(
  diagrams: readonly Diagram[],
  policy: InfinitePolicy,
  degree: number,
  quiet: boolean,
): void {
  if (quiet) return;
  let essential = 0;
  for (const d of diagrams)
    for (let i = 0; i < d.deaths.length; i++) if (d.deaths[i] === Infinity) essential++;
  if (essential === 0) return;
  const what = policy.mode === 'drop' ? 'dropped' : `clipped to death ${policy.value}`;
  const hint = policy.mode === 'drop' ? '; --infinite clip:VALUE keeps them' : '';
  process.stderr.write(
    `landform: note: ${essential} essential class${essential === 1 ? '' : 'es'} (death inf) of degree ${degree} ${what}${hint}\n`,
  );
}
