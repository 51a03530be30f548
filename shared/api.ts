/**
 * The API contract: zod schemas for request bodies and TypeScript types of responses.
 * The server validates every body with these schemas; the client's typed API client
 * (features/api/client.ts) uses the same types. Errors always have the shape ApiErrorBody.
 *
 * Endpoints (all under /api; auth by httpOnly cookie "wavefit_token" or "Authorization: Bearer <jwt>"):
 *   POST   /auth/login                         LoginBody            -> SessionResponse (+ cookie)
 *   POST   /auth/logout                                             -> 204 (this session ended, cookie cleared)
 *   POST   /auth/logout-everywhere                                  -> 204 (every session of the user ended)
 *   GET    /auth/me                                                 -> SessionResponse
 *   POST   /auth/password                      ChangePasswordBody   -> SessionResponse (+ cookie; other sessions ended)
 *   GET    /invitations/:token                                      -> InvitationPreview
 *   POST   /invitations/:token/accept          AcceptInvitationBody -> SessionResponse (+ cookie)
 *   GET    /studies                                                 -> { studies: StudySummary[] }
 *   POST   /studies                            CreateStudyBody      -> { study: StudySummary }   (creator becomes lead)
 *   GET    /studies/:studyId                                        -> { study: StudySummary }   (members, admin)
 *   PATCH  /studies/:studyId                   UpdateStudyBody      -> { study: StudySummary }   (lead)
 *   GET    /studies/:studyId/members                                -> TeamResponse              (members)
 *   POST   /studies/:studyId/invitations       InviteBody           -> { invitation: PendingInvitation } (lead; e-mail sent)
 *   DELETE /studies/:studyId/invitations/:id                        -> 204 (lead)
 *   PATCH  /studies/:studyId/members/:userId   ChangeRoleBody       -> { member: Member }        (lead; never leaves a study without a lead)
 *   DELETE /studies/:studyId/members/:userId                        -> 204 (lead; never removes the last lead)
 *   GET    /health                                                  -> HealthResponse
 *   GET    /dev/outbox   (only when HealthResponse.devOutbox; admins)   -> { messages: OutboxMessage[] }
 * Study data (contract in shared/data.ts):
 *   POST   /studies/:studyId/data              DataUploadBody       -> DataUploadResponse (lead, statistician; replaces the data)
 *   GET    /studies/:studyId/data                                   -> StudyDataResponse  (members)
 *   GET    /studies/:studyId/data/waves/:index                      -> WaveTiesResponse   (members; index from 1)
 */
import { z } from 'zod';
import { PLAIN_LINE_MESSAGE, PLAIN_TEXT_MESSAGE, isPlainLine, isPlainText } from './plainText';

// ---------- roles ----------
export const STUDY_ROLES = ['lead', 'statistician', 'reviewer'] as const;
export type StudyRole = (typeof STUDY_ROLES)[number];
export const studyRoleSchema = z.enum(STUDY_ROLES);

/** What each study role may do; the server's role guard and the client's buttons both read this. */
export const ROLE_ABILITIES = {
  read: ['lead', 'statistician', 'reviewer'],
  editData: ['lead', 'statistician'],
  editModels: ['lead', 'statistician'],
  runBatches: ['lead', 'statistician'],
  review: ['lead', 'statistician', 'reviewer'],
  manageTeam: ['lead'],
  signReport: ['lead'],
} as const satisfies Record<string, readonly StudyRole[]>;
export type Ability = keyof typeof ROLE_ABILITIES;

export function can(role: StudyRole | null | undefined, ability: Ability): boolean {
  return role != null && (ROLE_ABILITIES[ability] as readonly StudyRole[]).includes(role);
}

// ---------- errors ----------
export interface ApiErrorBody {
  error: { code: string; message: string; details?: unknown };
}

/**
 * The error codes the server sends (ApiErrorBody.error.code), with their HTTP status:
 * bad_request 400, validation_failed 400 (details: FieldErrorDetails), malformed_json 400,
 * data_invalid 400 (details: DataProblemDetails, shared/data.ts), unauthenticated 401,
 * token_expired 401, token_invalid 401, session_ended 401 (signed out, signed out everywhere or
 * password changed), invalid_credentials 401, forbidden 403, not_found 404,
 * already_member 409, last_lead 409, data_in_use 409, invitation_expired 410, invitation_used 410,
 * fit_not_ready 409, refit_not_ready 409, refit_not_running 409 (re-fit studies, shared/refits.ts), payload_too_large 413, rate_limited 429, internal 500.
 */
