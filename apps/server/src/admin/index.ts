/** Administrative operations shared by the HTTP API, the CLI, demo seeding and tests. */
export { AdminError, type AdminErrorCode } from './errors.js';
export { createUser, findUserByEmail, normaliseEmail, setPassword, type NewUser } from './users.js';
export * from './account-links.js';
export { createStudy, addMember, removeMember, type NewStudy } from './studies.js';
export { addTextFromTranscript, ensureLayer, type NewText } from './texts.js';
export { transcriptFromPlainText, buildTextDocUpdate, wordCount } from './text-doc.js';
export { recordAudit, type AuditEntry } from './audit.js';
export { deleteStudy, deleteText, type Deleted } from './deletion.js';
export { studiesPastRetention, retentionState, RETENTION_REMINDER_DAYS, type RetentionDue, type RetentionState } from './retention.js';
