/** Membership: a user's role in one study (lead, statistician or reviewer); one per user and study. */
import { EntitySchema } from 'typeorm';
import type { StudyRole } from '../../shared/api';
import type { Study } from '../studies/entities';
import type { User } from '../auth/entities';

export interface Membership {
  id: number;
  userId: number;
  studyId: number;
  role: StudyRole;
  createdAt: Date;
  user?: User;
  study?: Study;
}

export const MembershipEntity = new EntitySchema<Membership>({
  name: 'Membership',
  tableName: 'memberships',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    userId: { type: 'integer' },
    studyId: { type: 'integer' },
    role: { type: 'varchar', length: 20 },
    createdAt: { type: 'datetime', createDate: true },
  },
  relations: {
    user: { type: 'many-to-one', target: 'User', joinColumn: { name: 'userId', foreignKeyConstraintName: 'FK_memberships_user' }, onDelete: 'CASCADE' },
    study: { type: 'many-to-one', target: 'Study', joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_memberships_study' }, onDelete: 'CASCADE' },
  },
  uniques: [{ name: 'UQ_memberships_user_study', columns: ['userId', 'studyId'] }],
  indices: [{ name: 'IDX_memberships_study', columns: ['studyId'] }],
});
