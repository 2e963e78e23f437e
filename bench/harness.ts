import { performance } from 'node:perf_hooks';
import type { DiagramSet } from '../src/core/diagram.js';
import { Random } from '../src/core/random.js';

/**
 * Small helpers shared by the benchmarks. Each benchmark file `bench/<name>.bench.ts` exports
 * `run(): Promise<void>` and prints its figures with `report`, always beside a baseline measured in the
 * same run. `npm run bench [name…]` runs them (all by default).
 */
export interface Timing {
  /** Median wall time of the repeats, in milliseconds. */
  ms: number;
  repeats: number;
}

/** Runs `fn` `repeats` times (after `warmup` untimed runs) and returns the median wall time. */
export async function time(fn: () => unknown | Promise<unknown>, repeats = 5, warmup = 1): Promise<Timing> {
  for (let i = 0; i < warmup; i++) await fn();
  const samples: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    await fn();
    samples.push(performance.now() - t0);
  }
  samples.sort((a, b) => a - b);
  return { ms: samples[Math.floor(samples.length / 2)], repeats };
}

export interface Figure {
  name: string;
  value: number;
  unit: string;
  goal?: string;
  met?: boolean;
}

/** Prints one benchmark's figures as aligned lines. */
export function report(title: string, figures: Figure[]): void {
  console.log(`\n## ${title}`);
  for (const f of figures) {
    const goal = f.goal ? `   goal ${f.goal}: ${f.met === undefined ? '' : f.met ? 'met' : 'NOT met'}` : '';
    const v = Math.abs(f.value) >= 100 ? f.value.toFixed(0) : f.value.toPrecision(3);
    console.log(`  ${f.name.padEnd(58)} ${v.padStart(10)} ${f.unit}${goal}`);
  }
}

/** `count` invented H1 diagrams of `pairs` bars each (births in [0, 1), lifetimes in [0, 0.6)), seeded. */
export function randomDiagrams(count: number, pairs: number, seed: number): DiagramSet[] {
  const r = new Random(seed);
  const out: DiagramSet[] = [];
  for (let s = 0; s < count; s++) {
    const births = new Float64Array(pairs);
    const deaths = new Float64Array(pairs);
    for (let i = 0; i < pairs; i++) {
      births[i] = r.uniform(0, 1);
      deaths[i] = births[i] + r.uniform(0, 0.6);
    }
    out.push({ sample: `d${s}`, label: 'x', diagrams: [{ degree: 1, births, deaths }] });
  }
  return out;
}
