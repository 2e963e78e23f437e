import type { Command } from 'commander';
import { UserError } from '../core/errors.js';
import {
  describeFiltration,
  FILTRATION_CHOICES,
  type Filtration,
  parseFiltration,
} from '../homology/filtration.js';
import { describeSubsample, parseSubsample, type SubsampleSpec } from '../homology/subsample.js';

/**
 * The two options shared by every command that computes diagrams: `--filtration rips|dtm:K|alpha` and
 * `--subsample maxmin:N[:SEED]|random:N[:SEED]`. Add them with `addFiltrationOptions(cmd)` and read them
 * with `parseFiltrationOptions(opts)`; the result goes into `DiagramOptions`.
 */
export function addFiltrationOptions(cmd: Command): Command {
  return cmd
    .option(
      '--filtration <name>',
      'how clouds and distance matrices are filtered: rips (distances), dtm:K (distance to measure over K neighbours, resists outliers; radii) or alpha (2-D clouds, fast for large ones; radii)',
      'rips',
    )
    .option(
      '--subsample <spec>',
      'keep N landmarks of each cloud or matrix before the filtration: maxmin:N[:SEED] (farthest point) or random:N[:SEED]; the covering radius is recorded',
    );
}

export interface FiltrationChoice {
  filtration: Filtration;
  subsample?: SubsampleSpec;
}

export function parseFiltrationOptions(opts: { filtration?: string; subsample?: string }): FiltrationChoice {
  const text = opts.filtration ?? 'rips';
  const filtration = parseFiltration(text);
  if (!filtration) throw new UserError(`--filtration '${text}' is not known; choose ${FILTRATION_CHOICES}`);
  if (opts.subsample === undefined) return { filtration };
  const subsample = parseSubsample(opts.subsample);
  if (!subsample) {
    throw new UserError(
      `--subsample '${opts.subsample}' must look like maxmin:N or random:N, optionally with :SEED (e.g. maxmin:500:7), N ≥ 1`,
    );
  }
  return { filtration, subsample };
}

/**
 * What to record in an output's provenance (`options`): the filtration, the landmark rule and, when
 * landmarks were taken, each sample's covering radius (from `computeDiagrams`), plus the largest of them.
 */
export function filtrationRecord(
  choice: FiltrationChoice,
  sets: ReadonlyArray<{ sample: string; coveringRadius?: number }> = [],
): Record<string, unknown> {
  const record: Record<string, unknown> = { filtration: describeFiltration(choice.filtration) };
  if (choice.subsample === undefined) return record;
  record.subsample = describeSubsample(choice.subsample);
  const radii: Record<string, number> = {};
  let largest = 0;
  for (const set of sets) {
    if (set.coveringRadius === undefined) continue;
    radii[set.sample] = set.coveringRadius;
    if (set.coveringRadius > largest) largest = set.coveringRadius;
  }
  record.coveringRadius = { largest, perSample: radii };
  return record;
}
