import { type Command, Option } from 'commander';
import { checkFeatureColumns } from '../core/budgets.js';
import type { InfinitePolicy } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { SAMPLE_KINDS, type SampleKind } from '../core/sample.js';
import { shown } from '../core/text.js';
import { FEATURE_SET_NAMES, type FeatureSetName } from '../features/combined.js';
import type { DiagramOptions } from '../homology/compute.js';
import {
  describeSampleFiltration,
  FILTRATION_CHOICES,
  filtrationList,
  isImageFiltration,
  parseFiltrationList,
  type SampleFiltration,
} from '../homology/filtration.js';
import { IMAGE_FILTRATION_CHOICES, isBinaryFiltration } from '../homology/image-filtration.js';
import { METRICS, type Metric } from '../homology/metric.js';
import type { DelayEmbedding } from '../homology/signal.js';
import { describeSubsample, parseSubsample, type SubsampleSpec } from '../homology/subsample.js';
import { parseShape } from '../io/load.js';
import {
  DEFAULT_MODEL_NAMES,
  type Hyperparameters,
  MODEL_NAMES,
  type ModelName,
} from '../learn/classifier.js';
import type { LandscapeCandidate } from '../learn/select.js';
import {
  closestNames,
  parseChoiceOption,
  parseDegreesOption,
  parseInfiniteOption,
  parseIntegerOption,
  parseListOption,
  parseNumberOption,
  parseWorkersOption,
  renamedOption,
} from './options.js';

/**
 * The options several commands share, defined and parsed here once, with one set of limits:
 *
 * - diagram options (`addDiagramOptions` / `parseDiagramOptions`): how samples become diagrams — diagrams,
 *   contrast, evaluate, train, vectorize;
 * - landscape options (`addLandscapeOptions` / `parseLandscapeOptions`): one landscape's depth, grid size and
 *   essential-class policy — contrast, vectorize, landscape;
 * - study options (`addStudyOptions` / `parseStudyOptions`): the models, feature sets and inner search —
 *   evaluate (lists) and train (one of each).
 *
 * Names: `--metric` is always the distance between points; `--grid-size` (one) / `--grid-sizes` (a list) is
 * always the number of grid points of a landscape; a plural option takes a list, a singular one one value.
 * Renamed options stay accepted for one release, hidden from help, with a note (`renamedOption`).
 */

// ---- limits (one set for every command) ----

/** Delay embedding: the dimension, delay and stride of `--embed DIM:DELAY[:STRIDE]`. Common practice, no source. */
export const EMBED_LIMITS = { dimension: 1000, delay: 1_000_000, stride: 1_000_000 } as const;
/** `--workers`: the largest count accepted before capping at the cores. */
export const MAX_WORKERS = 1024;
/** `--depth` / `--depths`: landscape layers. */
export const MAX_DEPTH = 10_000;
/** `--grid-size` / `--grid-sizes`: grid points per degree and layer. */
export const MAX_GRID_SIZE = 100_000;
/** Homology degrees computed from samples. */
export const MAX_DEGREE = 2;

// ---- filtration (part of the diagram options) ----

/**
 * The filtration words of `--filtration` (the head of an item before any ':'), for "did you mean" only;
 * the parser in src/homology/filtration.ts stays the judge of what is valid.
 */
const FILTRATION_WORDS = [
  'rips',
  'dtm',
  'alpha',
  'grey',
  'height',
  'radial',
  'distance',
  'dilation',
  'erosion',
  'density',
  'heights',
  'radials',
] as const;

export interface FiltrationChoice {
  /** One filtration, or (two or more) the list in the order given. */
  filtration: SampleFiltration | SampleFiltration[];
  subsample?: SubsampleSpec;
  /** Foreground threshold of the binarised image filtrations (default: Otsu's per image). */
  threshold?: number;
}

