/** User: a person who signs in. Site admins (isAdmin) see every study and pass every role guard. */
import { EntitySchema } from 'typeorm';

export interface User {
  id: number;
  /** Stored lower-case and trimmed; unique. */
  email: string;
  name: string;
  /** argon2id encoded hash (parameters and salt included). */
  passwordHash: string;
  isAdmin: boolean;
  /**
   * Session epoch: every session token carries the epoch it was made in, and only tokens of the
   * current epoch are accepted. Raised by a password change and by "sign out everywhere".
   */
  sessionEpoch: number;
  createdAt: Date;
}

export const UserEntity = new EntitySchema<User>({
  name: 'User',
  tableName: 'users',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    email: { type: 'varchar', length: 320 },
    name: { type: 'varchar', length: 120 },
    passwordHash: { type: 'varchar', length: 255 },
    isAdmin: { type: 'boolean', default: false },
    sessionEpoch: { type: 'integer', default: 0 },
    createdAt: { type: 'datetime', createDate: true },
  },
  uniques: [{ name: 'UQ_users_email', columns: ['email'] }],
});

/**
 * Ended sessions: the token id (jti) of every session that was signed out, kept until the token
 * would have expired anyway. A token whose id is listed here gets 401 session_ended.
 */
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
