/**
 * @gloss/agreement — intercoder agreement statistics. Pure: no I/O, no Yjs, no dependencies.
 * Undefined coefficients are `{ value: null, reason }`, never NaN. Bad input throws AgreementError.
 */
export { AgreementError, type AgreementErrorCode } from './errors.js';
export type { Cell, Estimate, Level, ReliabilityData, UndefinedReason, Value } from './types.js';
export { encodeReliabilityData, type EncodedData } from './encode.js';
export { coincidences, coincidencesFromTable, type Coincidences } from './coincidence.js';
export { krippendorffAlpha, alphaFromCoincidences, type AlphaOptions, type AlphaResult, type ValueAlpha } from './alpha.js';
export { percentAgreement, percentAgreementFromTable, type PercentConvention, type PercentResult } from './percent.js';
export { cohenKappa, scottPi, bennettS, Z95, type ChanceCorrected, type KappaResult } from './kappa.js';
export { fleissKappa, countsFromData, type FleissResult, type FleissCategory } from './fleiss.js';
export { confusionMatrix, tableFromData, type ContingencyTable } from './table.js';
export { bootstrapAlpha, type BootstrapOptions, type BootstrapResult } from './bootstrap.js';
export { mulberry32, quantile } from './random.js';
export { landisKoch, krippendorffBand, type LandisKochBand, type KrippendorffBand } from './bands.js';
export type { Span, Continuum } from './spans.js';
export { unitizingAlpha1995, type Unitizing1995Result, type UnitizingCategory } from './unitizing-1995.js';
export { unitizingAlpha2016, type Unitizing2016Result, type ValueUAlpha } from './unitizing-2016.js';
export type { CodedSegment, CodedText, TextUnit } from './coded-text.js';
export { fixedUnitData, characterData, unitizingSpans, partitionSpans } from './adapters.js';
export {
  agreementReport,
  type AgreementReport,
  type BinaryAgreement,
  type CodeReport,
  type PairReport,
  type ReportOptions,
  type StudyData,
  type TextReport,
  type UnitizingSummary,
} from './report.js';
export { codeConfusion, NO_CODE, type CodeConfusion } from './code-confusion.js';
