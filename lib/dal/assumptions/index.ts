/**
 * The assumption library's data access: every read and write authorises its caller here.
 *
 * - dto.ts: what callers receive (versions, audit rows, library entries, queue items)
 * - writes.ts: drafting, editing and the lifecycle transitions, with audit, reviews and mail
 * - notify.ts: the e-mail of transitions and review-by reminders (outbox, same transaction)
 * - scheduler.ts: publish on the effective date, expire after review-by, reminders
 * - reads.ts: the version page, audit trail, library, queue
 * - consumer.ts: what the consumer API reads (in force at a date, exact version, the library)
 */
export type { AuditDto, LibraryEntryDto, PersonDto, QueueItemDto, ReviewDto, RoleChangeDto, VersionDto, VersionPageDto } from './dto';
export { createDraft, editDraft, transition } from './writes';
export { runScheduledTransitions, type ScheduleReport } from './scheduler';
export { auditCsv, getVersion, getVersionPage, listAudit, listLibrary, listOpenVersions, listQueue } from './reads';
export { listInForce, listPublished, publishedVersion, versionInForce, type Consumer, type ConsumerVersionDto, type ReviewState } from './consumer';
