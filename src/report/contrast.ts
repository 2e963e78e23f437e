import { channelName, channelsOf, type DiagramSet, type InfinitePolicy } from '../core/diagram.js';
import { classesOf } from '../core/sample.js';
import { classStacks, sharedGrid } from './means.js';
import {
  BASE_PERMUTATIONS,
  type ContrastTest,
  contrastAll,
  DEFAULT_PERMUTATION_OPTIONS,
  permutationReach,
  permutationsForFamily,
  unreachableSentence,
} from './permutation.js';

/**
 * `contrast`: for every pair of classes and every degree, a permutation test of equal mean landscapes
 * (see permutation.ts), with Holm's correction over the whole family — every pair × every degree of one run.
 * Landscapes are sampled on one grid per degree spanning every sample's finite pairs, so the Lp distance of
 * the means is integrated (trapezoid rule) on that grid. When samples were filtered several ways, each
 * filtration's degree is its own channel (own grid, own tests) and Holm's family spans all of them.
 */
export interface ContrastOptions {
  /** Homology degrees. Default [0, 1], as every command. */
  degrees?: readonly number[];
  /** Landscape depth K. Default 5. */
  depth?: number;
  /** Grid points per degree. Default 200. */
  gridSize?: number;
  /**
   * Relabellings per test, as given. Default: enough for the family (`permutationsForFamily`): at least
   * `basePermutations`, raised for a large family so that its smallest adjusted p can reach 0.01, at most
   * PERMUTATION_BUDGET (9,999).
   */
  permutations?: number;
  /** The least relabellings per test when `permutations` is not given. Default 999. */
  basePermutations?: number;
  /** p of the Lp distance between means (≥ 1, or Infinity). Default 2. */
  p?: number;
  /** Default 1. */
  seed?: number;
  infinite?: InfinitePolicy;
  onProgress?: (done: number, total: number) => void;
}

export const DEFAULT_CONTRAST_OPTIONS = {
  degrees: [0, 1],
  depth: 5,
  gridSize: 200,
  ...DEFAULT_PERMUTATION_OPTIONS,
} as const;

export interface ContrastResult {
  classes: string[];
  tests: ContrastTest[];
  /** Relabellings per test actually used (the given count, or the one chosen for the family). */
  permutations: number;
  /** The grid of each degree. */
  grids: Array<{ degree: number; filtration?: string; start: number; stop: number; count: number }>;
}

export function contrastDiagrams(sets: readonly DiagramSet[], options: ContrastOptions = {}): ContrastResult {
  const degrees = options.degrees ?? DEFAULT_CONTRAST_OPTIONS.degrees;
  const depth = options.depth ?? DEFAULT_CONTRAST_OPTIONS.depth;
  const gridSize = options.gridSize ?? DEFAULT_CONTRAST_OPTIONS.gridSize;
  const infinite = options.infinite ?? { mode: 'drop' };
  const grids = channelsOf(sets, degrees).map((channel) => ({
    ...channel,
    ...sharedGrid(sets, channel, gridSize, infinite),
  }));
  const stacks = grids.map((g) => ({
    degree: g.degree,
    ...(g.filtration !== undefined ? { filtration: g.filtration } : {}),
    classes: classStacks(sets, g, { start: g.start, stop: g.stop, count: g.count }, depth, infinite).map(
      ({ label, stack }) => ({ label, stack }),
    ),
  }));
  const classes = classesOf(sets);
  const family = stacks.reduce((m, d) => m + (d.classes.length * (d.classes.length - 1)) / 2, 0);
  const permutations =
    options.permutations ?? permutationsForFamily(family, options.basePermutations ?? BASE_PERMUTATIONS);
  const tests = contrastAll(stacks, {
    permutations,
    p: options.p,
    seed: options.seed,
    onProgress: options.onProgress,
  });
  return { classes, tests, grids, permutations };
}

/** Compact, stable number text for JSON contracts: up to 6 significant digits. */
function num(v: number): number {
  return Number.isFinite(v) ? Number(v.toPrecision(6)) : v;
}

/** The JSON contract: {"tests":[{"a","b","degree","statistic","p","pAdjusted"}]} plus provenance fields. */
export function contrastJson(result: ContrastResult, extra: Record<string, unknown> = {}): string {
  const tests = result.tests.map((t) => ({
    a: t.a,
    b: t.b,
    degree: t.degree,
    ...(t.filtration !== undefined ? { filtration: t.filtration } : {}),
    statistic: num(t.statistic),
    p: num(t.p),
    pAdjusted: num(t.pAdjusted),
  }));
  return `${JSON.stringify({ ...extra, classes: result.classes, tests }, null, 2)}\n`;
}

/** A plain-text table for reading in a terminal. */
export function contrastText(result: ContrastResult, permutations = result.permutations): string {
  const header = ['degree', 'class a', 'class b', 'n a', 'n b', 'distance', 'p', 'p (Holm)', ''];
  const rows = result.tests.map((t) => [
    channelName(t),
    t.a,
    t.b,
    String(t.sizes[0]),
    String(t.sizes[1]),
    t.statistic.toPrecision(4),
    t.p.toFixed(4),
    t.pAdjusted.toFixed(4),
    t.pAdjusted <= 0.05 ? 'differ at 5%' : '',
  ]);
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: string[]) =>
    cells
      .map((c, i) => (i >= 3 && i <= 7 ? c.padStart(widths[i]) : c.padEnd(widths[i])))
      .join('  ')
      .trimEnd();
  const floor = (result.tests.length / (1 + permutations)).toPrecision(2);
  return [
    line(header),
    ...rows.map(line),
    '',
    `${result.tests.length} tests (every pair of classes × degree), Holm-corrected together; ${permutations} permutations each, so no adjusted p can fall below ${floor}.`,
    ...[unreachableSentence(permutationReach(result.tests.length, permutations), 'tests')].filter(
      (line): line is string => line !== undefined,
    ),
    '',
  ].join('\n');
}
