export * from './diagram.js';
export { bottleneckDistance, wassersteinDistance } from './distance.js';
export { type Assignment, solveAssignment } from './assignment.js';
