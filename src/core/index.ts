export { UserError, isUserError, ensure } from './errors.js';
export { Random } from './random.js';
export { version, provenance, packageRoot, type Provenance } from './version.js';
