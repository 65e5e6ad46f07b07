export { runExport, EXPORT_FORMATS, isExportFormat, type ExportFormat, type ExportResult, type ExportOptions } from './run-export.js';
export { runImport, IMPORT_FORMATS, type ImportFormat, type RunImportOptions } from './run-import.js';
export { applyImport, type ImportReport, type ImportTarget } from './apply-import.js';
export { loadStudy, type LoadedStudy } from './load-study.js';
