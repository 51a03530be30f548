/**
 * The invitation flow end to end with the fake mail transport: the lead invites, the token is read
 * from the e-mail in the outbox, the invitee previews and accepts, and is then a signed-in member.
 * Token storage: only a SHA-256 hash is kept (common practice for bearer secrets, as for password
 * reset links; OWASP Forgot Password Cheat Sheet).
 */
import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InvitationEntity } from '../../server/invitations/entities';
import { ADMIN, LEAD, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let leadToken: string;
beforeAll(async () => {
  t = await makeTestApp();
  leadToken = await t.tokenFor(LEAD);
});
afterAll(async () => t.close());

/** Invites and returns the token read from the accept link in the e-mail. */
async function invite(email: string, role: string): Promise<{ token: string; id: number }> {
  const before = t.mailer.messages().length;
  const res = await request(t.app)
    .post(`/api/studies/${t.seed.studyId}/invitations`)
    .set(bearer(leadToken))
    .send({ email, role });
  expect(res.status).toBe(201);
  const messages = t.mailer.messages();
  expect(messages).toHaveLength(before + 1);
  const mail = messages[messages.length - 1];
  expect(mail.to).toBe(email.trim().toLowerCase());
  const match = /http:\/\/wavefit\.test\/invite\/([A-Za-z0-9_-]+)/.exec(mail.text);
  expect(match).not.toBeNull();
  expect(mail.html).toContain(`/invite/${match![1]}`);
  return { token: match![1], id: res.body.invitation.id };
}

describe('inviting a new person', () => {
  it('mails a link, previews it, accepts it and signs the person in', async () => {
    const { token, id } = await invite('  Nia.Okafor@Harbourside.example ', 'reviewer');
    const mail = t.mailer.messages().at(-1)!;
    expect(mail.subject).toContain('Harbourside rescue station');
    expect(mail.text).toContain('Ines Varga');

    const stored = await t.dataSource.getRepository(InvitationEntity).findOneByOrFail({ id });
    expect(stored.tokenHash).not.toContain(token);
    expect(stored.tokenHash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(stored.expiresAt.getTime() - stored.createdAt.getTime()).toBeGreaterThan(6.99 * 86_400_000);
    expect(stored.expiresAt.getTime() - stored.createdAt.getTime()).toBeLessThan(7.01 * 86_400_000);

    const team = await request(t.app).get(`/api/studies/${t.seed.studyId}/members`).set(bearer(leadToken));
    expect(team.body.invitations).toEqual([
      expect.objectContaining({ id, email: 'nia.okafor@harbourside.example', role: 'reviewer', invitedBy: 'Ines Varga' }),
    ]);

    const preview = await request(t.app).get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({
      email: 'nia.okafor@harbourside.example',
      role: 'reviewer',
      studyName: 'Harbourside rescue station — advice ties',
      invitedBy: 'Ines Varga',
      accountExists: false,
    });

    const accepted = await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: 'Nia Okafor', password: 'lifejackets-on' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email: 'nia.okafor@harbourside.example', name: 'Nia Okafor', isAdmin: false });
    expect(String(accepted.headers['set-cookie'])).toContain('wavefit_token=');

    const studies = await request(t.app).get('/api/studies').set(bearer(accepted.body.token));
    expect(studies.body.studies).toHaveLength(1);
    expect(studies.body.studies[0]).toMatchObject({ id: t.seed.studyId, myRole: 'reviewer', memberCount: 4 });

    // Used once, then gone; the new account signs in with its own password.
    const again = await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: 'Nia Okafor', password: 'lifejackets-on' });
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('invitation_used');
    await request(t.app).post('/api/auth/login').send({ email: 'nia.okafor@harbourside.example', password: 'lifejackets-on' }).expect(200);
    const after = await request(t.app).get(`/api/studies/${t.seed.studyId}/members`).set(bearer(leadToken));
    expect(after.body.invitations).toEqual([]);
  });

  it('adds an existing account only with its password', async () => {
    const { token } = await invite(ADMIN, 'statistician');
    const preview = await request(t.app).get(`/api/invitations/${token}`);
    expect(preview.body.accountExists).toBe(true);
    const before = await t.counts('users', 'memberships');
    const wrong = await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: 'ignored', password: 'not-the-admin-password' });
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.code).toBe('invalid_credentials');
    expect(await t.counts('users', 'memberships')).toEqual(before);
    const ok = await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: 'ignored', password: 'wavefit-demo-1' });
    expect(ok.status).toBe(200);
    expect(ok.body.user).toMatchObject({ email: ADMIN, name: 'Morgan Hale', isAdmin: true });
    const study = await request(t.app).get(`/api/studies/${t.seed.studyId}`).set(bearer(ok.body.token));
    expect(study.body.study.myRole).toBe('statistician');
    expect(await t.counts('users', 'memberships')).toEqual({ users: before.users, memberships: before.memberships + 1 });
  });
});

describe('invitations that cannot be used', () => {
  it('refuses an unknown token and an expired invitation', async () => {
    const unknown = await request(t.app).get('/api/invitations/AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA');
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.message).toMatch(/not valid/);

    const { token, id } = await invite('late@harbourside.example', 'reviewer');
    await t.dataSource.getRepository(InvitationEntity).update({ id }, { expiresAt: new Date(Date.now() - 1000) });
    const before = await t.counts('users', 'memberships');
    const res = await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: 'Late', password: 'too-late-password' });
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('invitation_expired');
    expect(await t.counts('users', 'memberships')).toEqual(before);
  });

  it('refuses to invite a member again, and a revoked invitation stops working', async () => {
    const dup = await request(t.app).post(`/api/studies/${t.seed.studyId}/invitations`).set(bearer(leadToken)).send({ email: STATS, role: 'lead' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.code).toBe('already_member');

    const { token, id } = await invite('revoked@harbourside.example', 'statistician');
    await request(t.app).delete(`/api/studies/${t.seed.studyId}/invitations/${id}`).set(bearer(leadToken)).expect(204);
    await request(t.app).get(`/api/invitations/${token}`).expect(404);
    await request(t.app).delete(`/api/studies/${t.seed.studyId}/invitations/${id}`).set(bearer(leadToken)).expect(404);
  });

  it('a second invitation to the same address replaces the first', async () => {
    const first = await invite('twice@harbourside.example', 'reviewer');
    const second = await invite('twice@harbourside.example', 'statistician');
    await request(t.app).get(`/api/invitations/${first.token}`).expect(404);
    const preview = await request(t.app).get(`/api/invitations/${second.token}`).expect(200);
    expect(preview.body.role).toBe('statistician');
  });

  it('refuses a bad accept body and keeps the invitation usable', async () => {
    const { token } = await invite('careful@harbourside.example', 'reviewer');
    const res = await request(t.app).post(`/api/invitations/${token}/accept`).send({ name: '', password: 'short' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields).sort()).toEqual(['name', 'password']);
    await request(t.app).get(`/api/invitations/${token}`).expect(200);
  });
});
