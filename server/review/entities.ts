/**
 * Review board tables: one Verdict per card (statistic x period of a batch) with its version for
 * optimistic concurrency, every change kept in VerdictHistory, comment threads, review requests,
 * report sign-offs, and each user's notification preferences. Rows are written with the synchronous
 * better-sqlite3 handle (server/db/sync.ts) so a verdict and its history commit together.
 */
import { EntitySchema } from 'typeorm';

export interface VerdictRow {
  id: number;
  studyId: number;
  batchId: number;
  statistic: string;
  period: number;
  /** pass | fail | unsure */
  verdict: string;
  note: string;
  version: number;
  updatedById: number | null;
  createdAt: Date;
  updatedAt: Date;
}

const studyFk = (table: string) => ({
  type: 'many-to-one' as const,
  target: 'Study',
  joinColumn: { name: 'studyId', foreignKeyConstraintName: `FK_${table}_study` },
  onDelete: 'CASCADE' as const,
});
const batchFk = (table: string) => ({
  type: 'many-to-one' as const,
  target: 'Batch',
  joinColumn: { name: 'batchId', foreignKeyConstraintName: `FK_${table}_batch` },
  onDelete: 'CASCADE' as const,
});
const userFk = (table: string, column: string, onDelete: 'CASCADE' | 'SET NULL') => ({
  type: 'many-to-one' as const,
  target: 'User',
  joinColumn: { name: column, foreignKeyConstraintName: `FK_${table}_${column}` },
  onDelete,
  nullable: onDelete === 'SET NULL',
});

export const VerdictEntity = new EntitySchema<VerdictRow & { study?: unknown; batch?: unknown; updatedBy?: unknown }>({
  name: 'Verdict',
  tableName: 'verdicts',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    batchId: { type: 'integer' },
    statistic: { type: 'varchar', length: 40 },
    period: { type: 'integer' },
    verdict: { type: 'varchar', length: 10 },
    note: { type: 'text', default: '' },
    version: { type: 'integer' },
    updatedById: { type: 'integer', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
    updatedAt: { type: 'datetime' },
  },
  relations: {
    study: studyFk('verdicts'),
    batch: batchFk('verdicts'),
    updatedBy: userFk('verdicts', 'updatedById', 'SET NULL'),
  },
  uniques: [{ name: 'UQ_verdicts_card', columns: ['batchId', 'statistic', 'period'] }],
  indices: [{ name: 'IDX_verdicts_study', columns: ['studyId'] }],
});

export interface VerdictHistoryRow {
  id: number;
  verdictId: number;
  batchId: number;
  statistic: string;
  period: number;
  version: number;
  userId: number | null;
  /** The name when the change was made (kept if the account goes). */
  userName: string;
  previousVerdict: string | null;
  verdict: string;
  previousNote: string | null;
  note: string;
  createdAt: Date;
}

export const VerdictHistoryEntity = new EntitySchema<VerdictHistoryRow & { verdictRow?: unknown; batch?: unknown; user?: unknown }>({
  name: 'VerdictHistory',
  tableName: 'verdict_history',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    verdictId: { type: 'integer' },
    batchId: { type: 'integer' },
    statistic: { type: 'varchar', length: 40 },
    period: { type: 'integer' },
    version: { type: 'integer' },
    userId: { type: 'integer', nullable: true },
    userName: { type: 'varchar', length: 120 },
    previousVerdict: { type: 'varchar', length: 10, nullable: true },
    verdict: { type: 'varchar', length: 10 },
    previousNote: { type: 'text', nullable: true },
    note: { type: 'text' },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    verdictRow: {
      type: 'many-to-one',
      target: 'Verdict',
      joinColumn: { name: 'verdictId', foreignKeyConstraintName: 'FK_verdict_history_verdict' },
      onDelete: 'CASCADE',
    },
    batch: batchFk('verdict_history'),
    user: userFk('verdict_history', 'userId', 'SET NULL'),
  },
  uniques: [{ name: 'UQ_verdict_history_version', columns: ['verdictId', 'version'] }],
  indices: [{ name: 'IDX_verdict_history_batch', columns: ['batchId'] }],
});

export interface ReviewCommentRow {
  id: number;
  studyId: number;
  batchId: number;
  statistic: string;
  period: number;
  authorId: number | null;
  authorName: string;
  body: string;
  createdAt: Date;
}

export const ReviewCommentEntity = new EntitySchema<ReviewCommentRow & { study?: unknown; batch?: unknown; author?: unknown }>({
  name: 'ReviewComment',
  tableName: 'review_comments',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    batchId: { type: 'integer' },
    statistic: { type: 'varchar', length: 40 },
    period: { type: 'integer' },
    authorId: { type: 'integer', nullable: true },
    authorName: { type: 'varchar', length: 120 },
    body: { type: 'text' },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    study: studyFk('review_comments'),
    batch: batchFk('review_comments'),
    author: userFk('review_comments', 'authorId', 'SET NULL'),
  },
  indices: [{ name: 'IDX_review_comments_card', columns: ['batchId', 'statistic', 'period'] }],
});

