export * from './dataset.js';
export { writeFileAtomic, writeFilesAtomic, writeFolderAtomic } from './atomic.js';
export { parseCsv, csvField, csvNumber, type CsvRow } from './csv.js';
export { provenancePath, readProvenance, writeWithProvenance } from './provenance-file.js';
export { DIAGRAM_CSV_HEADER, formatDiagramCsv, parseDiagramCsv, readDiagramCsv, writeDiagramCsv } from './diagram-csv.js';
export { loadDataset, parseKind, kindFromHeader, expectKind, type LoadOptions } from './load.js';
export { formatNpy, writeNpy, readNpy, parseNpy, npyHeaderText, type NpyArray } from './npy.js';
export {
  writeFeatureTable,
  readFeatureTable,
  formatFeatureCsv,
  samplesSidecarPath,
  columnsSidecarPath,
  type FeatureTable,
  type FeatureFormat,
} from './feature-table.js';
export {
  parseShard,
  formatShard,
  resolveShard,
  shardOf,
  shardOrdinals,
  shardFileName,
  planShard,
  fnv1a32,
  SHARD_COUNT_VARIABLE,
  type Shard,
  type ResolvedShard,
  type ShardRecord,
  type ShardPlan,
  type ShardedProvenance,
} from './shard.js';
export {
  mergeShards,
  chooseFormat,
  formatFromPath,
  writeDiagramsOutput,
  writeFeaturesOutput,
  readDiagramsOutput,
  readFeaturesOutput,
  type OutputFormat,
  type MergeSummary,
} from './merge.js';
export {
  formatDiagramArrow,
  formatFeatureArrow,
  readArrow,
  readDiagramArrow,
  readFeatureArrow,
  writeDiagramArrow,
  writeFeatureArrow,
  loadArrowDataset,
  type ArrowContent,
} from './arrow.js';
export { formatPointsCsv, formatSignalCsv, formatTableCsv, formatLabelsCsv, defaultCoordinateNames } from './sample-writers.js';
export { parsePgm, formatPgm, parsePng, formatPng, type GrayImage } from './image-file.js';
export { loadFolder, distanceFault, DISTANCE_TOLERANCE } from './folder.js';
export { readLabelsFile, checkInsidePath, LABELS_FILE, type LabelledFile } from './labels-file.js';
export { SCENARIOS, scenarioNamed, datasetFiles, datasetsReadme, type Scenario } from './scenarios/index.js';
export { formatJsonOutput, writeJsonOutput } from './json-output.js';
export { summarizeDataset, formatSummary, type DatasetSummary, type SizeRange } from './summary.js';
