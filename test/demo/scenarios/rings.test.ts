import { describe, expect, it } from 'vitest';
import { generateRings, RINGS_CLASSES } from '../../../src/demo/scenarios/rings.js';

describe('gasket-press scenario (invented demo data)', () => {
  it('is reproducible from its seed and balanced over five classes', () => {
    const a = generateRings(3, { perClass: 4 });
    const b = generateRings(3, { perClass: 4 });
    expect(a.length).toBe(20);
    expect(a.map((s) => s.label).filter((l) => l === 'linked').length).toBe(4);
    expect(new Set(a.map((s) => s.label))).toEqual(new Set(RINGS_CLASSES));
    expect(Array.from(a[7].coords)).toEqual(Array.from(b[7].coords));
    expect(Array.from(generateRings(4, { perClass: 4 })[7].coords)).not.toEqual(Array.from(a[7].coords));
    expect(new Set(a.map((s) => s.id)).size).toBe(20);
  });

  it('puts the stray points last and the outline points near their curves', () => {
    const [single] = generateRings(5, { perClass: 1, points: 100, outliers: 0.05, jitter: 0 });
    expect(single.count).toBe(100);
    // Scale is drawn in [0.9, 1.1], so outline points of a unit ring lie at radius 0.9–1.1.
    for (let i = 0; i < 95; i++) {
      const r = Math.hypot(single.coords[2 * i], single.coords[2 * i + 1]);
      expect(r).toBeGreaterThan(0.89);
      expect(r).toBeLessThan(1.11);
    }
    for (let i = 95; i < 100; i++)
      expect(
        Math.max(Math.abs(single.coords[2 * i]), Math.abs(single.coords[2 * i + 1])),
      ).toBeLessThanOrEqual(2);
  });
});
