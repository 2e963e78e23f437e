import {
  asChannel,
  type Channel,
  channelsOf,
  type DiagramSet,
  diagramOfChannel,
  finitePairs,
  type InfinitePolicy,
} from '../core/diagram.js';
import { classesOf } from '../core/sample.js';
import {
  coveringGrid,
  type ExactLandscape,
  exactLandscape,
  type Grid,
  meanLandscape,
  sampleLandscape,
} from '../landscape/index.js';
import { type BandOptions, multiplierBand, type SampledBand } from './bands.js';
import type { LandscapeStack } from './stack.js';

/**
 * Per-class mean landscapes: the exact piecewise-linear mean (the landscape algebra's `meanLandscape`) and
 * the sampled mean on a grid shared by all classes of a degree, with its simultaneous band.
 */
export interface ClassMeansOptions {
  /** Homology degrees. Default [0, 1]. */
  degrees?: readonly number[];
  /** Landscape depth K (layers 1..K). Default 5. */
  depth?: number;
  /** Points of the grid per degree, which spans every finite pair of every sample. Default 100. */
  gridSize?: number;
  /** What to do with essential classes before computing landscapes. Default drop. */
  infinite?: InfinitePolicy;
  band?: BandOptions;
  /** Also compute the exact mean per class (costs more with many samples). Default true. */
  exact?: boolean;
}

export const DEFAULT_CLASS_MEANS_OPTIONS = {
  degrees: [0, 1],
  depth: 5,
  gridSize: 100,
  exact: true,
} as const;

export interface ClassMean {
  label: string;
  samples: number;
  band: SampledBand;
  exact?: ExactLandscape;
}

/** The class means of one channel: a degree, or one filtration's degree when samples were filtered several ways. */
export interface DegreeMeans {
  degree: number;
  filtration?: string;
  grid: Grid;
  classes: ClassMean[];
}

/**
 * The grid of `count` points spanning the finite pairs of one degree (or channel) in every set ([0, 1] when
 * there are none).
 */
export function sharedGrid(
  sets: readonly DiagramSet[],
  slot: number | Channel,
  count: number,
  infinite: InfinitePolicy = { mode: 'drop' },
): Grid {
  const channel = asChannel(slot);
  const diagrams = sets.map((s) => finitePairs(diagramOfChannel(s, channel), infinite));
  return coveringGrid(diagrams, count) ?? { start: 0, stop: 1, count };
}

/** Per class (sorted labels), the stack of sampled landscapes of one degree (or channel) on `grid`. */
export function classStacks(
  sets: readonly DiagramSet[],
  slot: number | Channel,
  grid: Grid,
  depth: number,
  infinite: InfinitePolicy = { mode: 'drop' },
): Array<{ label: string; stack: LandscapeStack; members: DiagramSet[] }> {
  const width = depth * grid.count;
  const channel = asChannel(slot);
  return classesOf(sets).map((label) => {
    const members = sets.filter((s) => s.label === label);
    const values = new Float64Array(members.length * width);
    for (let i = 0; i < members.length; i++) {
      sampleLandscape(
        finitePairs(diagramOfChannel(members[i], channel), infinite),
        grid,
        depth,
        values,
        i * width,
      );
    }
    return { label, members, stack: { samples: members.length, depth, grid, values } };
  });
}

export function classMeans(sets: readonly DiagramSet[], options: ClassMeansOptions = {}): DegreeMeans[] {
  const degrees = options.degrees ?? DEFAULT_CLASS_MEANS_OPTIONS.degrees;
  const depth = options.depth ?? DEFAULT_CLASS_MEANS_OPTIONS.depth;
  const gridSize = options.gridSize ?? DEFAULT_CLASS_MEANS_OPTIONS.gridSize;
  const infinite = options.infinite ?? { mode: 'drop' };
  const exact = options.exact ?? DEFAULT_CLASS_MEANS_OPTIONS.exact;
  // One entry per channel: per degree, or per filtration and degree when the samples were filtered several ways.
  return channelsOf(sets, degrees).map((channel) => {
    const grid = sharedGrid(sets, channel, gridSize, infinite);
    const classes = classStacks(sets, channel, grid, depth, infinite).map(({ label, stack, members }) => ({
      label,
      samples: stack.samples,
      band: multiplierBand(stack, options.band),
      ...(exact
        ? {
            exact: meanLandscape(
              members.map((m) =>
                exactLandscape(finitePairs(diagramOfChannel(m, channel), infinite), { maxDepth: depth }),
              ),
            ),
          }
        : {}),
    }));
    return { ...channel, grid, classes };
  });
}
