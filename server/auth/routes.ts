/**
 * /api/auth: sign in, sign out, who am I, change password.
 * A wrong password and an unknown e-mail get the same answer.
 */
import { Router } from 'express';
import {
  changePasswordBodySchema,
  loginBodySchema,
  type ChangePasswordBody,
  type LoginBody,
  type SessionResponse,
} from '../../shared/api';
import { currentUser } from './context';
import { createLoginLimiter } from './loginLimiter';
import { hashPassword, makeDecoyHash, verifyPassword } from './passwords';
import { UserEntity, type User } from './entities';
import { ApiError, badRequest, validate } from '../errors';
import type { RouteDeps } from '../deps';
import { userInfo } from './service';

export function sessionResponse(user: User, token: string, expiresAt: Date): SessionResponse {
  return { user: userInfo(user), token, expiresAt: expiresAt.toISOString() };
}

export function authRouter(deps: RouteDeps): Router {
  const { dataSource, config, auth } = deps;
  const users = dataSource.getRepository(UserEntity);
  const decoyHash = makeDecoyHash(config.passwordHash);
  const router = Router();

  router.post('/login', createLoginLimiter(config.loginRateLimit), validate(loginBodySchema), async (req, res) => {
    const body = req.body as LoginBody;
    const user = await users.findOneBy({ email: body.email });
    const ok = user
      ? await verifyPassword(user.passwordHash, body.password)
      : (await verifyPassword(await decoyHash(), body.password), false);
    if (!user || !ok) {
      throw new ApiError(401, 'invalid_credentials', 'The e-mail address or the password is not right.');
    }
    const session = auth.startSession(res, user);
    res.json(sessionResponse(user, session.token, session.expiresAt));
  });

  router.post('/logout', (_req, res) => {
    auth.endSession(res);
    res.status(204).end();
  });

  router.get('/me', auth.requireUser, (req, res) => {
    const { user, token, expiresAt } = req.auth!;
    res.json(sessionResponse(user, token, expiresAt));
  });

  router.post('/password', auth.requireUser, validate(changePasswordBodySchema), async (req, res) => {
    const body = req.body as ChangePasswordBody;
    const user = currentUser(req);
    if (!(await verifyPassword(user.passwordHash, body.currentPassword))) {
      throw badRequest('The current password is not right.', { fields: { currentPassword: ['The current password is not right.'] } }, 'validation_failed');
    }
    await users.update({ id: user.id }, { passwordHash: await hashPassword(body.newPassword, config.passwordHash) });
    res.status(204).end();
  });

  return router;
}
