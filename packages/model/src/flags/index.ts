export * from './types.js';
export * from './interval-index.js';
export * from './codebook-facts.js';
export * from './rules.js';
export * from './definition-race.js';
export * from './text-delta.js';
export * from './engine.js';
