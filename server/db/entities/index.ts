/**
 * Every entity the data source knows. To add one: write it as an EntitySchema in this folder
 * (no decorators), add it to this list, and add a migration that creates its table
 * (see ../migrations/index.ts).
 */
import { ActorEntity } from './Actor';
import { CovariateEntity } from './Covariate';
import { InvitationEntity } from './Invitation';
import { MembershipEntity } from './Membership';
import { StudyEntity } from './Study';
import { UserEntity } from './User';
import { WaveEntity } from './Wave';
import { JobChunkEntity, JobEntity } from '../../jobs/entities';
import { BatchEntity, BatchResultEntity, BatchTieCountsEntity } from '../../batches/entities';
import { FitEntity, ModelSpecEntity } from '../../models/entities';
import { reviewEntities } from '../../review/entities';
import { EndedSessionEntity } from '../../auth/sessionEntities';

export * from './Actor';
export * from './Covariate';
export * from './Invitation';
export * from './Membership';
export * from './Study';
export * from './User';
export * from './Wave';

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
  EndedSessionEntity,
];
