import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { User } from '../../../server/models/user.model.ts';
import type { Role } from '../../../shared/permissions.ts';
import {
  buildUser,
  TEST_PASSWORD,
  uniqueEmail,
} from '../../helpers/factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(async () => {
  await t.close();
});

const NOT_ADMIN: Role[] = ['physicist', 'resident', 'committee'];

describe('role matrix for the user register and sent mail', () => {
  const routes = [
    { method: 'get', path: '/api/users', body: undefined },
    {
      method: 'post',
      path: '/api/users',
      body: { email: 'x@y.example', displayName: 'X', role: 'resident' },
    },
    { method: 'patch', path: '/api/users/1', body: { role: 'resident' } },
    { method: 'get', path: '/api/users/1/audit', body: undefined },
    { method: 'get', path: '/api/mail', body: undefined },
  ] as const;

  it.each(routes)(
    '$method $path answers 401 with no session',
    async ({ method, path, body }) => {
      const res = await browserAgent(t.app)[method](path).send(body);
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    },
  );

  for (const role of NOT_ADMIN) {
    it.each(routes)(
      `$method $path answers 403 for a ${role}`,
      async ({ method, path, body }) => {
        const { agent } = await signedInAgent(t.app, role);
        const res = await agent[method](path).send(body);
        expect(res.status).toBe(403);
        expect(res.body).toEqual({
          error: {
            code: 'forbidden',
            message: 'Your role does not allow this.',
          },
        });
      },
    );
  }

  it('lets an admin list users, without password hashes', async () => {
    const { agent, user } = await signedInAgent(t.app, 'admin');
    const res = await agent.get('/api/users');
    expect(res.status).toBe(200);
    const me = res.body.data.find((u: { id: number }) => u.id === user.id);
    expect(me).toMatchObject({
      email: user.email,
      role: 'admin',
      status: 'active',
      permissions: { edit: false },
    });
    expect(JSON.stringify(res.body)).not.toMatch(/scrypt|passwordHash/);
  });
});

describe('changing users', () => {
  it('changes a role and ends that user’s sessions', async () => {
    const { agent: admin } = await signedInAgent(t.app, 'admin');
    const { agent: target, user } = await signedInAgent(t.app, 'resident');
    const res = await admin
      .patch(`/api/users/${user.id}`)
      .send({ role: 'physicist' });
    expect(res.status).toBe(200);
    expect(res.body.data.role).toBe('physicist');
    expect((await target.get('/api/auth/me')).status).toBe(401);
    const audit = await AuditEvent.findOne({
      where: { action: 'user.updated', targetId: String(user.id) },
    });
    expect(audit?.details).toMatchObject({
      before: { role: 'resident' },
      change: { role: 'physicist' },
    });
  });

  it('disables a user: their session stops working and they cannot sign in', async () => {
    const { agent: admin } = await signedInAgent(t.app, 'admin');
    const { agent: target, user } = await signedInAgent(t.app, 'committee');
    expect((await target.get('/api/auth/me')).status).toBe(200);
    const res = await admin
      .patch(`/api/users/${user.id}`)
      .send({ disabled: true });
    expect(res.status).toBe(200);
    expect(res.body.data.status).toBe('disabled');
    expect((await target.get('/api/auth/me')).status).toBe(401);
    const again = await browserAgent(t.app)
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: TEST_PASSWORD });
    expect(again.status).toBe(401);
  });

  it('refuses to let an admin change their own account here', async () => {
    const { agent, user } = await signedInAgent(t.app, 'admin');
    const res = await agent
      .patch(`/api/users/${user.id}`)
      .send({ disabled: true });
    expect(res.status).toBe(403);
    expect((await User.findByPk(user.id))?.disabledAt).toBeNull();
  });

  it('answers 404 for an unknown user', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const res = await agent
      .patch('/api/users/99999999')
      .send({ role: 'resident' });
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('answers 409 when inviting an address that exists', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const existing = await buildUser();
    const res = await agent
      .post('/api/users')
      .send({ email: existing.email, displayName: 'Twice', role: 'resident' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('conflict');
  });
});

describe('bad input', () => {
  it('answers 400 naming each bad field, and writes nothing', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const before = await User.count();
    const res = await agent.post('/api/users').send({
      email: 'not-an-address',
      displayName: 'x'.repeat(121),
      role: 'janitor',
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    const paths = res.body.error.details
      .map((d: { path: string }) => d.path)
      .sort();
    expect(paths).toEqual(['displayName', 'email', 'role']);
    expect(await User.count()).toBe(before);
  });

  it('answers 400 for malformed JSON', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const res = await agent
      .post('/api/users')
      .set('Content-Type', 'application/json')
      .send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body).toEqual({
      error: {
        code: 'validation_failed',
        message: 'The request body is not valid JSON.',
      },
    });
  });

  it('answers 400 for wrong types and missing fields', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const res = await agent.post('/api/users').send({ email: 42 });
    expect(res.status).toBe(400);
    const paths = res.body.error.details
      .map((d: { path: string }) => d.path)
      .sort();
    expect(paths).toEqual(['displayName', 'email', 'role']);
  });

  it('answers 400 for an over-long e-mail at sign-in', async () => {
    const res = await browserAgent(t.app)
      .post('/api/auth/sign-in')
      .send({ email: `${'a'.repeat(250)}@x.example`, password: 'p' });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('email');
  });

  it('answers 413 for a body over the limit', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const res = await agent.post('/api/users').send({
      email: uniqueEmail('big'),
      displayName: 'x'.repeat(2_000_000),
      role: 'resident',
    });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
  });

  it('answers 404 in the error shape for an unknown API route', async () => {
    const res = await request(t.app).get('/api/nothing-here');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});
