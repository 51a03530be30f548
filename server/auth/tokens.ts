/**
 * Session tokens: JWT signed with HS256. The payload names the user (sub) and nothing else;
 * every request reloads the user, so a removed account loses access at once.
 */
import jwt from 'jsonwebtoken';
import type { Config } from '../config';
import { ApiError } from '../errors';

export const SESSION_COOKIE = 'wavefit_token';

export interface SessionToken {
  token: string;
  expiresAt: Date;
}

export function signSession(config: Pick<Config, 'secret' | 'tokenTtlSeconds'>, userId: number): SessionToken {
  const nowSeconds = Math.floor(Date.now() / 1000);
  const exp = nowSeconds + config.tokenTtlSeconds;
  const token = jwt.sign({ sub: String(userId), iat: nowSeconds, exp }, config.secret, { algorithm: 'HS256' });
  return { token, expiresAt: new Date(exp * 1000) };
}

export interface VerifiedSession {
  userId: number;
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
  return { userId, expiresAt: new Date(payload.exp * 1000) };
}
