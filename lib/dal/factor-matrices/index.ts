/**
 * The factor-correlation matrices' data access (an assumption of its own kind, under the lifecycle
 * of lib/assumptions/lifecycle.ts): every read and write authorises its caller here.
 *
 * - rows.ts: the version DTO and the append-only audit row
 * - writes.ts: drafting from a fit, the transitions, the scheduler's publication
 * - reads.ts: the library entries and the version page
 * - consumer.ts: what the consumer API reads (in force at a date, a matrix's versions, the CSV)
 */
export { createMatrixDraft, editMatrixDraft, matrixTransition, publishDueMatrices } from './writes';
export { getMatrixVersionPage, listMatrixLibrary, listMatrixQueue, type MatrixLibraryEntryDto, type MatrixVersionPageDto } from './reads';
export { matricesInForce, matrixVersions, publishedMatrices } from './consumer';
