import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AccountToken } from '../../../server/models/account-token.model.ts';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { User } from '../../../server/models/user.model.ts';
import { buildUser, uniqueEmail } from '../../helpers/factories.ts';
import { linkIn, waitForMail } from '../../helpers/mailbox.ts';
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

const tokenOf = (link: URL): string => link.pathname.split('/').pop()!;

describe('invitation by e-mail, through the fake SMTP server', () => {
  it('invites, mails a link, sets the password and signs in; the link then stops working', async () => {
    const { agent: admin } = await signedInAgent(t.app, 'admin');
    const email = uniqueEmail('invitee');
    const invited = await admin
      .post('/api/users')
      .send({ email, displayName: 'Nell Invitee', role: 'physicist' });
    expect(invited.status).toBe(201);
    expect(invited.body.data).toMatchObject({
      email,
      role: 'physicist',
      status: 'invited',
    });
    expect(invited.body.meta.mailDelivered).toBe(true);

    const mail = await waitForMail(email);
    expect(mail.subject).toBe('You are invited to Lamella');
    const link = linkIn(mail, '/welcome/');
    expect(link.origin).toBe(t.config.publicUrl);

    // The sent-mail view shows the same message to admins.
    const listed = await admin.get('/api/mail').query({ to: email });
    expect(listed.body.data[0]).toMatchObject({
      subject: 'You are invited to Lamella',
      to: [email],
    });

    const visitor = browserAgent(t.app);
    const info = await visitor.get(`/api/auth/tokens/${tokenOf(link)}`);
    expect(info.body.data).toEqual({
      purpose: 'invitation',
      email,
      displayName: 'Nell Invitee',
    });
    const set = await visitor
      .post('/api/auth/invitation/complete')
      .send({ token: tokenOf(link), password: 'my first password' });
    expect(set.status).toBe(204);
    const signIn = await visitor
      .post('/api/auth/sign-in')
      .send({ email, password: 'my first password' });
    expect(signIn.status).toBe(200);
    expect(signIn.body.data.user.status).toBe('active');

    const reuse = await browserAgent(t.app)
      .post('/api/auth/invitation/complete')
      .send({ token: tokenOf(link), password: 'another password' });
    expect(reuse.status).toBe(400);
    expect(reuse.body.error).toEqual({
      code: 'token_invalid',
      message:
        'This link is not valid or has already been used. Ask for a new one.',
    });
    const actions = (
      await AuditEvent.findAll({
        where: { targetId: String(invited.body.data.id) },
      })
    ).map((e) => e.action);
    expect(actions).toEqual(
      expect.arrayContaining([
        'user.invited',
        'user.invitation_accepted',
        'session.signed_in',
      ]),
    );
  });
});

describe('password reset by e-mail', () => {
  it('mails a reset link that sets a new password once', async () => {
    const user = await buildUser({ role: 'resident' });
    const asked = await browserAgent(t.app)
      .post('/api/auth/password-reset')
      .send({ email: user.email });
    expect(asked.status).toBe(202);
    const link = linkIn(await waitForMail(user.email), '/reset-password/');
    const done = await browserAgent(t.app)
      .post('/api/auth/password-reset/complete')
      .send({ token: tokenOf(link), password: 'reset and renewed' });
    expect(done.status).toBe(204);
    const signIn = await browserAgent(t.app)
      .post('/api/auth/sign-in')
      .send({ email: user.email, password: 'reset and renewed' });
    expect(signIn.status).toBe(200);
    const again = await browserAgent(t.app)
      .post('/api/auth/password-reset/complete')
      .send({ token: tokenOf(link), password: 'third time lucky' });
    expect(again.body.error.code).toBe('token_invalid');
  });

  it('answers the same for an unknown address and sends nothing', async () => {
    const email = uniqueEmail('ghost');
    const res = await browserAgent(t.app)
      .post('/api/auth/password-reset')
      .send({ email });
    expect(res.status).toBe(202);
    await expect(waitForMail(email, 500)).rejects.toThrow(/no mail/);
  });

  it('refuses an expired link with a clear message and leaves the password alone', async () => {
    const user = await buildUser();
    await browserAgent(t.app)
      .post('/api/auth/password-reset')
      .send({ email: user.email });
    const link = linkIn(await waitForMail(user.email), '/reset-password/');
    await AccountToken.update(
      { expiresAt: new Date(Date.now() - 1000) },
      { where: { userId: user.id } },
    );
    const res = await browserAgent(t.app)
      .post('/api/auth/password-reset/complete')
      .send({ token: tokenOf(link), password: 'too late for this' });
    expect(res.status).toBe(400);
    expect(res.body.error).toEqual({
      code: 'token_expired',
      message: 'This link has expired. Ask for a new one.',
    });
    expect((await User.findByPk(user.id))?.passwordHash).toBe(
      user.passwordHash,
    );
  });

  it('refuses a reset token on the invitation route', async () => {
    const user = await buildUser();
    await browserAgent(t.app)
      .post('/api/auth/password-reset')
      .send({ email: user.email });
    const link = linkIn(await waitForMail(user.email), '/reset-password/');
    const res = await browserAgent(t.app)
      .post('/api/auth/invitation/complete')
      .send({ token: tokenOf(link), password: 'wrong door entirely' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('token_invalid');
  });
});
