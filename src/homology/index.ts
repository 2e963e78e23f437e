export { type AlphaComplex, type AlphaOptions, alphaComplex, alphaPersistence } from './alpha.js';
export { type Assignment, solveAssignment } from './assignment.js';
export { computeDiagrams, type DiagramOptions } from './compute.js';
export { type CubicalOptions, cubicalPersistence } from './cubical.js';
export {
  bottleneckDistance,
  type DiagramMetric,
  type DistanceMatrixOptions,
  distanceMatrix,
  wassersteinDistance,
} from './distance.js';
export { type DtmOptions, dtmEdgeValue, dtmPersistence, dtmPersistenceFromMatrix, dtmValues } from './dtm.js';
export {
  describeFiltration,
  describeSampleFiltration,
  type Filtration,
  filtrationList,
  isImageFiltration,
  parseFiltration,
  parseFiltrationList,
  type SampleFiltration,
} from './filtration.js';
export {
  binarise,
  type CentreCoordinate,
  describeImageFiltration,
  distanceTransform,
  filteredImage,
  type ImageFiltration,
  type ImageFiltrationOptions,
  otsuThreshold,
  parseImageFiltration,
} from './image-filtration.js';
export { condenseMatrix, METRICS, type Metric, pairwiseDistances } from './metric.js';
export { type NeighbourTable, nearestNeighbours } from './nearest.js';
export {
  computeDiagramsParallel,
  type ParallelRun,
  startDiagramWorkers,
  stopDiagramWorkers,
} from './parallel.js';
export { enclosingRadius, type RipsOptions, ripsPersistence } from './rips.js';
export { type DelayEmbedding, delayEmbedding, signalPersistence } from './signal.js';
export { condensedIndex, condensedLength, edgeEndpoints } from './simplex-index.js';
export {
  describeSubsample,
  type Landmarks,
  maxminLandmarks,
  parseSubsample,
  type SubsampleSpec,
  selectLandmarks,
  subsampleSample,
} from './subsample.js';
