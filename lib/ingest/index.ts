/**
 * Upload parsing, validation and conversion (pure: no database, no Next.js). The API route and the
 * worker call these; see each module for the rules.
 */
export { findingSchema, FindingCollector, DEFAULT_MAX_FINDINGS_PER_RULE, toIssue, type Finding, type FindingSummary, type Severity, type UploadIssue } from './findings';
export { DEFAULT_MAX_UPLOAD_BYTES, MAX_SEGMENT_CHARS, MAX_TEXT_CHARS } from './limits';
export { readCsvStream, readCsvText, type ByteSource, type ReadInfo, type ReadOptions } from './csv-reader';
export { cohortRowSchema, validateCohortStream, validateCohortText, type CohortRow, type CohortValidation } from './cohort';
export {
  convertVintagesToCohorts,
  validateVintageStream,
  validateVintageText,
  vintageRowSchema,
  type CensoredVintageYear,
  type VintageRow,
  type VintageValidation,
} from './vintage';
export {
  validateLoanTapeStream,
  validateLoanTapeText,
  type ExitConvention,
  type LoanTapeConventions,
  type LoanTapeOptions,
  type LoanTapeValidation,
} from './loan-tape';
export { checkPanel, JUMP_RATIO, MIN_PERIODS, TINY_COHORT } from './panel-checks';
export { cohortRowsToCsv, findingsToCsv } from './export';
export { createSha256, hashingSource, sha256Hex, sha256OfStream } from './hash';
export { gunzipSource } from './gzip';
export {
  checkLoanTapeHeader,
  convertLoanTape,
  dedupeKeyOf,
  validateCohortOrVintage,
  type DatasetConventions,
  type UploadedFile,
  type UploadKind,
  type Validated,
} from './upload';
