export { FIXED_UNITS, UNIT_KINDS, fixedUnits, type FixedUnit, type Unit, type UnitKind } from './units.js';
export { buildMatrix, select, type CodedSpan, type Column, type Matrix, type TextInput } from './data.js';
export { STATISTICS, coefficient, type Coefficient, type Statistic, type StatOptions } from './statistics.js';
export { spanCoefficient } from './spans.js';
export { agreementReport, type AgreementReport, type ReportInput } from './report.js';
export { differences, type Difference } from './differences.js';
