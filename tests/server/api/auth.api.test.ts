import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { sequelize } from '../../../server/db/sequelize.ts';
import { ROLES } from '../../../shared/permissions.ts';
import { buildUser, TEST_PASSWORD } from '../../helpers/factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  TEST_ORIGIN,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

describe('sign-in', () => {
  it('answers 401 on /me with no session', async () => {
    const res = await request(t.app).get('/api/auth/me');
    expect(res.status).toBe(401);
    expect(res.body).toEqual({
      error: { code: 'unauthenticated', message: 'Sign in first.' },
    });
  });

  it.each(ROLES)(
    'signs in a %s and reports what the role may do',
    async (role) => {
      const { agent, user } = await signedInAgent(t.app, role);
      const me = await agent.get('/api/auth/me');
      expect(me.status).toBe(200);
      expect(me.body.data.user).toMatchObject({
        id: user.id,
        email: user.email,
        role,
        status: 'active',
      });
      expect(me.body.data.user).not.toHaveProperty('passwordHash');
      expect(me.body.data.can.manageUsers).toBe(role === 'admin');
      expect(me.body.data.can.signStudies).toBe(role === 'physicist');
    },
  );

  it('gives the same generic answer for a wrong password and an unknown address', async () => {
    const user = await buildUser();
    const wrong = await browserAgent(t.app)
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: 'not it at all' });
    const unknown = await browserAgent(t.app).post('/api/auth/sign-in').send({
      email: 'nobody.here@saltmarsh-general.example',
      password: 'not it at all',
    });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.message).toBe(
      'The e-mail address or password is not right.',
    );
  });

  it('refuses a disabled user with the same generic answer', async () => {
    const user = await buildUser({ disabled: true });
    const res = await browserAgent(t.app)
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: TEST_PASSWORD });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('stores the session in PostgreSQL with a new id after sign-in', async () => {
    const agent = browserAgent(t.app);
    const user = await buildUser();
    const res = await agent
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: TEST_PASSWORD });
    const cookie = res.headers['set-cookie']?.[0] ?? '';
    expect(cookie).toMatch(/^lamella\.sid=/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    const rows = await sequelize.query<{ n: string }>(
      `SELECT count(*) AS n FROM "session" WHERE sess->'passport'->>'user' = :id`,
      { replacements: { id: String(user.id) }, type: QueryTypes.SELECT },
    );
    expect(Number(rows[0]!.n)).toBe(1);
  });

  it('keeps a session across a server restart, because it lives in PostgreSQL', async () => {
    const first = await startTestApp();
    const user = await buildUser();
    const signIn = await request(first.app)
      .post('/api/auth/sign-in')
      .set('Origin', TEST_ORIGIN)
      .send({ email: user.email, password: TEST_PASSWORD });
    const cookie = signIn.headers['set-cookie']![0]!.split(';')[0]!;
    await first.close();

    const second = await startTestApp();
    const me = await request(second.app)
      .get('/api/auth/me')
      .set('Cookie', cookie);
    await second.close();
    expect(me.status).toBe(200);
    expect(me.body.data.user.id).toBe(user.id);
  });

  it('ends the session on sign-out', async () => {
    const { agent } = await signedInAgent(t.app, 'resident');
    expect((await agent.post('/api/auth/sign-out')).status).toBe(204);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });
});

describe('own password', () => {
  it('changes the password after checking the current one', async () => {
    const { agent, user } = await signedInAgent(t.app, 'committee');
    const wrong = await agent
      .post('/api/auth/password')
      .send({ currentPassword: 'nope', newPassword: 'a brand new secret' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details).toEqual([
      {
        path: 'currentPassword',
        message: 'The current password is not right.',
      },
    ]);
    const ok = await agent.post('/api/auth/password').send({
      currentPassword: TEST_PASSWORD,
      newPassword: 'a brand new secret',
    });
    expect(ok.status).toBe(204);
    const again = await browserAgent(t.app)
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: 'a brand new secret' });
    expect(again.status).toBe(200);
  });

  it('needs a session', async () => {
    const res = await browserAgent(t.app)
      .post('/api/auth/password')
      .send({ currentPassword: 'x', newPassword: 'yyyyyyyyyyyy' });
    expect(res.status).toBe(401);
  });
});
