/**
 * Every entity the data source knows, from the feature folders. To add one: write it as an
 * EntitySchema in the feature's entities.ts (no decorators), add it to this list, and add a
 * migration that creates its table (see ./migrations.ts).
 */
import { EndedSessionEntity, UserEntity } from '../auth/entities';
import { BatchEntity, BatchGofEntity, BatchResultEntity, BatchTieCountsEntity } from '../batches/entities';
import { ActorEntity, CovariateEntity, WaveEntity } from '../data/entities';
import { InvitationEntity } from '../invitations/entities';
import { lineupEntities } from '../lineups/entities';
import { JobChunkEntity, JobEntity } from '../jobs/entities';
import { FitEntity, ModelSpecEntity } from '../models/entities';
import { RefitEntity, RefitResultEntity } from '../refits/entities';
import { reviewEntities } from '../review/entities';
import { StudyEntity } from '../studies/entities';
import { MembershipEntity } from '../team/entities';

export const entities = [
  UserEntity,
  StudyEntity,
  MembershipEntity,
  InvitationEntity,
  ActorEntity,
  WaveEntity,
  CovariateEntity,
  JobEntity,
  JobChunkEntity,
  BatchEntity,
  BatchResultEntity,
  BatchTieCountsEntity,
  ModelSpecEntity,
  FitEntity,
  ...reviewEntities,
  ...lineupEntities,
  EndedSessionEntity,
  BatchGofEntity,
  RefitEntity,
  RefitResultEntity,
];