/**
 * `--filtration LIST` (comma-separated: rips, dtm:K, alpha for clouds and matrices; grey, height:ROW:COL,
 * radial:ROW:COL, distance, dilation, erosion, density:R, heights:N, radials:N for images), `--threshold V`
 * (binarised image filtrations) and `--subsample maxmin:N[:SEED]|random:N[:SEED]`.
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

export function parseFiltrationOptions(opts: {
  filtration?: string;
  subsample?: string;
  threshold?: string;
}): FiltrationChoice {
  const text = opts.filtration ?? 'rips';
  for (const item of text.split(',')) {
    const head = item.trim().split(':')[0];
    if (head === '' || (FILTRATION_WORDS as readonly string[]).includes(head)) continue;
    const close = closestNames(head, FILTRATION_WORDS);
    const hint = close.length === 0 ? '' : ` (did you mean ${close.join(' or ')}?)`;
    throw new UserError(
      `--filtration '${shown(item.trim())}' is not known${hint}; choose ${FILTRATION_CHOICES} for clouds and matrices, or for images ${IMAGE_FILTRATION_CHOICES}`,
    );
  }
  const list = parseFiltrationList(text);
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

// ---- diagram options ----

/** The raw text of the diagram options, as commander gives it. */
export interface DiagramFlags {
  kind?: string;
  shape?: string;
  degrees?: string;
  maxScale?: string;
  metric?: string;
  embed?: string;
  superlevel?: boolean;
  workers?: string;
  quiet?: boolean;
  filtration?: string;
  subsample?: string;
  threshold?: string;
}

/** Adds the options that say how diagrams are computed (diagrams, contrast, evaluate, train, vectorize). */
export function addDiagramOptions(command: Command): Command {
  return addFiltrationOptions(command)
    .option('--kind <kind>', `sample kind: ${SAMPLE_KINDS.join(', ')} (default: detected from the input)`)
    .option(
      '--shape <RxC>',
      'image table CSV (sample,label, then the pixels row by row): the shape of every image, ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS',
    )
    .option('--degrees <list>', `homology degrees, from 0 to ${MAX_DEGREE}`, '0,1')
    .option('--max-scale <r>', 'largest Rips scale kept; classes alive there get death inf (default: none)')
    .option('--metric <name>', `distance between points: ${METRICS.join(', ')}`, 'euclidean')
    .option('--embed <DIM:DELAY[:STRIDE]>', 'turn each signal into a cloud of delay windows before Rips')
    .option(
      '--superlevel',
      'images and signals: superlevel sets (bright first), reported on the negated scale',
    )
    .option('--workers <n>', 'threads: this one and n − 1 workers (default: every core)');
}

/** The parsed diagram options: what the library takes, and what the command records. */
export interface ParsedDiagramOptions {
  degrees: number[];
  diagramOptions: DiagramOptions;
  /** The filtration, landmarks and threshold as given (for `filtrationRecord`). */
  choice: FiltrationChoice;
  workers?: number;
  kind?: SampleKind;
  shape?: number[];
}

export function parseDiagramOptions(o: DiagramFlags): ParsedDiagramOptions {
  const degrees = parseDegreesOption(o.degrees ?? '0,1', '--degrees', MAX_DEGREE);
  const metric = parseChoiceOption(o.metric ?? 'euclidean', '--metric', METRICS) as Metric;
  const maxScale =
    o.maxScale === undefined ? undefined : parseNumberOption(o.maxScale, '--max-scale', { positive: true });
  const embed = o.embed === undefined ? undefined : parseEmbedOption(o.embed);
  const workers =
    o.workers === undefined ? undefined : parseWorkersOption(o.workers, o.quiet === true, MAX_WORKERS);
  const kind =
    o.kind === undefined ? undefined : (parseChoiceOption(o.kind, '--kind', SAMPLE_KINDS) as SampleKind);
  const choice = parseFiltrationOptions(o);
  const diagramOptions: DiagramOptions = { degrees, metric };
  if (maxScale !== undefined) diagramOptions.maxScale = maxScale;
  if (embed !== undefined) diagramOptions.embed = embed;
  if (o.superlevel) diagramOptions.superlevel = true;
  if (choice.filtration !== 'rips') diagramOptions.filtration = choice.filtration;
  if (choice.subsample !== undefined) diagramOptions.subsample = choice.subsample;
  if (choice.threshold !== undefined) diagramOptions.threshold = choice.threshold;
  return {
    degrees,
    diagramOptions,
    choice,
    ...(workers !== undefined ? { workers } : {}),
    ...(kind !== undefined ? { kind } : {}),
    ...(o.shape !== undefined ? { shape: parseShape(o.shape) } : {}),
  };
}

