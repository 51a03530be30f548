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
    createdAt: { type: 'datetime', createDate: true },
  },
  uniques: [{ name: 'UQ_users_email', columns: ['email'] }],
});
