import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { User } from '../../../server/models/user.model.ts';
import {
  buildUser,
  TEST_PASSWORD,
  uniqueEmail,
} from '../../helpers/factories.ts';
import {
  signedInAgent,
  startTestApp,
  TEST_ORIGIN,
  type TestApp,
} from '../../helpers/test-app.ts';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({
    signInLimitPerAccount: 3,
    signInLimitPerAddress: 50,
  });
});
afterAll(async () => {
  await t.close();
});

describe('CSRF defence', () => {
  it('refuses a state-changing request with a foreign Origin, and changes nothing', async () => {
    const { agent } = await signedInAgent(t.app, 'admin');
    const email = uniqueEmail('csrf');
    const res = await agent
      .post('/api/users')
      .set('Origin', 'http://evil.example')
      .send({ email, displayName: 'Evil', role: 'admin' });
    expect(res.status).toBe(403);
    expect(res.body.error).toEqual({
      code: 'csrf_rejected',
      message: 'Requests from http://evil.example are not accepted.',
    });
    expect(await User.findOne({ where: { email } })).toBeNull();
  });

  it('refuses a state-changing request that names no origin', async () => {
    const user = await buildUser();
    const res = await request(t.app)
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: TEST_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf_rejected');
  });

  it('accepts a Referer from our own origin when Origin is absent', async () => {
    const user = await buildUser();
    const res = await request(t.app)
      .post('/api/auth/sign-in')
      .set('Referer', `${TEST_ORIGIN}/sign-in`)
      .send({ email: user.email, password: TEST_PASSWORD });
    expect(res.status).toBe(200);
  });
});

describe('sign-in rate limit', () => {
  it('answers 429 after the per-account limit of failed attempts', async () => {
    const user = await buildUser();
    const attempt = () =>
      request(t.app)
        .post('/api/auth/sign-in')
        .set('Origin', TEST_ORIGIN)
        .send({ email: user.email, password: 'wrong guess' });
    const statuses = [];
    for (let i = 0; i < 4; i++) statuses.push((await attempt()).status);
    expect(statuses).toEqual([401, 401, 401, 429]);
    const blocked = await request(t.app)
      .post('/api/auth/sign-in')
      .set('Origin', TEST_ORIGIN)
      .send({ email: user.email, password: TEST_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
  });
});

describe('headers', () => {
  it('sends a strict Content-Security-Policy from self only', async () => {
    const res = await request(t.app).get('/api/health');
    const csp = res.headers['content-security-policy'] ?? '';
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("font-src 'self'");
    expect(csp).not.toMatch(/https?:/);
  });
});
