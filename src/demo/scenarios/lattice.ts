import { Random } from '../../core/random.js';
import type { PointSample } from '../../core/sample.js';

/**
 * Scenario (invented, synthetic): an inspection camera on a line that prints lattice panels photographs a
 * cross-section of each panel and extracts points along the struts. A panel is a block of `rows × columns`
 * square cells.
 *
 *   intact        every strut present: rows × columns loops of one size
 *   broken-strut  most of one outer strut is missing: that cell's loop opens (one loop fewer)
 *   merged-cells  the four walls meeting at one inner node are missing: a 2 × 2 block of cells is one
 *                 loop twice as wide (three loops fewer, one loop twice the size). A single missing wall
 *                 would leave a 1 × 2 loop, which dies at the same Rips scale as a square cell (its short
 *                 side decides), so it would not be told apart by size.
 *
 * The default panel is 2 × 2 cells, so the loops to count (4, 3, 1) fit in the first five landscape layers;
 * a 2 × 3 panel (6 loops) needs at least six.
 *
 * Nuisance per sample: rotation, translation, scale, point count (so density), jitter, and in some samples a
 * few stray points. The classes differ in the number and size of loops (H1), while the distribution of
 * pairwise distances changes little. Coordinates are rounded to 4 decimals so that files hold exactly the
 * values generated.
 */
export interface LatticeOptions {
  /** Samples per class. Default 25. */
  perClass?: number;
  /** Cell rows of a panel (at least 2). Default 2. */
  rows?: number;
  /** Cell columns of a panel (at least 2). Default 2. */
  columns?: number;
  /** Fewest and most points per sample. Default [130, 180]. */
  points?: [number, number];
  /** Jitter (standard deviation, in cell widths): fewest and most. Default [0.015, 0.04]. */
  jitter?: [number, number];
  /** Relative scale variation (± this fraction). Default 0.15. */
  scale?: number;
  /** Fraction of the broken strut that is missing. Default 0.75. */
  gap?: number;
  /** Probability a sample carries stray points (1 to 3 of them). Default 0.3. */
  strayChance?: number;
}

export const LATTICE_CLASSES = ['intact', 'broken-strut', 'merged-cells'] as const;

/** One unit strut segment from (x0, y0) to (x1, y1), in cell units. */
interface Segment {
  x0: number;
  y0: number;
  x1: number;
  y1: number;
  outer: boolean;
}

function segments(rows: number, columns: number): Segment[] {
  const out: Segment[] = [];
  for (let y = 0; y <= rows; y++) {
    for (let x = 0; x < columns; x++)
      out.push({ x0: x, y0: y, x1: x + 1, y1: y, outer: y === 0 || y === rows });
  }
  for (let x = 0; x <= columns; x++) {
    for (let y = 0; y < rows; y++)
      out.push({ x0: x, y0: y, x1: x, y1: y + 1, outer: x === 0 || x === columns });
  }
  return out;
}

/**
 * The struts of one panel as [x0, y0, x1, y1] pieces in cell units; the broken strut keeps only its two ends.
 * Which strut breaks, or which inner node loses its walls, is drawn from `r`.
 */
export function panelStruts(
  label: (typeof LATTICE_CLASSES)[number],
  rows: number,
  columns: number,
  gap: number,
  r: Random,
): number[][] {
  const all = segments(rows, columns);
  // Struts as [x0, y0, x1, y1] pieces; the broken strut keeps only its two ends.
  const pieces: number[][] = [];
  if (label === 'intact') {
    for (const s of all) pieces.push([s.x0, s.y0, s.x1, s.y1]);
  } else if (label === 'broken-strut') {
    const outer = all.filter((s) => s.outer);
    const broken = outer[r.int(outer.length)];
    const keep = (1 - gap) / 2;
    for (const s of all) {
      if (s !== broken) {
        pieces.push([s.x0, s.y0, s.x1, s.y1]);
        continue;
      }
      const dx = s.x1 - s.x0;
      const dy = s.y1 - s.y0;
      pieces.push([s.x0, s.y0, s.x0 + keep * dx, s.y0 + keep * dy]);
      pieces.push([s.x1 - keep * dx, s.y1 - keep * dy, s.x1, s.y1]);
    }
  } else {
    // The four walls that meet at one inner node are missing: a 2 × 2 block of cells is one open cell.
    const vx = 1 + r.int(columns - 1);
    const vy = 1 + r.int(rows - 1);
    const touches = (s: Segment): boolean => (s.x0 === vx && s.y0 === vy) || (s.x1 === vx && s.y1 === vy);
    for (const s of all) if (!touches(s)) pieces.push([s.x0, s.y0, s.x1, s.y1]);
  }
  return pieces;
}