/** `DIM:DELAY[:STRIDE]` → a delay embedding, within `EMBED_LIMITS`. */
export function parseEmbedOption(text: string, option = '--embed'): DelayEmbedding {
  const parts = text.split(':');
  if (parts.length < 2 || parts.length > 3) {
    throw new UserError(
      `${option} '${text}' must look like DIM:DELAY or DIM:DELAY:STRIDE, e.g. 3:4 or 3:4:2`,
    );
  }
  const dimension = parseIntegerOption(parts[0], `${option} DIM`, 1, EMBED_LIMITS.dimension);
  const delay = parseIntegerOption(parts[1], `${option} DELAY`, 1, EMBED_LIMITS.delay);
  const stride =
    parts.length === 3 ? parseIntegerOption(parts[2], `${option} STRIDE`, 1, EMBED_LIMITS.stride) : undefined;
  return stride === undefined ? { dimension, delay } : { dimension, delay, stride };
}

/** How the diagrams were computed, as recorded in metrics.json and manifests (stable key order). */
export function diagramRecord(kind: SampleKind, d: DiagramOptions): Record<string, unknown> | string {
  if (kind === 'diagrams') return 'given';
  return {
    degrees: d.degrees,
    metric: d.metric ?? 'euclidean',
    maxScale: d.maxScale ?? null,
    embed: d.embed ?? null,
    superlevel: d.superlevel === true,
    ...filtrationRecord({
      filtration: d.filtration === undefined ? 'rips' : [...filtrationList(d.filtration)],
      ...(d.subsample ? { subsample: d.subsample } : {}),
      ...(d.threshold !== undefined ? { threshold: d.threshold } : {}),
    }),
  };
}

// ---- landscape options ----

export interface LandscapeFlags {
  depth?: string;
  gridSize?: string;
  /** The old name of --grid-size (contrast), accepted for one release. */
  gridCount?: string;
  infinite?: string;
  quiet?: boolean;
}

/**
 * `--depth K`, `--grid-size G` (grid points per degree and layer) and `--infinite drop|clip:VALUE`, with the
 * command's defaults. `oldGridCount` keeps contrast's former `--grid-count` working, hidden, for one release.
 */
export function addLandscapeOptions(
  command: Command,
  defaults: { depth: number; gridSize: number; gridHelp?: string; oldGridCount?: boolean },
): Command {
  command
    .option('--depth <K>', 'landscape layers λ1..λK', String(defaults.depth))
    .option(
      '--grid-size <G>',
      `${defaults.gridHelp ?? 'grid points per degree and layer'} (default: ${defaults.gridSize})`,
    )
    .option('--infinite <policy>', "essential classes (death inf): 'drop' or 'clip:VALUE'", 'drop');
  if (defaults.oldGridCount) command.addOption(new Option('--grid-count <G>').hideHelp());
  return command;
}

export interface ParsedLandscapeOptions {
  depth: number;
  gridSize: number;
  /** True when --grid-size (or its old name) was given, false when the default applies. */
  gridSizeGiven: boolean;
  infinite: InfinitePolicy;
}

export function parseLandscapeOptions(
  o: LandscapeFlags,
  defaults: { gridSize: number },
): ParsedLandscapeOptions {
  const depth = parseIntegerOption(o.depth ?? '5', '--depth', 1, MAX_DEPTH);
  const text = renamedOption(o, {
    key: 'gridSize',
    flag: '--grid-size',
    oldKey: 'gridCount',
    oldFlag: '--grid-count',
  });
  const gridSize =
    text === undefined ? defaults.gridSize : parseIntegerOption(text, '--grid-size', 2, MAX_GRID_SIZE);
  const infinite = parseInfiniteOption(o.infinite ?? 'drop', '--infinite');
  return { depth, gridSize, gridSizeGiven: text !== undefined, infinite };
}

// ---- study options (evaluate: lists; train: one of each) ----

/** The raw text of the study options. */
export interface StudyFlags extends DiagramFlags {
  seed: string;
  /** evaluate: a list; train: the old name of --model. */
  models?: string;
  /** train: one model. */
  model?: string;
  /** evaluate: a list. */
  featureSets?: string;
  /** train: one feature set. */
  featureSet?: string;
  /** The old name of --feature-sets / --feature-set. */
  features?: string;
  innerFolds: string;
  depths: string;
  gridSizes: string;
  infinite: string;
  svmKernel?: string;
  svmC?: string;
  svmGamma?: string;
  pcaVariance?: string;
  progress?: string;
}

