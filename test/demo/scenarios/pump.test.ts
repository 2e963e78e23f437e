import { describe, expect, it } from 'vitest';
import { generatePump, PUMP_CLASSES } from '../../../src/demo/scenarios/pump.js';
import { sameSamples } from './same-samples.js';

/** Power of the discrete Fourier transform at frequency bins 1 … n/2. */
function spectrum(x: Float64Array): Float64Array {
  const n = x.length;
  let mean = 0;
  for (const v of x) mean += v / n;
  const out = new Float64Array(Math.floor(n / 2) + 1);
  for (let k = 1; k < out.length; k++) {
    let re = 0;
    let im = 0;
    for (let t = 0; t < n; t++) {
      re += (x[t] - mean) * Math.cos((2 * Math.PI * k * t) / n);
      im -= (x[t] - mean) * Math.sin((2 * Math.PI * k * t) / n);
    }
    out[k] = re * re + im * im;
  }
  return out;
}

describe('pump scenario', () => {
  it('puts the strongest spectral line at the shaft frequency, and a second strong line only when misaligned', () => {
    // Source: the discrete Fourier transform of a sampled sinusoid of period P over n samples peaks at bin
    // n / P (Oppenheim & Schafer, "Discrete-Time Signal Processing", 1989, ch. 8).
    const runs = generatePump(4102);
    for (const run of runs) {
      const power = spectrum(run.values);
      const band = (from: number, to: number): number => {
        let m = 0;
        for (let k = from; k <= to; k++) m = Math.max(m, power[k]);
        return m;
      };
      let best = 1;
      for (let k = 2; k < power.length; k++) if (power[k] > power[best]) best = k;
      // Period 32 ± 6 % over 400 samples: bin 400 / 32 = 12.5, within 11.7 … 13.3 (one bin of leakage allowed).
      const shaft = band(11, 14);
      // The second frequency sits at 1.53–1.71 times the shaft frequency: bins 17–23.
      const ratio = band(17, 23) / shaft;
      if (run.label === 'misaligned') {
        expect(ratio, run.id).toBeGreaterThan(0.2);
        expect(best >= 11 && best <= 23, run.id).toBe(true);
      } else {
        expect(best, run.id).toBeGreaterThanOrEqual(11);
        expect(best, run.id).toBeLessThanOrEqual(14);
        expect(ratio, run.id).toBeLessThan(0.2);
      }
    }
  });

  it('is reproducible, balanced, and gives cavitating runs heavier tails', () => {
    const a = generatePump(4102);
    expect(sameSamples(generatePump(4102), a)).toBe(true);
    expect(a.length).toBe(75);
    for (const label of PUMP_CLASSES) expect(a.filter((s) => s.label === label).length).toBe(25);
    for (const s of a) expect(s.values.length).toBe(400);
    // Kurtosis (fourth standardised moment): a sinusoid has 1.5, impulsive bursts raise it
    // (Pearson, "Das Fehlergesetz und seine Verallgemeinerungen…", 1905; common in vibration monitoring).
    const kurtosis = (x: Float64Array): number => {
      let m = 0;
      for (const v of x) m += v / x.length;
      let m2 = 0;
      let m4 = 0;
      for (const v of x) {
        m2 += (v - m) ** 2 / x.length;
        m4 += (v - m) ** 4 / x.length;
      }
      return m4 / (m2 * m2);
    };
    const mean = (label: string): number => {
      const k = a.filter((s) => s.label === label).map((s) => kurtosis(s.values));
      return k.reduce((x, y) => x + y, 0) / k.length;
    };
    expect(mean('healthy')).toBeGreaterThan(1.4);
    expect(mean('healthy')).toBeLessThan(1.7);
    expect(mean('cavitating')).toBeGreaterThan(mean('healthy') + 0.3);
  });
});