export interface ReviewRequestRow {
  id: number;
  studyId: number;
  batchId: number;
  reviewerId: number;
  requestedById: number | null;
  message: string;
  createdAt: Date;
  completedAt: Date | null;
}

export const ReviewRequestEntity = new EntitySchema<ReviewRequestRow & { study?: unknown; batch?: unknown; reviewer?: unknown; requestedBy?: unknown }>({
  name: 'ReviewRequest',
  tableName: 'review_requests',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    batchId: { type: 'integer' },
    reviewerId: { type: 'integer' },
    requestedById: { type: 'integer', nullable: true },
    message: { type: 'text', default: '' },
    createdAt: { type: 'datetime', createDate: true },
    completedAt: { type: 'datetime', nullable: true },
  },
  relations: {
    study: studyFk('review_requests'),
    batch: batchFk('review_requests'),
    reviewer: userFk('review_requests', 'reviewerId', 'CASCADE'),
    requestedBy: userFk('review_requests', 'requestedById', 'SET NULL'),
  },
  indices: [
    { name: 'IDX_review_requests_reviewer', columns: ['reviewerId'] },
    { name: 'IDX_review_requests_batch', columns: ['batchId'] },
  ],
});

export interface ReportSignoffRow {
  id: number;
  studyId: number;
  batchId: number;
  signedById: number | null;
  signedByName: string;
  note: string;
  /** VerdictCounts JSON at signing. */
  counts: string;
  signedAt: Date;
  /** SignoffAcknowledgement JSON when signed off despite concerns; null otherwise. */
  acknowledgement: string | null;
}

export const ReportSignoffEntity = new EntitySchema<ReportSignoffRow & { study?: unknown; batch?: unknown; signedBy?: unknown }>({
  name: 'ReportSignoff',
  tableName: 'report_signoffs',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    batchId: { type: 'integer' },
    signedById: { type: 'integer', nullable: true },
    signedByName: { type: 'varchar', length: 120 },
    note: { type: 'text', default: '' },
    counts: { type: 'text' },
    signedAt: { type: 'datetime', createDate: true },
    acknowledgement: { type: 'text', nullable: true },
  },
  relations: {
    study: studyFk('report_signoffs'),
    batch: batchFk('report_signoffs'),
    signedBy: userFk('report_signoffs', 'signedById', 'SET NULL'),
  },
  indices: [{ name: 'IDX_report_signoffs_batch', columns: ['batchId'] }],
});

export interface NotificationPreferenceRow {
  userId: number;
  batchEnded: boolean;
  reviewRequested: boolean;
  reportSigned: boolean;
  updatedAt: Date;
}

export const NotificationPreferenceEntity = new EntitySchema<NotificationPreferenceRow & { user?: unknown }>({
  name: 'NotificationPreference',
  tableName: 'notification_preferences',
  columns: {
    userId: { type: 'integer', primary: true },
    batchEnded: { type: 'boolean', default: true },
    reviewRequested: { type: 'boolean', default: true },
    reportSigned: { type: 'boolean', default: true },
    updatedAt: { type: 'datetime', updateDate: true },
  },
  relations: {
    user: userFk('notification_preferences', 'userId', 'CASCADE'),
  },
});

export interface NotificationEventRow {
  id: number;
  /** batch_finished | batch_failed | review_requested | report_signed */
  kind: string;
  studyId: number;
  batchId: number | null;
  /** Kind-specific JSON (who asked whom, the failure reason, ...). */
  payload: string;
  createdAt: Date;
  /** Set once every recipient's message was handed to the mailer (or there was nobody to tell). */
  sentAt: Date | null;
  attempts: number;
  error: string | null;
}

/** The notification outbox: events are written in the same transaction as what caused them, then sent. */
export const NotificationEventEntity = new EntitySchema<NotificationEventRow & { study?: unknown }>({
  name: 'NotificationEvent',
  tableName: 'notification_events',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    kind: { type: 'varchar', length: 30 },
    studyId: { type: 'integer' },
    batchId: { type: 'integer', nullable: true },
    payload: { type: 'text' },
    createdAt: { type: 'datetime', createDate: true },
    sentAt: { type: 'datetime', nullable: true },
    attempts: { type: 'integer', default: 0 },
    error: { type: 'text', nullable: true },
  },
  relations: {
    study: studyFk('notification_events'),
  },
  indices: [{ name: 'IDX_notification_events_pending', columns: ['sentAt'] }],
});

export const reviewEntities = [
  VerdictEntity,
  VerdictHistoryEntity,
  ReviewCommentEntity,
  ReviewRequestEntity,
  ReportSignoffEntity,
  NotificationPreferenceEntity,
  NotificationEventEntity,
];
