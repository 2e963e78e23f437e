import {
  type Channel,
  channelName,
  type DiagramSet,
  diagramOfChannel,
  finitePairs,
  type InfinitePolicy,
} from '../core/diagram.js';
import { Random } from '../core/random.js';
import { classesOf } from '../core/sample.js';
import { bottleneckDistance } from '../homology/distance.js';
import type { ChartSpec } from './charts.js';
import { classColour, degreeName } from './charts.js';
import { INK, SEQUENTIAL_RAMP } from './palette.js';
import type { ContrastTest } from './permutation.js';

/**
 * The distance map: bottleneck distances between the samples' diagrams of one channel (Cohen-Steiner,
 * Edelsbrunner and Harer, "Stability of persistence diagrams", 2007; src/homology/distance.ts), samples
 * ordered by class with the class boundaries marked. Where the diagrams alone tell the classes apart, the map
 * shows blocks: small distances inside a class, larger ones between classes. Nothing is learned.
 *
 * Cost: the bottleneck distance of two diagrams of s points each costs about s² log s (all point distances
 * sorted, then bisection over matchings), so the map draws at most DISTANCE_MAP_SAMPLES samples, drawn
 * evenly per class with the seed, and fewer when the channel's diagrams are large (DISTANCE_MAP_WORK).
 */

/** Samples drawn at most (evenly per class). 48 keeps the map at 2,304 cells, readable and about 150 kB of SVG. */
export const DISTANCE_MAP_SAMPLES = 48;

/**
 * Budget of the map's work, in pairs × (mean finite points per diagram)²: 10⁷ is about one second on one core
 * of the project's bench machine (measured on the demo: 2,775 pairs of 155-point H0 diagrams took 8 s).
 */
export const DISTANCE_MAP_WORK = 1e7;

/** Samples per class drawn at least; a channel too large for this many is passed over when another fits. */
export const DISTANCE_MAP_MIN_PER_CLASS = 5;

export interface DistanceMap {
  channel: Channel;
  metric: 'bottleneck';
  /** The samples drawn, ordered by class (classes in `classes` order), then by their order in the data. */
  samples: ReadonlyArray<{ id: string; label: string }>;
  /** Row-major samples × samples distances (symmetric, zero diagonal). */
  distances: Float64Array;
  /** Index of the first sample of each class after the first (where a boundary line is drawn). */
  boundaries: number[];
  /** Samples in the data. */
  total: number;
  /** Samples drawn per class at most. */
  perClass: number;
  seed: number;
  /** Why this channel was drawn, for the caption. */
  reason: string;
}

/**
 * Indices of at most `perClass` samples of every class, drawn without replacement with the seed; the result
 * is ordered by class (in `classes` order), then by index. A class with fewer samples gives all of them.
 */
export function evenSubsample(
  labels: readonly string[],
  classes: readonly string[],
  perClass: number,
  seed: number,
): Int32Array {
  const random = new Random(seed);
  const out: number[] = [];
  for (const label of classes) {
    const members: number[] = [];
    for (let i = 0; i < labels.length; i++) if (labels[i] === label) members.push(i);
    const take = Math.min(perClass, members.length);
    // Partial Fisher–Yates: after step k, members[0..k] is a uniform draw of k + 1 distinct members.
    for (let k = 0; k < take; k++) {
      const j = k + random.int(members.length - k);
      const t = members[k];
      members[k] = members[j];
      members[j] = t;
    }
    out.push(...members.slice(0, take).sort((a, b) => a - b));
  }
  return Int32Array.from(out);
}

/** Mean number of finite points of the channel's diagrams (after the essential-class policy). */
function meanSize(sets: readonly DiagramSet[], channel: Channel, infinite: InfinitePolicy): number {
  if (sets.length === 0) return 0;
  let sum = 0;
  for (const s of sets) sum += finitePairs(diagramOfChannel(s, channel), infinite).births.length;
  return sum / sets.length;
}

/** The most samples per class (≤ cap) whose map stays within the work budget. */
function affordablePerClass(classCount: number, size: number, cap: number, work: number): number {
  let q = cap;
  while (q > 1) {
    const n = q * classCount;
    if (((n * (n - 1)) / 2) * Math.max(1, size) ** 2 <= work) break;
    q--;
  }
  return q;
}

/**
 * The channel to draw: the one whose class contrasts are clearest (most differ at 5% after Holm, then the
 * smallest sum of raw p), among those that afford DISTANCE_MAP_MIN_PER_CLASS samples per class; with none
 * affordable, the cheapest. Ties go to the smaller diagrams.
 */