/**
 * Adds the options shared by `evaluate` and `train`: the diagram options, `--infinite`, `--seed`, the models
 * and feature sets (`single`: `--model NAME` and `--feature-set NAME`; otherwise the lists `--models` and
 * `--feature-sets`), the inner search and the pca-svm values.
 */
export function addStudyOptions(command: Command, single = false): Command {
  addDiagramOptions(command)
    .option('--infinite <policy>', "essential classes (death inf): 'drop' or 'clip:VALUE'", 'drop')
    .option('--seed <n>', 'seed of every split and model', '1');
  if (single) {
    command
      .option('--model <name>', `the model: ${MODEL_NAMES.join(', ')} (default: pca-svm)`)
      .option(
        '--feature-set <name>',
        `the feature set: ${FEATURE_SET_NAMES.join(', ')} (default: landscape; raw for tables)`,
      )
      .addOption(new Option('--models <name>').hideHelp())
      .addOption(new Option('--features <name>').hideHelp());
  } else {
    command
      .option(
        '--models <list>',
        `models: ${MODEL_NAMES.join(', ')} (default: ${DEFAULT_MODEL_NAMES.join(', ')})`,
      )
      .option(
        '--feature-sets <list>',
        `feature sets: ${FEATURE_SET_NAMES.join(', ')} (default: landscape, raw, combined, those the kind allows)`,
      )
      .addOption(new Option('--features <list>').hideHelp());
  }
  return command
    .option('--inner-folds <k>', 'folds of the inner cross-validation that chooses hyperparameters', '3')
    .option('--depths <list>', 'landscape depths K tried by the inner cross-validation', '5,3')
    .option(
      '--grid-sizes <list>',
      'landscape grid sizes G (grid points) tried by the inner cross-validation',
      '50,25',
    )
    .option('--svm-kernel <kernel>', 'pca-svm: fix the kernel, linear or rbf (default: searched)')
    .option('--svm-c <C>', 'pca-svm: fix the cost C > 0 (default: searched)')
    .option(
      '--svm-gamma <gamma>',
      'pca-svm: fix the RBF width γ > 0 (default: searched, scaled by 1/features)',
    )
    .option('--pca-variance <share>', "pca-svm: share of variance the PCA keeps, in (0, 1], or 'all'", '0.95')
    .option(
      '--progress <mode>',
      'auto (a bar on a terminal), lines (plain lines on stderr, also in pipes) or none',
    );
}

/** The parsed study options, before the dataset is read. */
export interface ParsedStudyOptions {
  diagrams: ParsedDiagramOptions;
  seed: number;
  innerFolds: number;
  models: ModelName[];
  /** undefined: the default sets of the dataset's kind. */
  featureSets?: FeatureSetName[];
  landscapeCandidates: LandscapeCandidate[];
  infinite: InfinitePolicy;
  model: { fixed: Partial<Record<ModelName, Hyperparameters>>; record: Record<string, unknown> };
  /** Landscape columns at the largest candidate (every degree × largest depth × largest grid size). */
  landscapeColumns: number;
}

/** The options that set the landscape columns of a study, as the budget's message names them. */
export const STUDY_COLUMN_OPTIONS = '--degrees × --depths × --grid-sizes';

export function parseStudyOptions(o: StudyFlags, single = false): ParsedStudyOptions {
  const diagrams = parseDiagramOptions(o);
  const seed = parseIntegerOption(o.seed, '--seed', 0, 2 ** 32 - 1);
  const innerFolds = parseIntegerOption(o.innerFolds, '--inner-folds', 2, 100);
  const depths = parsePositiveList(o.depths, '--depths', 1, MAX_DEPTH);
  const gridSizes = parsePositiveList(o.gridSizes, '--grid-sizes', 2, MAX_GRID_SIZE);
  const infinite = parseInfiniteOption(o.infinite, '--infinite');
  const flags = o as unknown as Record<string, unknown>;
  let models: ModelName[];
  let featureSets: FeatureSetName[] | undefined;
  if (single) {
    const model = renamedOption(flags, {
      key: 'model',
      flag: '--model',
      oldKey: 'models',
      oldFlag: '--models',
    });
    models = [model === undefined ? 'pca-svm' : singleChoice(model, '--model', MODEL_NAMES)];
    const set = renamedOption(flags, {
      key: 'featureSet',
      flag: '--feature-set',
      oldKey: 'features',
      oldFlag: '--features',
    });
    featureSets = set === undefined ? undefined : [singleChoice(set, '--feature-set', FEATURE_SET_NAMES)];
  } else {
    models =
      o.models === undefined ? [...DEFAULT_MODEL_NAMES] : parseListOption(o.models, '--models', MODEL_NAMES);
    const sets = renamedOption(flags, {
      key: 'featureSets',
      flag: '--feature-sets',
      oldKey: 'features',
      oldFlag: '--features',
    });
    featureSets = sets === undefined ? undefined : parseListOption(sets, '--feature-sets', FEATURE_SET_NAMES);
  }
  const landscapeCandidates: LandscapeCandidate[] = [];
  for (const depth of depths) for (const gridSize of gridSizes) landscapeCandidates.push({ depth, gridSize });
  const landscapeColumns = diagrams.degrees.length * Math.max(...depths) * Math.max(...gridSizes);
  if (featureSets === undefined || usesLandscape(featureSets))
    checkFeatureColumns(landscapeColumns, STUDY_COLUMN_OPTIONS);
  return {
    diagrams,
    seed,
    innerFolds,
    models,
    ...(featureSets !== undefined ? { featureSets } : {}),
    landscapeCandidates,
    infinite,
    model: parseModelOptions(o, models),
    landscapeColumns,
  };
}

