/** The demo: the shipped scenarios (one catalogue, seeded generators) and the study run on them. */
export {
  datasetFiles,
  datasetsReadme,
  FIELD_CLASSES,
  generateField,
  generateLattice,
  generatePump,
  LATTICE_CLASSES,
  PUMP_CLASSES,
  SCENARIOS,
  type Scenario,
  type ScenarioStudy,
  scenarioNamed,
} from './scenarios/index.js';
export {
  accuracyTable,
  DEMO_DATASETS,
  type DemoDataset,
  type DemoOptions,
  type DemoResult,
  demoDatasetOf,
  runDemo,
} from './study.js';
