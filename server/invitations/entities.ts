/**
 * Invitation: an e-mailed offer to join a study in a role. Only the SHA-256 hash of the token is
 * stored; the token itself travels once, in the accept link of the e-mail.
 */
import { EntitySchema } from 'typeorm';
import type { StudyRole } from '../../shared/api';
import type { Study } from '../studies/entities';
import type { User } from '../auth/entities';

export interface Invitation {
  id: number;
  email: string;
  studyId: number;
  role: StudyRole;
  tokenHash: string;
  invitedById: number | null;
  createdAt: Date;
  expiresAt: Date;
  acceptedAt: Date | null;
  study?: Study;
  invitedBy?: User | null;
}

export const InvitationEntity = new EntitySchema<Invitation>({
  name: 'Invitation',
  tableName: 'invitations',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    email: { type: 'varchar', length: 320 },
    studyId: { type: 'integer' },
    role: { type: 'varchar', length: 20 },
    tokenHash: { type: 'varchar', length: 64 },
    invitedById: { type: 'integer', nullable: true },
    createdAt: { type: 'datetime', createDate: true },
    expiresAt: { type: 'datetime' },
    acceptedAt: { type: 'datetime', nullable: true },
  },
  relations: {
    study: { type: 'many-to-one', target: 'Study', joinColumn: { name: 'studyId', foreignKeyConstraintName: 'FK_invitations_study' }, onDelete: 'CASCADE' },
    invitedBy: {
      type: 'many-to-one',
      target: 'User',
      joinColumn: { name: 'invitedById', foreignKeyConstraintName: 'FK_invitations_invited_by' },
      nullable: true,
      onDelete: 'SET NULL',
    },
  },
  uniques: [{ name: 'UQ_invitations_token', columns: ['tokenHash'] }],
  indices: [{ name: 'IDX_invitations_study', columns: ['studyId'] }],
});
