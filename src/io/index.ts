export {
  type ArrowContent,
  formatDiagramArrow,
  formatFeatureArrow,
  loadArrowDataset,
  readArrow,
  readDiagramArrow,
  readFeatureArrow,
  writeDiagramArrow,
  writeFeatureArrow,
} from './arrow.js';
export {
  acquireOutputLock,
  cleanLeftovers,
  recoverFolderSwap,
  writeFileAtomic,
  writeFilesAtomic,
  writeFolderAtomic,
} from './atomic.js';
export { type CsvRow, csvField, csvNumber, parseCsv } from './csv.js';
export {
  DIAGRAM_CSV_HEADER,
  DiagramCollector,
  diagramsInFileOrder,
  FILTRATION_COLUMN,
  formatDiagramCsv,
  hasFiltrationTags,
  parseDiagramCsv,
  readDiagramCsv,
  writeDiagramCsv,
} from './diagram-csv.js';
export {
  columnsSidecarPath,
  type FeatureFormat,
  type FeatureTable,
  formatFeatureCsv,
  readFeatureTable,
  samplesSidecarPath,
  writeFeatureTable,
} from './feature-table.js';
export { DISTANCE_TOLERANCE, distanceFault, loadFolder } from './folder.js';
export { formatPgm, formatPng, type GrayImage, parsePgm, parsePng } from './image-file.js';
export { formatJsonOutput, writeJsonOutput } from './json-output.js';
export { checkInsidePath, LABELS_FILE, type LabelledFile, readLabelsFile } from './labels-file.js';
export { expectKind, kindFromHeader, type LoadOptions, loadDataset, parseKind, parseShape } from './load.js';
export { type MergeSummary, mergeShards } from './merge.js';
export { formatNpy, type NpyArray, npyHeaderText, parseNpy, readNpy, writeNpy } from './npy.js';
export { checkFileOutput, checkOutputPath, type OutputCheckOptions } from './output-guard.js';
export {
  chooseFormat,
  formatFromPath,
  type OutputFormat,
  readDiagramsOutput,
  readFeaturesOutput,
  writeDiagramsOutput,
  writeFeaturesOutput,
} from './outputs.js';
export { provenancePath, readProvenance, writeWithProvenance } from './provenance-file.js';
export {
  defaultCoordinateNames,
  formatLabelsCsv,
  formatPointsCsv,
  formatSignalCsv,
  formatTableCsv,
} from './sample-writers.js';
export {
  fnv1a32,
  formatShard,
  parseShard,
  planShard,
  type ResolvedShard,
  resolveShard,
  SHARD_COUNT_VARIABLE,
  type Shard,
  type ShardedProvenance,
  type ShardPlan,
  type ShardRecord,
  shardFileName,
  shardOf,
  shardOrdinals,
} from './shard.js';
export { type DatasetSummary, formatSummary, type SizeRange, summarizeDataset } from './summary.js';
