/** Persistence landscapes: exact (piecewise-linear layers) and sampled on a grid, with their algebra. */

export {
  evaluate,
  evaluateLayer,
  innerProduct,
  landscapeDistance,
  layerNorm,
  lpNorm,
  meanLandscape,
  meanSampled,
  scaleLandscape,
  subtractLandscapes,
  sumLandscapes,
} from './algebra.js';
export {
  type ExactLandscape,
  type ExactLandscapeOptions,
  exactLandscape,
  type LandscapeLayer,
  resolvable,
} from './exact-landscape.js';
export { checkGrid, coveringGrid, type Grid, gridPoints, gridStep, sameGrid } from './grid.js';
export {
  type ExactLandscapeJson,
  exactToJson,
  LANDSCAPE_CSV_HEADER,
  landscapeCsvRows,
  type SampledLandscapeJson,
  sampledToJson,
} from './output.js';
export { type SampledLandscape, sampleLandscape, sampleLandscapeInto } from './sampled-landscape.js';
