/**
 * Session tokens: JWT signed with HS256. The payload names the user (sub), the user's session
 * epoch when the token was made (ep) and a random token id (jti). Every request reloads the user
 * and checks both, so a session can end before it expires (server/auth/guard.ts):
 * - a password change or "sign out everywhere" raises the user's epoch: all older tokens end;
 * - signing out lists the token id as ended: only that token ends.
 */
import { randomBytes } from 'node:crypto';
import jwt from 'jsonwebtoken';
import type { Config } from '../config';
import { ApiError } from '../errors';

export const SESSION_COOKIE = 'wavefit_token';

export interface SessionToken {
  token: string;
  expiresAt: Date;
}

export function signSession(config: Pick<Config, 'secret' | 'tokenTtlSeconds'>, userId: number, epoch: number): SessionToken {
  const nowSeconds = Math.floor(Date.now() / 1000);
  const exp = nowSeconds + config.tokenTtlSeconds;
  const jti = randomBytes(16).toString('hex');
  const token = jwt.sign({ sub: String(userId), ep: epoch, jti, iat: nowSeconds, exp }, config.secret, { algorithm: 'HS256' });
  return { token, expiresAt: new Date(exp * 1000) };
}

export interface VerifiedSession {
  userId: number;
  /** The user's session epoch when the token was made. */
  epoch: number;
  /** The token's random id. */
  tokenId: string;
  expiresAt: Date;
}

/** Checks signature and expiry; throws 401 token_expired or token_invalid. */
export function verifySession(config: Pick<Config, 'secret'>, token: string): VerifiedSession {
  let payload: string | jwt.JwtPayload;
  try {
    payload = jwt.verify(token, config.secret, { algorithms: ['HS256'] });
  } catch (error) {
    if (error instanceof jwt.TokenExpiredError) {
      throw new ApiError(401, 'token_expired', 'Your session has expired. Sign in again.');
    }
    throw new ApiError(401, 'token_invalid', 'The session token is not valid. Sign in again.');
  }
  const userId = typeof payload === 'object' ? Number(payload.sub) : NaN;
  if (typeof payload !== 'object' || !Number.isSafeInteger(userId) || userId <= 0 || typeof payload.exp !== 'number') {
    throw new ApiError(401, 'token_invalid', 'The session token is not valid. Sign in again.');
  }
  const epoch = (payload as { ep?: unknown }).ep;
  if (typeof epoch !== 'number' || !Number.isSafeInteger(epoch) || typeof payload.jti !== 'string' || !/^[0-9a-f]{32}$/.test(payload.jti)) {
    // A well-signed token from before sessions could end: treat it as ended.
    throw sessionEnded();
  }
  return { userId, epoch, tokenId: payload.jti, expiresAt: new Date(payload.exp * 1000) };
}

/** 401 session_ended: the token is genuine but its session was ended on the server. */
export function sessionEnded(): ApiError {
  return new ApiError(
    401,
    'session_ended',
    'This session has ended: you signed out, signed out everywhere, or your password was changed. Sign in again.',
  );
}