export function chooseMapChannel(
  sets: readonly DiagramSet[],
  channels: readonly Channel[],
  contrasts: readonly ContrastTest[],
  options: { infinite: InfinitePolicy; cap: number; work: number },
): { channel: Channel; perClass: number; reason: string } | undefined {
  const classes = classesOf(sets);
  const perClassCap = Math.max(1, Math.floor(options.cap / Math.max(1, classes.length)));
  const plans = channels.map((channel) => {
    const mine = contrasts.filter((t) => t.degree === channel.degree && t.filtration === channel.filtration);
    const size = meanSize(sets, channel, options.infinite);
    return {
      channel,
      size,
      differ: mine.filter((t) => t.pAdjusted <= 0.05).length,
      pSum: mine.reduce((s, t) => s + t.p, 0),
      tested: mine.length > 0,
      perClass: affordablePerClass(classes.length, size, perClassCap, options.work),
    };
  });
  if (plans.length === 0) return undefined;
  const enough = plans.filter((p) => p.perClass >= Math.min(DISTANCE_MAP_MIN_PER_CLASS, perClassCap));
  if (enough.length === 0) {
    const cheapest = [...plans].sort((a, b) => a.size - b.size)[0];
    return {
      channel: cheapest.channel,
      perClass: Math.min(perClassCap, DISTANCE_MAP_MIN_PER_CLASS),
      reason: `${channelName(cheapest.channel)} has the smallest diagrams of the channels (every channel is large, so few samples are drawn)`,
    };
  }
  const best = [...enough].sort((a, b) => b.differ - a.differ || a.pSum - b.pSum || a.size - b.size)[0];
  const reason =
    plans.length === 1
      ? `${channelName(best.channel)} is the channel of the landscapes`
      : !best.tested
        ? `${channelName(best.channel)} is the first channel of the landscapes`
        : enough.length === 1
          ? `${channelName(best.channel)} is the only channel whose map fits the time budget`
          : `${channelName(best.channel)} is the channel whose class contrasts are clearest (${best.differ} of its ${
              contrasts.filter(
                (t) => t.degree === best.channel.degree && t.filtration === best.channel.filtration,
              ).length
            } pairs differ at 5% after Holm)`;
  return { channel: best.channel, perClass: best.perClass, reason };
}

/** Bottleneck distances of the chosen samples' diagrams of one channel, after the essential-class policy. */
export function diagramDistanceMap(
  sets: readonly DiagramSet[],
  channel: Channel,
  options: { perClass: number; seed: number; infinite: InfinitePolicy; reason?: string },
): DistanceMap {
  const classes = classesOf(sets);
  const labels = sets.map((s) => s.label);
  const chosen = evenSubsample(labels, classes, options.perClass, options.seed);
  const n = chosen.length;
  const diagrams = Array.from(chosen, (i) =>
    finitePairs(diagramOfChannel(sets[i], channel), options.infinite),
  );
  const distances = new Float64Array(n * n);
  // Invariant: every entry (a, b) and (b, a) with a < i is final; the diagonal stays 0.
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const d = bottleneckDistance(diagrams[i], diagrams[j]);
      distances[i * n + j] = d;
      distances[j * n + i] = d;
    }
  }
  const boundaries: number[] = [];
  for (let k = 1; k < n; k++) if (labels[chosen[k]] !== labels[chosen[k - 1]]) boundaries.push(k);
  return {
    channel,
    metric: 'bottleneck',
    samples: Array.from(chosen, (i) => ({ id: sets[i].sample, label: sets[i].label })),
    distances,
    boundaries,
    total: sets.length,
    perClass: options.perClass,
    seed: options.seed,
    reason: options.reason ?? `${channelName(channel)} was asked for`,
  };
}

function round(v: number): number {
  return Number.isFinite(v) ? Number(v.toPrecision(4)) : v;
}

/**
 * The map as a heat map: cell (i, j) is the distance of samples i and j (dark = close), a strip of class
 * colours along the top, and lines at the class boundaries.
 */
export function distanceMapChart(map: DistanceMap, classes: readonly string[]): ChartSpec {
  const n = map.samples.length;
  const cells: Array<Record<string, unknown>> = [];
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++)
      cells.push({ i, i1: i + 1, j, j1: j + 1, d: round(map.distances[i * n + j]) });
  const strip = map.samples.map((s, i) => ({ i, i1: i + 1, class: s.label }));
  const lines = map.boundaries.map((b) => ({ at: b }));
  const side = Math.max(180, Math.min(360, 6 * n));
  // The top strip sits in [−⌈n/25⌉ − 1, −1] of the row axis, above row 0 (rows grow downwards).
  const band = Math.max(1, Math.ceil(n / 25));
  const domain = [-band - 1, n];
  const x = (field: string) => ({
    field,
    type: 'quantitative',
    scale: { domain: [0, n], nice: false, zero: false },
    axis: null,
  });
  const y = (field: string) => ({
    field,
    type: 'quantitative',
    scale: { domain, nice: false, zero: false, reverse: true },
    axis: null,
  });
  return {
    title: { text: `${degreeName(map.channel)} · bottleneck distance` },
    width: side,
    height: Math.round((side * (n + band + 1)) / n),
    layer: [
      {
        data: { values: cells },
        // No per-cell aria labels: thousands of them would triple the SVG; the figure's caption says what it is.
        mark: { type: 'rect', aria: false },
        encoding: {
          x: x('i'),
          x2: { field: 'i1' },
          y: y('j'),
          y2: { field: 'j1' },
          color: {
            field: 'd',
            type: 'quantitative',
            title: 'distance',
            scale: { range: [...SEQUENTIAL_RAMP].reverse(), zero: true },
          },
        },
      },
      {
        data: { values: strip.map((s) => ({ ...s, top: -band - 0.7, bottom: -0.3 })) },
        mark: { type: 'rect', aria: false },
        encoding: {
          x: x('i'),
          x2: { field: 'i1' },
          y: y('top'),
          y2: { field: 'bottom' },
          color: { field: 'class', type: 'nominal', title: 'class', scale: classColour(classes) },
        },
      },
      ...(lines.length > 0
        ? [
            {
              data: { values: lines },
              mark: { type: 'rule', color: INK, strokeWidth: 1.2 },
              encoding: { x: x('at') },
            },
            {
              data: { values: lines.map((l) => ({ ...l, from: 0, to: n })) },
              mark: { type: 'rule', color: INK, strokeWidth: 1.2 },
              encoding: { y: y('at'), x: x('from'), x2: { field: 'to' } },
            },
          ]
        : []),
    ],
    resolve: { scale: { color: 'independent' } },
  } as ChartSpec;
}
