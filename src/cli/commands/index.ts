import type { Command } from 'commander';

/** A subcommand: its name and how to load its definition (a function that adds it to the program). */
export interface CommandEntry {
  name: string;
  load: () => Promise<(program: Command) => Command>;
}

/**
 * Every subcommand, in the order `landform --help` lists them. A run loads only the module of the command it
 * names (each command's module loads the parts of the library it needs): `landform diagrams` does not read
 * the modules of models, landscapes or the report. Help, version and unknown commands load them all.
 */
export const COMMANDS: CommandEntry[] = [
  { name: 'demo', load: async () => (await import('./demo.js')).defineDemo },
  { name: 'inspect', load: async () => (await import('./inspect.js')).defineInspect },
  { name: 'diagrams', load: async () => (await import('./diagrams.js')).defineDiagrams },
  { name: 'landscape', load: async () => (await import('./landscape.js')).defineLandscape },
  { name: 'distance', load: async () => (await import('./distance.js')).defineDistance },
  { name: 'vectorize', load: async () => (await import('./vectorize.js')).defineVectorize },
  { name: 'evaluate', load: async () => (await import('./evaluate.js')).defineEvaluate },
  { name: 'train', load: async () => (await import('./train.js')).defineTrain },
  { name: 'predict', load: async () => (await import('./predict.js')).definePredict },
  { name: 'contrast', load: async () => (await import('./contrast.js')).defineContrast },
  { name: 'merge', load: async () => (await import('./merge.js')).defineMerge },
  { name: 'datasets', load: async () => (await import('./datasets.js')).defineDatasets },
];
