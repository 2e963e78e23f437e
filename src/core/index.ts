export * from './diagram.js';
export { ensure, isUserError, UserError } from './errors.js';
export * from './matrix.js';
export { Random } from './random.js';
export * from './sample.js';
export { shown } from './text.js';
export { type Provenance, packageRoot, provenance, version } from './version.js';
