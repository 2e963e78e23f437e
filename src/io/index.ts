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
