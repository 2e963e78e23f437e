import { describe, expect, it } from 'vitest';
import { FIELD_CLASSES, generateField } from '../../../src/demo/scenarios/field.js';
import { sameSamples } from './same-samples.js';

/**
 * Euler number of a binary image with 8-connected foreground, from counts of 2 × 2 bit quads:
 * E = (Q1 − Q3 − 2 QD) / 4 (Gray, "Determining the Euler number of binary images", 1971).
 */
function eulerNumber(mask: Uint8Array, h: number, w: number): number {
  let q1 = 0;
  let q3 = 0;
  let qd = 0;
  const at = (y: number, x: number): number => (y >= 0 && y < h && x >= 0 && x < w ? mask[y * w + x] : 0);
  for (let y = -1; y < h; y++) {
    for (let x = -1; x < w; x++) {
      const a = at(y, x);
      const b = at(y, x + 1);
      const c = at(y + 1, x);
      const d = at(y + 1, x + 1);
      const n = a + b + c + d;
      if (n === 1) q1++;
      else if (n === 3) q3++;
      else if (n === 2 && a === d) qd++;
    }
  }
  return (q1 - q3 - 2 * qd) / 4;
}

describe('field scenario', () => {
  it('has Euler number 1 for a disc, 0 for a ring and 2 for a pair above half the warmth', () => {
    const frames = generateField(4103);
    const want: Record<string, number> = { disc: 1, ring: 0, pair: 2 };
    let right = 0;
    for (const f of frames) {
      const [h, w] = f.shape;
      const sorted = Float64Array.from(f.values).sort();
      const low = sorted[Math.floor(0.5 * sorted.length)];
      const high = sorted[Math.floor(0.995 * sorted.length)];
      const mask = new Uint8Array(h * w);
      // A light 3 × 3 mean filter first, so that single noisy pixels do not count as components.
      for (let y = 0; y < h; y++) {
        for (let x = 0; x < w; x++) {
          let s = 0;
          let n = 0;
          for (let dy = -1; dy <= 1; dy++)
            for (let dx = -1; dx <= 1; dx++) {
              const yy = y + dy;
              const xx = x + dx;
              if (yy >= 0 && yy < h && xx >= 0 && xx < w) {
                s += f.values[yy * w + xx];
                n++;
              }
            }
          mask[y * w + x] = s / n > (low + high) / 2 ? 1 : 0;
        }
      }
      if (eulerNumber(mask, h, w) === want[f.label]) right++;
    }
    expect(right / frames.length).toBeGreaterThanOrEqual(0.95);
  });

  it('matches warm area across classes so the grey-level count alone does not separate them', () => {
    const frames = generateField(4103);
    const warm = (label: string): number[] =>
      frames
        .filter((f) => f.label === label)
        .map((f) => {
          const sorted = Float64Array.from(f.values).sort();
          const mid = (sorted[Math.floor(0.5 * sorted.length)] + sorted[sorted.length - 1]) / 2;
          return f.values.filter((v) => v > mid).length;
        });
    const mean = (x: number[]): number => x.reduce((a, b) => a + b, 0) / x.length;
    const disc = mean(warm('disc'));
    for (const label of ['ring', 'pair']) {
      // Within 25 % of the disc's warm area (common practice, no source: a loose bound on the nuisance).
      expect(Math.abs(mean(warm(label)) - disc) / disc).toBeLessThan(0.25);
    }
  });

  it('is reproducible and balanced, with whole grey levels in 0–255', () => {
    const a = generateField(4103);
    expect(sameSamples(generateField(4103), a)).toBe(true);
    for (const label of FIELD_CLASSES) expect(a.filter((s) => s.label === label).length).toBe(25);
    for (const f of a) {
      expect(f.shape).toEqual([40, 40]);
      expect(f.values.every((v) => Number.isInteger(v) && v >= 0 && v <= 255)).toBe(true);
    }
  });
});