function round4(v: number): number {
  const r = Math.round(v * 10000) / 10000;
  return r === 0 ? 0 : r;
}

/** Generates the lattice dataset from `seed`: classes in turn (intact, broken-strut, merged-cells, …). */
export function generateLattice(seed: number, options: LatticeOptions = {}): PointSample[] {
  const perClass = options.perClass ?? 25;
  const rows = options.rows ?? 2;
  const columns = options.columns ?? 2;
  const [minPoints, maxPoints] = options.points ?? [130, 180];
  const [minJitter, maxJitter] = options.jitter ?? [0.015, 0.04];
  const scaleRange = options.scale ?? 0.15;
  const gap = options.gap ?? 0.75;
  const strayChance = options.strayChance ?? 0.3;
  const random = new Random(seed);
  const samples: PointSample[] = [];
  for (let k = 0; k < perClass * LATTICE_CLASSES.length; k++) {
    const label = LATTICE_CLASSES[k % LATTICE_CLASSES.length];
    const r = random.fork();
    const pieces = panelStruts(label, rows, columns, gap, r);
    const lengths = pieces.map((p) => Math.hypot(p[2] - p[0], p[3] - p[1]));
    const totalLength = lengths.reduce((a, b) => a + b, 0);
    const count = minPoints + r.int(maxPoints - minPoints + 1);
    const strays = r.next() < strayChance ? 1 + r.int(3) : 0;
    const jitter = r.uniform(minJitter, maxJitter);
    const scale = 1 + r.uniform(-scaleRange, scaleRange);
    const angle = r.uniform(0, 2 * Math.PI);
    const cos = Math.cos(angle);
    const sin = Math.sin(angle);
    const shiftX = r.uniform(-2, 2);
    const shiftY = r.uniform(-2, 2);
    const coords = new Float64Array(2 * (count + strays));
    const cx = columns / 2;
    const cy = rows / 2;
    // Invariant: coords[0 .. 2i) hold the first i points, placed uniformly by strut length.
    for (let i = 0; i < count; i++) {
      let t = r.next() * totalLength;
      let j = 0;
      while (j < pieces.length - 1 && t > lengths[j]) t -= lengths[j++];
      const p = pieces[j];
      const f = lengths[j] > 0 ? t / lengths[j] : 0;
      const x = p[0] + f * (p[2] - p[0]) + r.normal(0, jitter) - cx;
      const y = p[1] + f * (p[3] - p[1]) + r.normal(0, jitter) - cy;
      coords[2 * i] = round4(scale * (cos * x - sin * y) + shiftX);
      coords[2 * i + 1] = round4(scale * (sin * x + cos * y) + shiftY);
    }
    for (let i = count; i < count + strays; i++) {
      // Stray points fall outside the panel, within a margin of one cell.
      const side = r.int(4);
      const u = r.uniform(-0.5, 1.5);
      const v = r.uniform(0.2, 1);
      const x = side === 0 ? u * columns : side === 1 ? u * columns : side === 2 ? -v : columns + v;
      const y = side === 0 ? -v : side === 1 ? rows + v : side === 2 ? u * rows : u * rows;
      coords[2 * i] = round4(scale * (cos * (x - cx) - sin * (y - cy)) + shiftX);
      coords[2 * i + 1] = round4(scale * (sin * (x - cx) + cos * (y - cy)) + shiftY);
    }
    samples.push({
      kind: 'points',
      id: `panel-${String(k + 1).padStart(3, '0')}`,
      label,
      dim: 2,
      count: count + strays,
      coords,
    });
  }
  return samples;
}
