export { createPgUpdateStore, type PgUpdateStore, type PgUpdateStoreOptions } from './pg-update-store.js';
export { createMemoryUpdateStore } from './memory-update-store.js';
export { compactDocument, type CompactionResult } from './compaction.js';
export { StoreError } from './errors.js';