export type ApiErrorCode =
  | 'bad_request'
  | 'validation_failed'
  | 'malformed_json'
  | 'data_invalid'
  | 'unauthenticated'
  | 'token_expired'
  | 'token_invalid'
  | 'session_ended'
  | 'invalid_credentials'
  | 'forbidden'
  | 'not_found'
  | 'already_member'
  | 'last_lead'
  | 'data_in_use'
  | 'invitation_expired'
  | 'invitation_used'
  | 'payload_too_large'
  | 'rate_limited'
  | 'batch_not_ready'
  | 'fit_not_running'
  | 'verdict_conflict'
  | 'already_picked'
  | 'acknowledgement_required'
  | 'fit_not_ready'
  | 'refit_not_ready'
  | 'refit_not_running'
  | 'not_on_this_database'
  | 'internal';

/** details of a validation_failed error: messages per field path ("email", "waves.0.label"); "" is the body as a whole. */
export interface FieldErrorDetails {
  fields: Record<string, string[]>;
}

// ---------- auth ----------
export const emailSchema = z.string().trim().toLowerCase().email('Enter a valid e-mail address.');
export const passwordSchema = z
  .string()
  .min(10, 'A password needs at least 10 characters.')
  .max(200, 'A password may have at most 200 characters.');

export const loginBodySchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password.'),
});
export type LoginBody = z.infer<typeof loginBodySchema>;

export const changePasswordBodySchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.'),
  newPassword: passwordSchema,
});
export type ChangePasswordBody = z.infer<typeof changePasswordBodySchema>;

export const acceptInvitationBodySchema = z.object({
  name: z.string().trim().min(1, 'Enter your name.').max(120).refine(isPlainLine, `A name ${PLAIN_LINE_MESSAGE}.`),
  password: passwordSchema,
});
export type AcceptInvitationBody = z.infer<typeof acceptInvitationBodySchema>;

/**
 * GET /api/health. `devOutbox`: the server mounts the development outbox (WAVEFIT_DEV_OUTBOX=1, never
 * in production; site admins only); clients treat a missing field as false.
 */
export interface HealthResponse {
  ok: boolean;
  version: string;
  devOutbox?: boolean;
}

export interface UserInfo {
  id: number;
  email: string;
  name: string;
  isAdmin: boolean;
}
export interface SessionResponse {
  user: UserInfo;
  /** The same JWT as in the cookie, for scripts that use the bearer header. */
  token: string;
  expiresAt: string;
}

export interface InvitationPreview {
  email: string;
  role: StudyRole;
  studyName: string;
  invitedBy: string;
  expiresAt: string;
  /** True when an account with this e-mail exists already (then only the name field is ignored). */
  accountExists: boolean;
}

// ---------- studies ----------
export const createStudyBodySchema = z.object({
  name: z.string().trim().min(3, 'A study name needs at least 3 characters.').max(120, 'A study name may have at most 120 characters.').refine(isPlainLine, `A study name ${PLAIN_LINE_MESSAGE}.`),
  description: z.string().trim().max(2000, 'The description may have at most 2000 characters.').refine(isPlainText, `The description ${PLAIN_TEXT_MESSAGE}.`).default(''),
});
export type CreateStudyBody = z.input<typeof createStudyBodySchema>;

/** Only the fields sent change (no defaults here, so a rename keeps the description). */
export const updateStudyBodySchema = z.object({
  name: createStudyBodySchema.shape.name.optional(),
  description: z.string().trim().max(2000, 'The description may have at most 2000 characters.').refine(isPlainText, `The description ${PLAIN_TEXT_MESSAGE}.`).optional(),
});
export type UpdateStudyBody = z.input<typeof updateStudyBodySchema>;

export interface StudySummary {
  id: number;
  name: string;
  description: string;
  /** The signed-in user's role in this study; null for a site admin who is not a member. */
  myRole: StudyRole | null;
  memberCount: number;
  waveCount: number;
  actorCount: number;
  createdAt: string;
  updatedAt: string;
}

// ---------- team ----------
export const inviteBodySchema = z.object({
  email: emailSchema,
  role: studyRoleSchema,
});
export type InviteBody = z.infer<typeof inviteBodySchema>;

export const changeRoleBodySchema = z.object({ role: studyRoleSchema });
export type ChangeRoleBody = z.infer<typeof changeRoleBodySchema>;

export interface Member {
  userId: number;
  name: string;
  email: string;
  role: StudyRole;
  joinedAt: string;
}
export interface PendingInvitation {
  id: number;
  email: string;
  role: StudyRole;
  invitedBy: string;
  createdAt: string;
  expiresAt: string;
}
export interface TeamResponse {
  members: Member[];
  invitations: PendingInvitation[];
}

// ---------- dev ----------
export interface OutboxMessage {
  id: number;
  to: string;
  subject: string;
  text: string;
  html?: string;
  createdAt: string;
}
