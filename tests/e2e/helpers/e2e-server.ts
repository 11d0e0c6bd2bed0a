import { existsSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent.js';
import { createApp } from '../../../server/app.ts';
import { loadConfig, type AppConfig } from '../../../server/config/env.ts';
import { fromRoot } from '../../../server/config/paths.ts';
import { startJobs } from '../../../server/jobs/recompute-study.worker.ts';
import { startFakeSmtpServer } from '../../../server/mail/fake-smtp-server.ts';
import { createMailer } from '../../../server/mail/mailer.ts';
import type { Role } from '../../../shared/permissions.ts';
import { buildUser, TEST_PASSWORD } from '../../helpers/factories.ts';

export interface E2eServer {
  baseUrl: string;
  config: AppConfig;
  close(): Promise<void>;
}

/**
 * A real Lamella server on a free loopback port, on the test database,
 * serving the built client from dist/client, with its own fake SMTP server.
 * With `workers`, it also runs the job queue with that many in-process
 * recompute workers, as `npm start` does.
 */
export async function startE2eServer(
  overrides: Partial<AppConfig> = {},
  options: { workers?: number } = {},
): Promise<E2eServer> {
  if (!existsSync(fromRoot('dist/client/index.html'))) {
    throw new Error(
      'dist/client is missing: run `npx vite build` first (npm test does).',
    );
  }
  const http: Server = createServer();
  await new Promise<void>((resolve) => http.listen(0, '127.0.0.1', resolve));
  const baseUrl = `http://127.0.0.1:${(http.address() as AddressInfo).port}`;
  const smtp = await startFakeSmtpServer(0);
  const config = { ...loadConfig(), publicUrl: baseUrl, ...overrides };
  const built = createApp({
    config,
    mailer: createMailer({ from: config.mailFrom, fakeSmtpPort: smtp.port }),
  });
  http.on('request', built.app);
  const jobs = options.workers
    ? await startJobs(config, options.workers)
    : null;
  return {
    baseUrl,
    config,
    close: async () => {
      await jobs?.stop();
      http.closeAllConnections();
      await new Promise<void>((resolve) => http.close(() => resolve()));
      await built.close();
      await smtp.close();
    },
  };
}

/**
 * A new user of the role and an API agent signed in as them on the server
 * (it sends the server's own Origin), for setting up data before the
 * browser signs in with the same e-mail and TEST_PASSWORD.
 */
export async function signedInApiAgent(
  server: E2eServer,
  role: Role,
): Promise<{ agent: TestAgent; email: string }> {
  const { email } = await buildUser({ role });
  const agent = request.agent(server.baseUrl).set('Origin', server.baseUrl);
  await agent
    .post('/api/auth/sign-in')
    .send({ email, password: TEST_PASSWORD })
    .expect(200);
  return { agent, email };
}
