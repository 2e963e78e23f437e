export * from './diagram.js';
export {
  bottleneckDistance,
  type DiagramMetric,
  type DistanceMatrixOptions,
  distanceMatrix,
  wassersteinDistance,
} from './distance.js';
export { type Assignment, solveAssignment } from './assignment.js';
export { type RipsOptions, enclosingRadius, ripsPersistence } from './rips.js';
export { condensedIndex, condensedLength, edgeEndpoints } from './simplex-index.js';
export { condenseMatrix, METRICS, type Metric, pairwiseDistances } from './metric.js';
export { type CubicalOptions, cubicalPersistence } from './cubical.js';
export { type DelayEmbedding, delayEmbedding, signalPersistence } from './signal.js';
export { computeDiagrams, type DiagramOptions } from './compute.js';
export { computeDiagramsParallel, type ParallelRun } from './parallel.js';
export { type AlphaComplex, type AlphaOptions, alphaComplex, alphaPersistence } from './alpha.js';
export { type DtmOptions, dtmEdgeValue, dtmPersistence, dtmPersistenceFromMatrix, dtmValues } from './dtm.js';
export { type Filtration, describeFiltration, parseFiltration } from './filtration.js';
export { type NeighbourTable, nearestNeighbours } from './nearest.js';
export {
  type Landmarks,
  type SubsampleSpec,
  describeSubsample,
  maxminLandmarks,
  parseSubsample,
  selectLandmarks,
  subsampleSample,
} from './subsample.js';
