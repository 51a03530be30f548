/**
 * Lineup tables: a lineup (a statistic in one period of a batch, m panels, its seed and the plan drawn
 * from it) and the picks (one per person and lineup: the panel, whether it was the observed wave, the
 * reason in a few words, when).
 */
import { EntitySchema } from 'typeorm';

export interface LineupRow {
  id: number;
  studyId: number;
  batchId: number;
  statistic: string;
  period: number;
  panels: number;
  seed: number;
  /** LineupPlan JSON (server/engine/gof/lineup.ts), drawn from the seed. */
  plan: string;
  createdById: number | null;
  createdAt: Date;
}

export interface LineupPickRow {
  id: number;
  lineupId: number;
  studyId: number;
  userId: number | null;
  /** The name when the pick was made (kept if the account goes). */
  userName: string;
  /** From 1. */
  panel: number;
  correct: boolean;
  reason: string;
  createdAt: Date;
}

export const LineupEntity = new EntitySchema<LineupRow & { study?: unknown; batch?: unknown; createdBy?: unknown }>({
  name: 'Lineup',
  tableName: 'lineups',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    batchId: { type: 'integer' },
    statistic: { type: 'varchar', length: 40 },
    period: { type: 'integer' },
    panels: { type: 'integer' },
    seed: { type: 'integer' },
    plan: { type: 'text' },
    createdById: { type: 'integer', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    study: { type: 'many-to-one', target: 'Study', joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_lineups_study' }, onDelete: 'CASCADE' },
    batch: { type: 'many-to-one', target: 'Batch', joinColumn: { name: 'batchId', foreignKeyConstraintName: 'FK_lineups_batch' }, onDelete: 'CASCADE' },
    createdBy: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'createdById', foreignKeyConstraintName: 'FK_lineups_createdById' },
      onDelete: 'SET NULL',
      nullable: true,
    },
  },
  indices: [{ name: 'IDX_lineups_batch', columns: ['batchId'] }],
});

export const LineupPickEntity = new EntitySchema<LineupPickRow & { lineup?: unknown; study?: unknown; user?: unknown }>({
  name: 'LineupPick',
  tableName: 'lineup_picks',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    lineupId: { type: 'integer' },
    studyId: { type: 'integer' },
    userId: { type: 'integer', nullable: true },
    userName: { type: 'varchar', length: 120 },
    panel: { type: 'integer' },
    correct: { type: 'boolean' },
    reason: { type: 'text' },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    lineup: { type: 'many-to-one', target: 'Lineup', joinColumn: { name: 'lineupId', foreignKeyConstraintName: 'FK_lineup_picks_lineup' }, onDelete: 'CASCADE' },
    study: { type: 'many-to-one', target: 'Study', joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_lineup_picks_study' }, onDelete: 'CASCADE' },
    user: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'userId', foreignKeyConstraintName: 'FK_lineup_picks_userId' },
      onDelete: 'SET NULL',
      nullable: true,
    },
  },
  uniques: [{ name: 'UQ_lineup_picks_person', columns: ['lineupId', 'userId'] }],
});

export const lineupEntities = [LineupEntity, LineupPickEntity];
