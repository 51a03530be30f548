/** Team management: roles change and members leave, but a study always keeps a lead. */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UserEntity } from '../../server/auth/entities';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let leadToken: string;
const id: Record<string, number> = {};
const members = (path = '') => `/api/studies/${t.seed.studyId}/members${path}`;

beforeAll(async () => {
  t = await makeTestApp();
  leadToken = await t.tokenFor(LEAD);
  for (const email of [LEAD, STATS, REVIEWER]) {
    id[email] = (await t.dataSource.getRepository(UserEntity).findOneByOrFail({ email })).id;
  }
});
afterAll(async () => t.close());

async function roles(): Promise<Record<string, string>> {
  const res = await request(t.app).get(members()).set(bearer(leadToken)).expect(200);
  return Object.fromEntries(res.body.members.map((m: { email: string; role: string }) => [m.email, m.role]));
}

describe('the last lead', () => {
  it('cannot be demoted or removed, and nothing changes', async () => {
    const before = await roles();
    const demote = await request(t.app).patch(members(`/${id[LEAD]}`)).set(bearer(leadToken)).send({ role: 'reviewer' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_lead');
    expect(demote.body.error.message).toMatch(/at least one lead/);
    const remove = await request(t.app).delete(members(`/${id[LEAD]}`)).set(bearer(leadToken));
    expect(remove.status).toBe(409);
    expect(remove.body.error.code).toBe('last_lead');
    expect(await roles()).toEqual(before);
  });

  it('can step down once another member is lead', async () => {
    const promote = await request(t.app).patch(members(`/${id[STATS]}`)).set(bearer(leadToken)).send({ role: 'lead' });
    expect(promote.status).toBe(200);
    expect(promote.body.member).toMatchObject({ userId: id[STATS], role: 'lead', email: STATS });
    await request(t.app).patch(members(`/${id[LEAD]}`)).set(bearer(leadToken)).send({ role: 'statistician' }).expect(200);
    expect(await roles()).toMatchObject({ [LEAD]: 'statistician', [STATS]: 'lead', [REVIEWER]: 'reviewer' });
    // The former lead has lost the lead's powers at once.
    const now = await request(t.app).patch(members(`/${id[REVIEWER]}`)).set(bearer(leadToken)).send({ role: 'lead' });
    expect(now.status).toBe(403);
    // And the one remaining lead is protected again.
    const statsToken = await t.tokenFor(STATS);
    const last = await request(t.app).delete(members(`/${id[STATS]}`)).set(bearer(statsToken));
    expect(last.status).toBe(409);
  });

  it('removes a member, who then no longer sees the study', async () => {
    const statsToken = await t.tokenFor(STATS);
    const reviewerToken = await t.tokenFor(REVIEWER);
    await request(t.app).get(`/api/studies/${t.seed.studyId}`).set(bearer(reviewerToken)).expect(200);
    await request(t.app).delete(members(`/${id[REVIEWER]}`)).set(bearer(statsToken)).expect(204);
    await request(t.app).get(`/api/studies/${t.seed.studyId}`).set(bearer(reviewerToken)).expect(404);
    await request(t.app).delete(members(`/${id[REVIEWER]}`)).set(bearer(statsToken)).expect(404);
    const list = await request(t.app).get('/api/studies').set(bearer(reviewerToken));
    expect(list.body.studies).toEqual([]);
  });

  it('refuses an unknown role with a field message', async () => {
    const res = await request(t.app).patch(members(`/${id[LEAD]}`)).set(bearer(await t.tokenFor(STATS))).send({ role: 'captain' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.details.fields.role).toHaveLength(1);
  });
});
