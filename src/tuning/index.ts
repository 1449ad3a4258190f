export * from './ratio.js';
export * from './interval-spec.js';
export * from './tuning.js';
export * from './reference.js';
export * from './analysis.js';
