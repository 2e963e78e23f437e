export { ensure, isUserError, UserError } from './errors.js';
export { Random } from './random.js';
export { type Provenance, packageRoot, provenance, version } from './version.js';
