import type { Express } from 'express';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent.js';
import { createApp } from '../../server/app.ts';
import { loadConfig, type AppConfig } from '../../server/config/env.ts';
import { startFakeSmtpServer } from '../../server/mail/fake-smtp-server.ts';
import { createMailer } from '../../server/mail/mailer.ts';
import { ROLES, type Role } from '../../shared/permissions.ts';
import { buildUser, TEST_PASSWORD } from './factories.ts';

/** The Origin a test browser would send; configured as the public URL. */
export const TEST_ORIGIN = 'http://lamella.test';

export interface TestApp {
  app: Express;
  config: AppConfig;
  close(): Promise<void>;
}

/**
 * A real app on the test database with its own fake SMTP server on a free
 * port, so mail in tests goes through a real SMTP conversation.
 */
export async function startTestApp(
  overrides: Partial<AppConfig> = {},
): Promise<TestApp> {
  const config = { ...loadConfig(), publicUrl: TEST_ORIGIN, ...overrides };
  const smtp = await startFakeSmtpServer(0);
  const mailer = createMailer({
    from: config.mailFrom,
    fakeSmtpPort: smtp.port,
  });
  const built = createApp({ config, mailer });
  return {
    app: built.app,
    config,
    close: async () => {
      await built.close();
      await smtp.close();
    },
  };
}

/** A supertest agent that keeps cookies and sends our Origin. */
export function browserAgent(app: Express): TestAgent {
  return request.agent(app).set('Origin', TEST_ORIGIN);
}

/** Creates a user of the role and returns an agent signed in as them. */
export async function signedInAgent(
  app: Express,
  role: Role,
): Promise<{ agent: TestAgent; user: Awaited<ReturnType<typeof buildUser>> }> {
  const user = await buildUser({ role });
  const agent = browserAgent(app);
  const res = await agent
    .post('/api/auth/sign-in')
    .send({ email: user.email, password: TEST_PASSWORD });
  if (res.status !== 200)
    throw new Error(`sign-in as ${role} failed: ${res.status} ${res.text}`);
  return { agent, user };
}

/**
 * A signed-in agent for every role, for files that try each role on their
 * routes (signing in hashes a password, which is slow: do it once a file).
 */
export async function signedInAgentsByRole(
  app: Express,
): Promise<Record<Role, TestAgent>> {
  const agents = {} as Record<Role, TestAgent>;
  for (const role of ROLES) {
    agents[role] = (await signedInAgent(app, role)).agent;
  }
  return agents;
}
