export { createProjector, type Projector, type ProjectorOptions } from './projector.js';
export { withProjection } from './with-projection.js';
export { projectDocument } from './write.js';
export { loadDoc, loadDocAt, withDocs, type DocLoader } from './load-doc.js';
export { segmentRows, codeRows, caseRows, memoRows, type LayerInfo } from './rows.js';
export { documentsBehind, scheduleCatchUp } from './catch-up.js';
