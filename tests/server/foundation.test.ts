import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { DEMO_PASSWORD, DEMO_PIN } from '../../server/seed/demo';
import { SESSION_COOKIE, SESSION_MAX_S } from '../../server/http/session';
import { csrf, makeTestApp, type TestApp } from '../helpers/app';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const linkToken = (text: string, path: string) => new RegExp(`${path}\\?token=([\\w-]+)`).exec(text)?.[1];

describe('health and API description', () => {
  it('answers health with the database checked', async () => {
    const res = await t.anon.get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok', db: 'ok', version: 'test' });
  });

  it('publishes an OpenAPI 3.1 document listing the routes', async () => {
    const res = await t.anon.get('/api/openapi.json');
    expect(res.body.openapi).toBe('3.1.0');
    expect(Object.keys(res.body.paths)).toContain('/api/sites/{siteId}/cart-profiles');
    expect(res.body.paths['/api/auth/sign-in'].post.requestBody.content['application/json'].schema.properties.email).toBeDefined();
  });

  it('answers unknown API paths with the error shape', async () => {
    const res = await t.anon.get('/api/nope');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('sign-in', () => {
  it('answers the same for an unknown e-mail and a wrong password', async () => {
    const a = await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'nobody@demo.aislewright.test', password: 'whatever-123' });
    const b = await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'admin@demo.aislewright.test', password: 'wrong-password' });
    expect(a.status).toBe(401);
    expect(b.status).toBe(401);
    expect(a.body).toEqual(b.body);
  });

  it('backs off an account after repeated failures, then tells how long to wait', async () => {
    const agent = request.agent(t.app);
    const email = 'engineer@demo.aislewright.test';
    const codes: number[] = [];
    for (let i = 0; i < 7; i++) codes.push((await agent.post('/api/auth/sign-in').set(csrf).send({ email, password: 'wrong-password' })).status);
    expect(codes.slice(0, 6)).toEqual([401, 401, 401, 401, 401, 401]);
    expect(codes[6]).toBe(429);
    const right = await agent.post('/api/auth/sign-in').set(csrf).send({ email, password: DEMO_PASSWORD });
    expect(right.status).toBe(429);
    expect(right.body.error.details.retryAfterSeconds).toBeGreaterThan(0);
    await t.deps.backoff.succeed(`acct:e:${email}`);
  });

  it('rejects unknown fields, naming them', async () => {
    const res = await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'a@b.co', password: 'x', remember: true });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toContainEqual({ field: 'remember', message: 'unknown field' });
  });

  it('refuses a state-changing request without the CSRF header or from another origin', async () => {
    const noHeader = await t.anon.post('/api/auth/sign-in').send({ email: 'admin@demo.aislewright.test', password: DEMO_PASSWORD });
    expect(noHeader.status).toBe(403);
    expect(noHeader.body.error.code).toBe('csrf_failed');
    const crossOrigin = await t.anon
      .post('/api/auth/sign-in')
      .set(csrf)
      .set('Origin', 'https://evil.example')
      .send({ email: 'admin@demo.aislewright.test', password: DEMO_PASSWORD });
    expect(crossOrigin.status).toBe(403);
  });

  it('sets an HttpOnly, SameSite=Strict session cookie with a pinned algorithm', async () => {
    const res = await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Strict/);
    const token = /aw_session=([^;]+)/.exec(cookie)![1]!;
    expect(jwt.decode(token, { complete: true })!.header.alg).toBe('HS256');
  });

  it('refuses a token signed with alg none or another secret', async () => {
    const forged = jwt.sign({ ver: 0, auth: Math.floor(Date.now() / 1000) }, 'another-secret-another-secret-another-secret', {
      subject: '1',
      issuer: 'aislewright',
      audience: 'aislewright-app',
    });
    const res = await request(t.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${forged}`);
    expect(res.status).toBe(401);
    const none = `${Buffer.from('{"alg":"none","typ":"JWT"}').toString('base64url')}.${Buffer.from(JSON.stringify({ sub: '1', ver: 0, auth: 1, iss: 'aislewright', aud: 'aislewright-app' })).toString('base64url')}.`;
    expect((await request(t.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${none}`)).status).toBe(401);
  });

  it('ends a session past the shift limit even if the token is fresh', async () => {
    const old = Math.floor(Date.now() / 1000) - SESSION_MAX_S - 60;
    const token = jwt.sign({ ver: 0, auth: old }, t.deps.jwtSecret, {
      algorithm: 'HS256',
      subject: '1',
      issuer: 'aislewright',
      audience: 'aislewright-app',
      expiresIn: 900,
    });
    expect((await request(t.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${token}`)).status).toBe(401);
  });

  it('lets pickers in by badge and PIN only', async () => {
    const me = await t.as.picker.get('/api/auth/me');
    expect(me.body.role).toBe('picker');
    const wrongPin = await t.anon.post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1003', pin: '000000' });
    expect(wrongPin.status).toBe(401);
    const ok = await request.agent(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1003', pin: DEMO_PIN });
    expect(ok.status).toBe(200);
  });
});

describe('admin: users', () => {
  it('invites by e-mail with a single-use link that sets up the account', async () => {
    const inv = await t.as.admin
      .post('/api/users/invites')
      .set(csrf)
      .send({ email: 'new.super@demo.aislewright.test', role: 'supervisor', siteIds: [t.siteId] });
    expect(inv.status).toBe(201);
    const mail = (await t.as.admin.get('/api/mail/outbox')).body.find((m: { to: string }) => m.to === 'new.super@demo.aislewright.test');
    const token = linkToken(mail.text, '/accept-invite')!;
    expect(token).toBeDefined();
    expect((await t.anon.get(`/api/auth/invites/${token}`)).body.role).toBe('supervisor');
    const agent = request.agent(t.app);
    const accepted = await agent.post('/api/auth/invites/accept').set(csrf).send({ token, name: 'New Supervisor', password: 'a-long-password' });
    expect(accepted.status).toBe(201);
    expect((await agent.get('/api/auth/me')).body.email).toBe('new.super@demo.aislewright.test');
    const again = await request(t.app).post('/api/auth/invites/accept').set(csrf).send({ token, name: 'X', password: 'a-long-password' });
    expect(again.status).toBe(404);
  });

  it('answers an over-long invitation link with 400, not a server error', async () => {
    const res = await t.anon.get(`/api/auth/invites/${'x'.repeat(300)}`);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
  });

  it('deactivating a user ends their sessions at once', async () => {
    await t.as.admin
      .post('/api/users/pickers')
      .set(csrf)
      .send({ name: 'Temp Picker', badge: 'P-2001', pin: '135790', siteIds: [t.siteId] });
    const agent = request.agent(t.app);
    await agent.post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-2001', pin: '135790' });
    expect((await agent.get('/api/auth/me')).status).toBe(200);
    const id = (await t.as.admin.get('/api/users')).body.find((u: { badge: string }) => u.badge === 'P-2001').id;
    await t.as.admin.patch(`/api/users/${id}`).set(csrf).send({ active: false });
    expect((await agent.get('/api/auth/me')).status).toBe(401);
    const back = await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-2001', pin: '135790' });
    expect(back.status).toBe(401);
  });

  it('resets a picker PIN; the old PIN stops working; PINs need 6 digits', async () => {
    const id = (await t.as.admin.get('/api/users')).body.find((u: { badge: string }) => u.badge === 'P-1003').id;
    expect((await t.as.admin.post(`/api/users/${id}/pin`).set(csrf).send({ pin: '12345' })).status).toBe(400);
    expect((await t.as.admin.post(`/api/users/${id}/pin`).set(csrf).send({ pin: '975310' })).status).toBe(200);
    expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1003', pin: DEMO_PIN })).status).toBe(401);
    expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1003', pin: '975310' })).status).toBe(200);
  });

  it('changes only the sites of a user (regression: an empty field update answered 500)', async () => {
    const other = await t.as.admin.post('/api/sites').set(csrf).send({ code: 'SITES2', name: 'Second site' });
    const id = (await t.as.admin.get('/api/users')).body.find((u: { badge: string }) => u.badge === 'P-1002').id;
    const res = await t.as.admin
      .patch(`/api/users/${id}`)
      .set(csrf)
      .send({ siteIds: [t.siteId, other.body.id] });
    expect(res.status).toBe(200);
    expect(res.body.siteIds).toEqual([t.siteId, other.body.id]);
    await t.as.admin
      .patch(`/api/users/${id}`)
      .set(csrf)
      .send({ siteIds: [t.siteId] });
  });

  it('will not let an admin lock themselves out', async () => {
    const me = (await t.as.admin.get('/api/auth/me')).body;
    const res = await t.as.admin.patch(`/api/users/${me.id}`).set(csrf).send({ active: false });
    expect(res.status).toBe(409);
  });
});

describe('passwords', () => {
  it('resets a forgotten password through the mailed link, once', async () => {
    expect((await t.anon.post('/api/auth/reset-request').set(csrf).send({ email: 'nobody@demo.aislewright.test' })).body).toEqual({ ok: true });
    await t.anon.post('/api/auth/reset-request').set(csrf).send({ email: 'engineer@demo.aislewright.test' });
    // The mail goes out after the answer.
    await t.deps.background.settled();
    const mail = (await t.as.admin.get('/api/mail/outbox')).body.find(
      (m: { to: string; subject: string }) => m.to === 'engineer@demo.aislewright.test' && /Reset/.test(m.subject),
    );
    const token = linkToken(mail.text, '/reset-password')!;
    expect((await t.anon.post('/api/auth/reset').set(csrf).send({ token, newPassword: 'short' })).status).toBe(400);
    expect((await t.anon.post('/api/auth/reset').set(csrf).send({ token, newPassword: 'a-brand-new-password' })).status).toBe(200);
    expect((await t.anon.post('/api/auth/reset').set(csrf).send({ token, newPassword: 'a-brand-new-password' })).status).toBe(400);
    // The engineer's existing session ended with the reset.
    expect((await t.as.engineer.get('/api/auth/me')).status).toBe(401);
    const agent = request.agent(t.app);
    expect((await agent.post('/api/auth/sign-in').set(csrf).send({ email: 'engineer@demo.aislewright.test', password: 'a-brand-new-password' })).status).toBe(
      200,
    );
    t.as.engineer = agent;
  });

  it('changes your own password after checking the current one, keeping this session', async () => {
    const agent = request.agent(t.app);
    await agent.post('/api/auth/sign-in').set(csrf).send({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    expect((await agent.post('/api/auth/password').set(csrf).send({ currentPassword: 'nope', newPassword: 'another-long-one' })).status).toBe(400);
    expect((await agent.post('/api/auth/password').set(csrf).send({ currentPassword: DEMO_PASSWORD, newPassword: 'another-long-one' })).status).toBe(200);
    expect((await agent.get('/api/auth/me')).status).toBe(200);
    expect((await t.as.supervisor.get('/api/auth/me')).status).toBe(401);
  });
});

describe('sites', () => {
  it('keeps settings with their defaults and edits cart profiles', async () => {
    const site = (await t.as.admin.get(`/api/sites/${t.siteId}`)).body;
    expect(site.settings).toEqual({ walkingSpeedMps: 1, secondsPerLine: 10, secondsPerStop: 5, confirmScan: 'bin' });
    const patched = await t.as.admin
      .patch(`/api/sites/${t.siteId}`)
      .set(csrf)
      .send({ settings: { walkingSpeedMps: 1.2 } });
    expect(patched.body.settings.walkingSpeedMps).toBe(1.2);
    expect(
      (
        await t.as.admin
          .patch(`/api/sites/${t.siteId}`)
          .set(csrf)
          .send({ settings: { walkingSpeedMps: -1 } })
      ).status,
    ).toBe(400);
    const cart = await t.as.admin.post(`/api/sites/${t.siteId}/cart-profiles`).set(csrf).send({ name: 'Wide cart', totes: 12, maxKg: 200, maxLitres: 600 });
    expect(cart.status).toBe(201);
    expect((await t.as.admin.delete(`/api/sites/${t.siteId}/cart-profiles/${cart.body.id}`).set(csrf)).status).toBe(200);
    expect((await t.as.admin.get(`/api/sites/${t.siteId}`)).body.cartProfiles.map((c: { name: string }) => c.name)).not.toContain('Wide cart');
  });

  it("keeps users out of sites they don't belong to", async () => {
    const other = await t.as.admin.post('/api/sites').set(csrf).send({ code: 'OTH', name: 'Other site' });
    expect(other.status).toBe(201);
    expect((await t.as.picker.get(`/api/sites/${other.body.id}`)).status).toBe(403);
    expect((await t.as.admin.get(`/api/sites/${other.body.id}`)).status).toBe(200);
    expect((await t.as.picker.get('/api/sites')).body.map((s: { code: string }) => s.code)).toEqual(['BWE']);
  });
});

describe('integration tokens', () => {
  it('are shown once, stored hashed, and refused after revocation', async () => {
    const created = await t.as.admin.post(`/api/sites/${t.siteId}/integration-tokens`).set(csrf).send({ name: 'Host system' });
    expect(created.status).toBe(201);
    expect(created.body.token).toMatch(/^awi_/);
    const stored = await t.deps.db('integration_tokens').where({ id: created.body.id }).first();
    expect(JSON.stringify(stored)).not.toContain(created.body.token);
    const listed = (await t.as.admin.get(`/api/sites/${t.siteId}/integration-tokens`)).body;
    expect(listed[0].token).toBeUndefined();
    expect((await t.as.admin.delete(`/api/sites/${t.siteId}/integration-tokens/${created.body.id}`).set(csrf)).body.revokedAt).not.toBeNull();
  });
});
