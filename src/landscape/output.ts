import { csvField, csvNumber } from '../io/csv.js';
import type { ExactLandscape } from './exact-landscape.js';
import { gridPoints } from './grid.js';
import type { SampledLandscape } from './sampled-landscape.js';

/**
 * The JSON contract of `landform landscape`, read by other tools:
 * sampled `{"degree":1,"t":[t0,…],"layers":[[λ1(t0),…],…]}` with exactly `depth` layers and the grid's
 * points; exact `{"degree":1,"layers":[[[t,v],…],…]}` with breakpoints in increasing t, starting and
 * ending at value 0. Extra fields (sample, label, infinite, provenance) follow the contract fields.
 */
export interface SampledLandscapeJson {
  degree: number;
  t: number[];
  layers: number[][];
}

export interface ExactLandscapeJson {
  degree: number;
  layers: Array<Array<[number, number]>>;
}

export function sampledToJson(landscape: SampledLandscape): SampledLandscapeJson {
  const count = landscape.grid.count;
  const layers: number[][] = [];
  for (let k = 0; k < landscape.depth; k++)
    layers.push(Array.from(landscape.values.subarray(k * count, (k + 1) * count)));
  return { degree: landscape.degree, t: Array.from(gridPoints(landscape.grid)), layers };
}

export function exactToJson(landscape: ExactLandscape): ExactLandscapeJson {
  return {
    degree: landscape.degree,
    layers: landscape.layers.map((layer) => Array.from(layer.t, (t, i): [number, number] => [t, layer.v[i]])),
  };
}

/** Header of the landscape CSV: one row per grid point (sampled) or breakpoint (exact) of each layer. */
export const LANDSCAPE_CSV_HEADER = ['sample', 'degree', 'layer', 't', 'value'] as const;

/** CSV rows `sample,degree,layer,t,value` (layers from 1), without the header. */
export function landscapeCsvRows(sample: string, landscape: SampledLandscape | ExactLandscape): string[] {
  const rows: string[] = [];
  const id = csvField(sample);
  if ('values' in landscape) {
    const ts = gridPoints(landscape.grid);
    const count = landscape.grid.count;
    for (let k = 0; k < landscape.depth; k++) {
      for (let i = 0; i < count; i++)
        rows.push(
          `${id},${landscape.degree},${k + 1},${csvNumber(ts[i])},${csvNumber(landscape.values[k * count + i])}`,
        );
    }
  } else {
    landscape.layers.forEach((layer, k) => {
      for (let i = 0; i < layer.t.length; i++)
        rows.push(`${id},${landscape.degree},${k + 1},${csvNumber(layer.t[i])},${csvNumber(layer.v[i])}`);
    });
  }
  return rows;
}
