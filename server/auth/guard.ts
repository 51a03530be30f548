/**
 * Authentication and the role guard, built per app (no module state):
 * - requireUser: a valid session token from the cookie wavefit_token or "Authorization: Bearer";
 * - requireStudyRole(ability): the signed-in user may do `ability` in the study :studyId.
 *   Site admins pass every guard. Non-members get 404 "study not found", so nobody can probe which
 *   studies exist; members whose role lacks the ability get 403 naming the roles that have it.
 */
import type { CookieOptions, Request, RequestHandler, Response } from 'express';
import type { DataSource } from 'typeorm';
import { ROLE_ABILITIES, can, type Ability } from '../../shared/api';
import type { Config } from '../config';
import { MembershipEntity } from '../team/entities';
import { StudyEntity } from '../studies/entities';
import { UserEntity, type User } from './entities';
import { ApiError, forbidden, idParam, notFound } from '../errors';
import { createGuessLimits, type GuessLimits } from './guessLimits';
import { EndedSessionEntity } from './entities';
import { SESSION_COOKIE, sessionEnded, signSession, verifySession, type SessionToken } from './tokens';

export interface Auth {
  requireUser: RequestHandler;
  requireStudyRole(ability: Ability): RequestHandler;
  /** Signs the user in: sets the cookie and returns the token for the response body. */
  startSession(res: Response, user: User): SessionToken;
  /** Clears the cookie. */
  endSession(res: Response): void;
  /**
   * Ends the session of the request's token, if it carries a genuine one: its id is listed as
   * ended until it expires. Used by sign-out; an invalid or missing token is ignored.
   */
  endThisSession(req: Request): Promise<void>;
  /** Ends every session of the user (raises the session epoch); returns the user with the new epoch. */
  endAllSessions(user: User): Promise<User>;
  /** The app's limits on wrong passwords, per account and per address (one set of counters). */
  guessLimits: GuessLimits;
}

const ABILITY_WORDS: Record<Ability, string> = {
  read: 'see this study',
  editData: 'change the study data',
  editModels: 'change models',
  runBatches: 'run fits and simulation batches',
  review: 'review statistics',
  manageTeam: 'manage the study and its team',
  signReport: 'sign the report',
};

function rolesSentence(ability: Ability): string {
  const roles = [...ROLE_ABILITIES[ability]];
  if (roles.length === 1) return `the ${roles[0]} role`;
  return `the ${roles.slice(0, -1).join(', ')} or ${roles[roles.length - 1]} role`;
}

function tokenFrom(req: Request): string | null {
  const header = req.get('authorization');
  if (header) {
    const match = /^Bearer\s+(\S+)\s*$/i.exec(header);
    if (!match) throw new ApiError(401, 'token_invalid', 'The Authorization header must read "Bearer <token>".');
    return match[1];
  }
  const cookie = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
  return cookie || null;
}

export function createAuth(deps: { dataSource: DataSource; config: Config }): Auth {
  const { dataSource, config } = deps;
  const users = dataSource.getRepository(UserEntity);
  const studies = dataSource.getRepository(StudyEntity);
  const memberships = dataSource.getRepository(MembershipEntity);
  const ended = dataSource.getRepository(EndedSessionEntity);

  const cookieOptions: CookieOptions = {
    httpOnly: true,
    sameSite: 'lax',
    secure: config.secureCookies,
    path: '/',
  };

  const requireUser: RequestHandler = async (req, res, next) => {
    const token = tokenFrom(req);
    if (!token) throw new ApiError(401, 'unauthenticated', 'Sign in to continue.');
    const session = verifySession(config, token);
    const user = await users.findOneBy({ id: session.userId });
    if (!user) throw new ApiError(401, 'token_invalid', 'The account of this session no longer exists. Sign in again.');
    if (session.epoch !== user.sessionEpoch || (await ended.existsBy({ tokenId: session.tokenId }))) {
      // The browser need not send the dead cookie again.
      if (!req.get('authorization')) res.clearCookie(SESSION_COOKIE, cookieOptions);
      throw sessionEnded();
    }
    req.auth = { user, token, expiresAt: session.expiresAt };
    next();
  };

  function requireStudyRole(ability: Ability): RequestHandler {
    return async (req, _res, next) => {
      const user = req.auth?.user;
      if (!user) throw new Error('auth: requireStudyRole must come after requireUser');
      const studyId = idParam(req, 'studyId', 'Study');
      const [study, membership] = await Promise.all([
        studies.findOneBy({ id: studyId }),
        memberships.findOneBy({ studyId, userId: user.id }),
      ]);
      if (!study || (!membership && !user.isAdmin)) throw notFound('Study not found.');
      const role = membership?.role ?? null;
      if (!user.isAdmin && !can(role, ability)) {
        throw forbidden(`To ${ABILITY_WORDS[ability]} you need ${rolesSentence(ability)}; your role in this study is ${role}.`);
      }
      req.studyAccess = { study, role };
      next();
    };
  }

  return {
    requireUser,
    requireStudyRole,
    guessLimits: createGuessLimits(config.guessLimits),
    startSession(res, user) {
      const session = signSession(config, user.id, user.sessionEpoch);
      res.cookie(SESSION_COOKIE, session.token, { ...cookieOptions, maxAge: config.tokenTtlSeconds * 1000 });
      return session;
    },
    endSession(res) {
      res.clearCookie(SESSION_COOKIE, cookieOptions);
    },
    async endThisSession(req) {
      let token: string | null;
      try {
        token = tokenFrom(req);
      } catch {
        return;
      }
      if (!token) return;
      let session;
      try {
        session = verifySession(config, token);
      } catch {
        return; // expired, forged or already ended: nothing to end
      }
      // Rows of tokens that have expired anyway are no longer needed.
      await ended.createQueryBuilder().delete().where('"expiresAt" < :now', { now: new Date() }).execute();
      if (!(await users.existsBy({ id: session.userId }))) return;
      await ended.upsert({ tokenId: session.tokenId, userId: session.userId, expiresAt: session.expiresAt }, ['tokenId']);
    },
    async endAllSessions(user) {
      await users.increment({ id: user.id }, 'sessionEpoch', 1);
      return users.findOneByOrFail({ id: user.id });
    },
  };
}
