export * from './transcript.js';
