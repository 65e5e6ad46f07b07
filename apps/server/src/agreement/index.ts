export { FIXED_UNITS, UNIT_KINDS, fixedUnits, type FixedUnit, type Unit, type UnitKind } from './units.js';
export { buildMatrix, select, type Column, type Matrix, type TextInput } from './data.js';
export { STATISTICS, coefficient, type Coefficient, type Statistic } from './statistics.js';
export { unitizingOver } from './unitizing.js';
export { agreementReport, type ServerReport, type ReportInput } from './report.js';
export { differences, type Difference } from './differences.js';
export { decideCoders, countedOn, LEFT_OUT_MESSAGES, type CoderChoice, type CoderDecision, type CoderRule, type LayerCount, type LeftOut, type LeftOutReason, type TextCoders, type TextLayers } from './coders.js';
