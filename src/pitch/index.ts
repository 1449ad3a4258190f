export * from './pitch-class.js';
export * from './spelled-pitch.js';
export * from './names.js';
export * from './window.js';
