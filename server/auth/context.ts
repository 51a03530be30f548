/** What the auth middleware attaches to a request, and typed getters for the routes. */
import type { Request } from 'express';
import type { StudyRole } from '../../shared/api';
import type { Study } from '../studies/entities';
import type { User } from './entities';

export interface StudyAccess {
  study: Study;
  /** The user's role in this study; null for a site admin who is not a member. */
  role: StudyRole | null;
}

export interface RequestAuth {
  user: User;
  token: string;
  expiresAt: Date;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      auth?: RequestAuth;
      studyAccess?: StudyAccess;
    }
  }
}

/** The signed-in user; only call behind requireUser. */
export function currentUser(req: Request): User {
  if (!req.auth) throw new Error('auth: currentUser called on a route without requireUser');
  return req.auth.user;
}

/** The study of :studyId and the user's role in it; only call behind requireStudyRole. */
export function currentStudy(req: Request): StudyAccess {
  if (!req.studyAccess) throw new Error('auth: currentStudy called on a route without requireStudyRole');
  return req.studyAccess;
}
