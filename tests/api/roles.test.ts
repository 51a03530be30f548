/**
 * The role guard, table-driven: every guarded route against every role that must be refused.
 * The policy below is written out by hand from the assignment (only a lead manages the study and
 * its team; every member reads; lead and statistician edit data), not read from ROLE_ABILITIES, so
 * a wrong entry there makes this test fail.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { StudyRole } from '../../shared/api';
import { hashPassword } from '../../server/auth/passwords';
import { MembershipEntity } from '../../server/team/entities';
import { StudyEntity } from '../../server/studies/entities';
import { UserEntity } from '../../server/auth/entities';
import { ADMIN, LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

type Method = 'get' | 'post' | 'patch' | 'delete';
interface GuardedRoute {
  method: Method;
  path: (ids: Ids) => string;
  body?: object;
  allowed: readonly StudyRole[];
}
interface Ids {
  study: number | string;
  invitation: number | string;
  reviewer: number | string;
}
const PLACEHOLDERS: Ids = { study: ':studyId', invitation: ':invitationId', reviewer: ':userId' };
const label = (route: GuardedRoute) => `${route.method.toUpperCase()} ${route.path(PLACEHOLDERS)}`;

const EVERY_MEMBER: readonly StudyRole[] = ['lead', 'statistician', 'reviewer'];
const LEAD_ONLY: readonly StudyRole[] = ['lead'];
const DATA_EDITORS: readonly StudyRole[] = ['lead', 'statistician'];

const GOOD_UPLOAD = {
  format: 'edgelist',
  waves: [
    { label: 'w1', content: 'a,b\nb,c\n' },
    { label: 'w2', content: 'a,b\nc,a\n' },
  ],
  actors: { content: 'label\na\nb\nc\n' },
};

const GUARDED_ROUTES: readonly GuardedRoute[] = [
  { method: 'get', path: (i) => `/api/studies/${i.study}`, allowed: EVERY_MEMBER },
  { method: 'patch', path: (i) => `/api/studies/${i.study}`, body: { name: 'Renamed study' }, allowed: LEAD_ONLY },
  { method: 'get', path: (i) => `/api/studies/${i.study}/members`, allowed: EVERY_MEMBER },
  { method: 'post', path: (i) => `/api/studies/${i.study}/invitations`, body: { email: 'new@harbourside.example', role: 'reviewer' }, allowed: LEAD_ONLY },
  { method: 'delete', path: (i) => `/api/studies/${i.study}/invitations/${i.invitation}`, allowed: LEAD_ONLY },
  { method: 'patch', path: (i) => `/api/studies/${i.study}/members/${i.reviewer}`, body: { role: 'statistician' }, allowed: LEAD_ONLY },
  { method: 'delete', path: (i) => `/api/studies/${i.study}/members/${i.reviewer}`, allowed: LEAD_ONLY },
  { method: 'get', path: (i) => `/api/studies/${i.study}/data`, allowed: EVERY_MEMBER },
  { method: 'get', path: (i) => `/api/studies/${i.study}/data/waves/1`, allowed: EVERY_MEMBER },
  { method: 'post', path: (i) => `/api/studies/${i.study}/data`, body: GOOD_UPLOAD, allowed: DATA_EDITORS },
];

const ROLE_EMAIL: Record<StudyRole, string> = { lead: LEAD, statistician: STATS, reviewer: REVIEWER };

let t: TestApp;
let ids: Ids;
const tokens: Record<string, string> = {};

function send(route: GuardedRoute, token: string | null) {
  const path = route.path(ids);
  let req = request(t.app)[route.method](path);
  if (token) req = req.set(bearer(token));
  return route.body ? req.send(route.body) : req;
}

beforeAll(async () => {
  t = await makeTestApp();
  const users = t.dataSource.getRepository(UserEntity);
  // An outsider who leads a study of their own but is no member of the demo study.
  const outsider = await users.save({
    email: 'outsider@elsewhere.example',
    name: 'Outsider',
    passwordHash: await hashPassword('outsider-password', t.config.passwordHash),
    isAdmin: false,
  });
  const other = await t.dataSource.getRepository(StudyEntity).save({ name: 'Another study', description: '' });
  await t.dataSource.getRepository(MembershipEntity).insert({ userId: outsider.id, studyId: other.id, role: 'lead' });

  for (const email of [LEAD, STATS, REVIEWER, ADMIN]) tokens[email] = await t.tokenFor(email);
  tokens.outsider = await t.tokenFor('outsider@elsewhere.example', 'outsider-password');

  const invite = await request(t.app)
    .post(`/api/studies/${t.seed.studyId}/invitations`)
    .set(bearer(tokens[LEAD]))
    .send({ email: 'pending@harbourside.example', role: 'reviewer' })
    .expect(201);
  const reviewer = await users.findOneByOrFail({ email: REVIEWER });
  ids = { study: t.seed.studyId, invitation: invite.body.invitation.id, reviewer: reviewer.id };
});
afterAll(async () => t.close());

const refusals = GUARDED_ROUTES.flatMap((route) =>
  EVERY_MEMBER.filter((role) => !route.allowed.includes(role)).map((role) => ({ route, role })),
);

describe('members whose role lacks the ability get 403 naming the role needed', () => {
  it.each(refusals.map(({ route, role }) => [label(route), role, route] as const))(
    '%s as %s',
    async (_label, role, route) => {
      const before = await t.counts('memberships', 'invitations', 'studies');
      const res = await send(route, tokens[ROLE_EMAIL[role]]);
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
      for (const needed of route.allowed) expect(res.body.error.message).toContain(needed);
      expect(res.body.error.message).toContain(`your role in this study is ${role}`);
      expect(await t.counts('memberships', 'invitations', 'studies')).toEqual(before);
    },
  );
});

describe('people outside the study cannot tell it exists', () => {
  it.each(GUARDED_ROUTES.map((route) => [label(route), route] as const))(
    '%s as a non-member gets 404, signed-out gets 401',
    async (_label, route) => {
      const res = await send(route, tokens.outsider);
      expect(res.status).toBe(404);
      expect(res.body.error).toEqual({ code: 'not_found', message: 'Study not found.' });
      const missing = await request(t.app)[route.method](route.path({ ...ids, study: 999_999 })).set(bearer(tokens.outsider));
      expect(missing.body).toEqual(res.body);
      const anonymous = await send(route, null);
      expect(anonymous.status).toBe(401);
    },
  );
});

describe('reads', () => {
  it('every member and the site admin see the study; the study list shows only own studies', async () => {
    for (const email of [LEAD, STATS, REVIEWER, ADMIN]) {
      const res = await request(t.app).get(`/api/studies/${ids.study}`).set(bearer(tokens[email]));
      expect(res.status).toBe(200);
      expect(res.body.study.myRole).toBe(email === ADMIN ? null : Object.entries(ROLE_EMAIL).find(([, e]) => e === email)![0]);
      expect(res.body.study.memberCount).toBe(3);
    }
    const outsiderList = await request(t.app).get('/api/studies').set(bearer(tokens.outsider));
    expect(outsiderList.body.studies.map((s: { name: string }) => s.name)).toEqual(['Another study']);
    const adminList = await request(t.app).get('/api/studies').set(bearer(tokens[ADMIN]));
    expect(adminList.body.studies).toHaveLength(2);
  });

  it('the site admin passes the lead-only guard', async () => {
    const res = await request(t.app).patch(`/api/studies/${ids.study}`).set(bearer(tokens[ADMIN])).send({ description: 'Edited by the admin.' });
    expect(res.status).toBe(200);
    expect(res.body.study.description).toBe('Edited by the admin.');
    expect(res.body.study.name).toBe('Harbourside rescue station — advice ties');
  });

  it('any signed-in user can create a study and becomes its lead', async () => {
    const res = await request(t.app).post('/api/studies').set(bearer(tokens.outsider)).send({ name: 'Lifeboat training', description: '' });
    expect(res.status).toBe(201);
    expect(res.body.study).toMatchObject({ name: 'Lifeboat training', myRole: 'lead', memberCount: 1, waveCount: 0, actorCount: 0 });
  });
});
