import { Random } from '../../core/random.js';
import type { SignalSample } from '../../core/sample.js';

/**
 * Scenario (invented, synthetic): an accelerometer on the bearing housing of a circulation pump, sampled so
 * that one shaft revolution takes about `period` samples.
 *
 *   healthy     the shaft frequency plus two weak harmonics: one loop in the delay embedding
 *   cavitating  the same periodic part plus random impulsive bursts (decaying ringing) and broadband noise:
 *               the loop is still there but thickened and broken by excursions
 *   misaligned  the shaft frequency plus a second, incommensurate frequency of similar strength: the delay
 *               embedding fills a torus (two independent loops)
 *
 * Each sample has its own phase, amplitude, exact frequency and noise, so samples cannot be compared value by
 * value. Values are rounded to 4 decimals so that files hold exactly the values generated.
 * Suggested delay embedding: dimension 4, delay period/4 (8 samples at the default period of 32).
 */
export interface PumpOptions {
  /** Samples per class. Default 25. */
  perClass?: number;
  /** Values per signal. Default 400. */
  length?: number;
  /** Samples per shaft revolution (mean). Default 32. */
  period?: number;
  /** Background noise standard deviation relative to the amplitude: fewest and most. Default [0.03, 0.08]. */
  noise?: [number, number];
}

export const PUMP_CLASSES = ['healthy', 'cavitating', 'misaligned'] as const;

function round4(v: number): number {
  const r = Math.round(v * 10000) / 10000;
  return r === 0 ? 0 : r;
}

/** Generates the pump dataset from `seed`: classes in turn (healthy, cavitating, misaligned, …). */
export function generatePump(seed: number, options: PumpOptions = {}): SignalSample[] {
  const perClass = options.perClass ?? 25;
  const length = options.length ?? 400;
  const period = options.period ?? 32;
  const [minNoise, maxNoise] = options.noise ?? [0.03, 0.08];
  const random = new Random(seed);
  const samples: SignalSample[] = [];
  for (let k = 0; k < perClass * PUMP_CLASSES.length; k++) {
    const label = PUMP_CLASSES[k % PUMP_CLASSES.length];
    const r = random.fork();
    const amplitude = r.uniform(0.6, 1.6);
    const omega = (2 * Math.PI) / (period * r.uniform(0.94, 1.06));
    const phase = r.uniform(0, 2 * Math.PI);
    const h2 = r.uniform(0.1, 0.25);
    const h3 = r.uniform(0.03, 0.1);
    const phase2 = r.uniform(0, 2 * Math.PI);
    const phase3 = r.uniform(0, 2 * Math.PI);
    const noise = r.uniform(minNoise, maxNoise);
    // The second frequency of a misaligned coupling: an irrational-looking ratio to the shaft frequency.
    const ratio = r.uniform(1.53, 1.71);
    const second = r.uniform(0.7, 1.0);
    const phaseB = r.uniform(0, 2 * Math.PI);
    const values = new Float64Array(length);
    // Invariant: values[0..t) hold the periodic part plus background noise for the first t instants.
    for (let t = 0; t < length; t++) {
      let v =
        Math.sin(omega * t + phase) +
        h2 * Math.sin(2 * omega * t + phase2) +
        h3 * Math.sin(3 * omega * t + phase3);
      if (label === 'misaligned') v += second * Math.sin(ratio * omega * t + phaseB);
      values[t] = v + r.normal(0, noise);
    }
    if (label === 'cavitating') {
      // Bubbles collapsing: bursts of ringing at a high frequency that decay within a few samples.
      const bursts = 6 + r.int(7);
      for (let b = 0; b < bursts; b++) {
        const start = r.int(length);
        const height = r.uniform(0.8, 1.8) * (r.next() < 0.5 ? -1 : 1);
        const decay = r.uniform(2, 5);
        const ring = r.uniform(0.9, 1.4);
        for (let t = start; t < Math.min(length, start + 24); t++) {
          const u = t - start;
          values[t] += height * Math.exp(-u / decay) * Math.cos(ring * u);
        }
      }
      for (let t = 0; t < length; t++) values[t] += r.normal(0, 0.12);
    }
    for (let t = 0; t < length; t++) values[t] = round4(amplitude * values[t]);
    samples.push({ kind: 'signal', id: `run-${String(k + 1).padStart(3, '0')}`, label, values });
  }
  return samples;
}