/** True when a feature set of the list has landscape columns. */
export function usesLandscape(sets: readonly FeatureSetName[]): boolean {
  return sets.includes('landscape') || sets.includes('combined');
}

/** One value of a choice option that takes one; a list is refused with the plural option's name. */
function singleChoice<T extends string>(text: string, option: string, allowed: readonly T[]): T {
  if (text.includes(','))
    throw new UserError(
      `${option} takes one value here, got '${text}'; pick one (evaluate compares several)`,
    );
  return parseChoiceOption(text, option, allowed);
}

function parsePositiveList(text: string, option: string, min: number, max: number): number[] {
  const parts = text
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
  if (parts.length === 0)
    throw new UserError(`${option} is empty; give one or more whole numbers such as 3,5`);
  return [...new Set(parts.map((p) => parseIntegerOption(p, option, min, max)))];
}

/**
 * The pca-svm values fixed by --svm-kernel, --svm-c, --svm-gamma and --pca-variance (the inner search then
 * keeps only candidates with them), and what metrics.json and the manifest record of them.
 */
export function parseModelOptions(
  o: Pick<StudyFlags, 'svmKernel' | 'svmC' | 'svmGamma' | 'pcaVariance'>,
  models: readonly ModelName[],
): { fixed: Partial<Record<ModelName, Hyperparameters>>; record: Record<string, unknown> } {
  const fixed: Hyperparameters = {};
  if (o.svmKernel !== undefined)
    fixed.kernel = parseChoiceOption(o.svmKernel, '--svm-kernel', ['linear', 'rbf']);
  if (o.svmC !== undefined) fixed.C = parseNumberOption(o.svmC, '--svm-c', { positive: true });
  if (o.svmGamma !== undefined) {
    if (fixed.kernel === 'linear')
      throw new UserError('--svm-gamma applies to the rbf kernel; drop it or use --svm-kernel rbf');
    fixed.gamma = parseNumberOption(o.svmGamma, '--svm-gamma', { positive: true });
  }
  const variance = o.pcaVariance ?? '0.95';
  let pcaVariance: number | 'all' = 'all';
  if (variance !== 'all') {
    pcaVariance = Number(variance);
    if (variance.trim() === '' || !(pcaVariance > 0 && pcaVariance <= 1))
      throw new UserError(`--pca-variance '${variance}' must be a share in (0, 1] such as 0.95, or 'all'`);
    if (pcaVariance !== 0.95) fixed.varianceKept = pcaVariance;
  } else fixed.varianceKept = 1;
  const given = Object.keys(fixed).length > 0;
  if (given && !models.includes('pca-svm')) {
    throw new UserError(
      '--svm-kernel, --svm-c, --svm-gamma and --pca-variance apply to pca-svm, which is not among the models; add it or drop them',
    );
  }
  const record = models.includes('pca-svm')
    ? {
        'pca-svm': {
          kernel: fixed.kernel ?? 'searched',
          C: fixed.C ?? 'searched',
          gamma: fixed.gamma ?? (fixed.kernel === 'linear' ? null : 'searched'),
          pcaVariance,
        },
      }
    : {};
  return { fixed: given ? { 'pca-svm': fixed } : {}, record };
}
