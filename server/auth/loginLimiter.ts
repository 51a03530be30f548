/**
 * Login rate limit: at most config.loginRateLimit.max failed attempts per IP address and e-mail
 * within the window (default 10 per 15 minutes). Successful sign-ins do not count. Each app has its
 * own in-memory counter.
 */
import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { RateLimitConfig } from '../config';
import { ApiError } from '../errors';

export function createLoginLimiter(limit: RateLimitConfig): RequestHandler {
  return rateLimit({
    windowMs: limit.windowMs,
    limit: limit.max,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: (req: Request) => {
      const body = req.body as { email?: unknown } | undefined;
      const email = typeof body?.email === 'string' ? body.email.trim().toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? 'unknown')}|${email}`;
    },
    handler: (_req, _res, next, options) => {
      const minutes = Math.ceil(options.windowMs / 60_000);
      next(
        new ApiError(
          429,
          'rate_limited',
          `Too many failed sign-in attempts for this e-mail address. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`,
        ),
      );
    },
  });
}
