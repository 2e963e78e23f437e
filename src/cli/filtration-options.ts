import type { Command } from 'commander';
import { UserError } from '../core/errors.js';
import {
  describeSampleFiltration,
  filtrationList,
  isImageFiltration,
  parseFiltrationList,
  type SampleFiltration,
} from '../homology/filtration.js';
import { isBinaryFiltration } from '../homology/image-filtration.js';
import { describeSubsample, parseSubsample, type SubsampleSpec } from '../homology/subsample.js';

/**
 * The options shared by every command that computes diagrams: `--filtration LIST` (comma-separated: rips,
 * dtm:K, alpha for clouds and matrices; grey, height:ROW:COL, radial:ROW:COL, distance, dilation, erosion,
 * density:R, heights:N, radials:N for images), `--threshold V` (binarised image filtrations) and
 * `--subsample maxmin:N[:SEED]|random:N[:SEED]`. Add them with `addFiltrationOptions(cmd)` and read them with
 * `parseFiltrationOptions(opts)`; the result goes into `DiagramOptions`.
 */
export function addFiltrationOptions(cmd: Command): Command {
  return cmd
    .option(
      '--filtration <list>',
      'how samples are filtered, one or a comma-separated list (diagrams tagged per filtration). Clouds and distance matrices: rips (distances), dtm:K (distance to measure over K neighbours, resists outliers; radii), alpha (2-D clouds, fast for large ones; radii). Images (default grey): grey, height:ROW:COL (direction), radial:ROW:COL (centre, pixels or P%), distance (signed), dilation, erosion, density:R, presets heights:N, radials:N',
      'rips',
    )
    .option(
      '--threshold <v>',
      "images: a pixel is foreground when its value is ≥ v, for every filtration but grey (default: each image's Otsu threshold)",
    )
    .option(
      '--subsample <spec>',
      'keep N landmarks of each cloud or matrix before the filtration: maxmin:N[:SEED] (farthest point) or random:N[:SEED]; the covering radius is recorded',
    );
}

export interface FiltrationChoice {
  /** One filtration, or (two or more) the list in the order given. */
  filtration: SampleFiltration | SampleFiltration[];
  subsample?: SubsampleSpec;
  /** Foreground threshold of the binarised image filtrations (default: Otsu's per image). */
  threshold?: number;
}

export function parseFiltrationOptions(opts: {
  filtration?: string;
  subsample?: string;
  threshold?: string;
}): FiltrationChoice {
  const list = parseFiltrationList(opts.filtration ?? 'rips');
  const filtration = list.length === 1 ? list[0] : list;
  const threshold = opts.threshold === undefined ? undefined : parseThreshold(opts.threshold);
  const base: FiltrationChoice = threshold === undefined ? { filtration } : { filtration, threshold };
  if (opts.subsample === undefined) return base;
  const subsample = parseSubsample(opts.subsample);
  if (!subsample) {
    throw new UserError(
      `--subsample '${opts.subsample}' must look like maxmin:N or random:N, optionally with :SEED (e.g. maxmin:500:7), N ≥ 1`,
    );
  }
  return { ...base, subsample };
}

function parseThreshold(text: string): number {
  const value = Number(text);
  if (text.trim() === '' || !Number.isFinite(value))
    throw new UserError(
      `--threshold '${text}' is not a finite number; give the grey level from which a pixel is foreground`,
    );
  return value;
}

/**
 * What to record in an output's provenance (`options`): the filtration (the canonical list, comma-separated),
 * the binarisation threshold when an image filtration binarises ('otsu' by default), the landmark rule and,
 * when landmarks were taken, each sample's covering radius (from `computeDiagrams`), plus the largest of them.
 */
export function filtrationRecord(
  choice: FiltrationChoice,
  sets: ReadonlyArray<{ sample: string; coveringRadius?: number }> = [],
): Record<string, unknown> {
  const list = filtrationList(choice.filtration);
  const record: Record<string, unknown> = { filtration: list.map(describeSampleFiltration).join(',') };
  if (list.some((f) => isImageFiltration(f) && isBinaryFiltration(f)))
    record.threshold = choice.threshold ?? 'otsu';
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
