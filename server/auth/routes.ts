/**
 * /api/auth: sign in, sign out (this session or everywhere), who am I, change password.
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
import { markWrongPassword } from './guessLimits';
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

  const loginGuesses = auth.guessLimits.guard((req) => (req.body as LoginBody).email);
  router.post('/login', createLoginLimiter(config.loginRateLimit), validate(loginBodySchema), ...loginGuesses, async (req, res) => {
    const body = req.body as LoginBody;
    const user = await users.findOneBy({ email: body.email });
    const ok = user
      ? await verifyPassword(user.passwordHash, body.password)
      : (await verifyPassword(await decoyHash(), body.password), false);
    if (!user || !ok) {
      markWrongPassword(res);
      throw new ApiError(401, 'invalid_credentials', 'The e-mail address or the password is not right.');
    }
    const session = auth.startSession(res, user);
    res.json(sessionResponse(user, session.token, session.expiresAt));
  });

  router.post('/logout', async (req, res) => {
    await auth.endThisSession(req);
    auth.endSession(res);
    res.status(204).end();
  });

  router.post('/logout-everywhere', auth.requireUser, async (req, res) => {
    await auth.endAllSessions(currentUser(req));
    auth.endSession(res);
    res.status(204).end();
  });

  router.get('/me', auth.requireUser, (req, res) => {
    const { user, token, expiresAt } = req.auth!;
    res.json(sessionResponse(user, token, expiresAt));
  });

  const passwordGuesses = auth.guessLimits.guard((req) => currentUser(req).email);
  router.post('/password', auth.requireUser, validate(changePasswordBodySchema), ...passwordGuesses, async (req, res) => {
    const body = req.body as ChangePasswordBody;
    const user = currentUser(req);
    if (!(await verifyPassword(user.passwordHash, body.currentPassword))) {
      markWrongPassword(res);
      throw badRequest('The current password is not right.', { fields: { currentPassword: ['The current password is not right.'] } }, 'validation_failed');
    }
    await users.update({ id: user.id }, { passwordHash: await hashPassword(body.newPassword, config.passwordHash) });
    // Every other session ends; this one goes on with a fresh token (OWASP: renew the session on a
    // change of credentials).
    const updated = await auth.endAllSessions(user);
    const session = auth.startSession(res, updated);
    res.json(sessionResponse(updated, session.token, session.expiresAt));
  });

  return router;
}
