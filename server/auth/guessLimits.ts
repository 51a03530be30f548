/**
 * Limits on password guessing, per account and per network address, shared by every place that
 * checks a password: sign-in, the current password on a password change, and the password of an
 * existing account when an invitation is accepted (OWASP Authentication Cheat Sheet, "Protect
 * against automated attacks": throttle per account and per source, common practice).
 *
 * - per account: config.guessLimits.perAccount wrong passwords for one account (by e-mail), from
 *   any address, within the window;
 * - per address: config.guessLimits.perAddress wrong passwords from one address (IPv6 by /56), for
 *   any accounts, within the window, which stops spraying one password over many accounts.
 * Only wrong passwords count (a route marks them with markWrongPassword); the sign-in limit per
 * address and e-mail (loginLimiter.ts) stays as well. Counters live in memory, one set per app.
 * A locked account unlocks by itself when the window ends, so a lock-out costs its owner minutes.
 */
import type { Request, RequestHandler, Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { GuessLimitConfig } from '../config';
import { ApiError } from '../errors';


export interface GuessLimits {
  /**
   * The middleware for a route that checks a password. `account` names the account being guessed
   * (its e-mail), or null when there is none (then only the address counts).
   */
  guard(account: (req: Request, res: Response) => string | null | Promise<string | null>): RequestHandler[];
}

/** Marks this request as a wrong password, so the limits count it. */
export function markWrongPassword(res: Response): void {
  res.locals.wrongPassword = true;
}

const minutesOf = (windowMs: number) => {
  const minutes = Math.ceil(windowMs / 60_000);
  return `${minutes} minute${minutes === 1 ? '' : 's'}`;
};

export function createGuessLimits(limits: GuessLimitConfig): GuessLimits {
  const common = {
    windowMs: limits.windowMs,
    skipSuccessfulRequests: true,
    requestWasSuccessful: (_req: Request, res: Response) => res.locals.wrongPassword !== true,
    standardHeaders: 'draft-7' as const,
    legacyHeaders: false,
  };
  const perAccount = rateLimit({
    ...common,
    limit: limits.perAccount,
    skip: (_req, res) => typeof res.locals.guessAccount !== 'string',
    keyGenerator: (_req, res) => `account|${res.locals.guessAccount as string}`,
    handler: (_req, _res, next) =>
      next(new ApiError(429, 'rate_limited', `Too many wrong passwords for this account. Wait ${minutesOf(limits.windowMs)} and try again.`)),
  });
  const perAddress = rateLimit({
    ...common,
    limit: limits.perAddress,
    keyGenerator: (req) => `address|${ipKeyGenerator(req.ip ?? 'unknown')}`,
    handler: (_req, _res, next) =>
      next(new ApiError(429, 'rate_limited', `Too many wrong passwords from your network address. Wait ${minutesOf(limits.windowMs)} and try again.`)),
  });
  return {
    guard(account) {
      const identify: RequestHandler = async (req, res, next) => {
        const name = await account(req, res);
        if (name) res.locals.guessAccount = name.trim().toLowerCase();
        next();
      };
      return [identify, perAccount, perAddress];
    },
  };
}
