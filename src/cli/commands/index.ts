import type { Command } from 'commander';
import { defineContrast } from './contrast.js';
import { defineDatasets } from './datasets.js';
import { defineDemo } from './demo.js';
import { defineDiagrams } from './diagrams.js';
import { defineDistance } from './distance.js';
import { defineEvaluate } from './evaluate.js';
import { defineInspect } from './inspect.js';
import { defineLandscape } from './landscape.js';
import { defineMerge } from './merge.js';
import { definePredict } from './predict.js';
import { defineTrain } from './train.js';
import { defineVectorize } from './vectorize.js';

/** Every subcommand, in the order `landform --help` lists them. Each returns its commander.Command. */
export const COMMANDS: Array<(program: Command) => Command> = [
  defineDemo,
  defineInspect,
  defineDiagrams,
  defineLandscape,
  defineDistance,
  defineVectorize,
  defineEvaluate,
  defineTrain,
  definePredict,
  defineContrast,
  defineMerge,
  defineDatasets,
];
