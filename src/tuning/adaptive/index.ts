export * from './intervals.js';
export * from './settings.js';
export * from './tuner.js';
export * from './purity.js';
export * from './describe.js';
export * from './synth-offset.js';
