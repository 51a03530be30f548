/** Accounts as the API shows them (shared/api.ts). */
import type { UserInfo } from '../../shared/api';
import type { User } from './entities';

export function userInfo(user: User): UserInfo {
  return { id: user.id, email: user.email, name: user.name, isAdmin: Boolean(user.isAdmin) };
}
