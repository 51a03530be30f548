/**
 * Ended sessions: the token id (jti) of every session that was signed out, kept until the token
 * would have expired anyway. A token whose id is listed here gets 401 session_ended.
 */
import { EntitySchema } from 'typeorm';

export interface EndedSession {
  /** The token's random id (jti), 32 hex characters. */
  tokenId: string;
  userId: number;
  /** When the token expires; the row can be dropped after that. */
  expiresAt: Date;
}

export const EndedSessionEntity = new EntitySchema<EndedSession & { user?: unknown }>({
  name: 'EndedSession',
  tableName: 'ended_sessions',
  columns: {
    tokenId: { type: 'varchar', length: 32, primary: true },
    userId: { type: 'integer' },
    expiresAt: { type: 'datetime' },
  },
  relations: {
    user: { type: 'many-to-one', target: 'User', joinColumn: { name: 'userId', foreignKeyConstraintName: 'FK_ended_sessions_user' }, onDelete: 'CASCADE' },
  },
  indices: [{ name: 'IDX_ended_sessions_expires', columns: ['expiresAt'] }],
});
