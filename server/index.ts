import { createApp } from './app.ts';
import { loadConfig } from './config/env.ts';
import { sequelize } from './db/sequelize.ts';
import { DEMO_USERS } from './db/demo-users.ts';
import { startJobs, workersInProcess } from './jobs/recompute-study.worker.ts';
import { startFakeSmtpServer } from './mail/fake-smtp-server.ts';
import { createMailer } from './mail/mailer.ts';

const config = loadConfig();
await sequelize.authenticate();

const fakeSmtp = config.smtpUrl
  ? null
  : await startFakeSmtpServer(config.fakeSmtpPort);
const mailer = createMailer({
  from: config.mailFrom,
  smtpUrl: config.smtpUrl,
  fakeSmtpPort: fakeSmtp?.port,
});
const jobs = await startJobs(config, workersInProcess());
const { app, close } = createApp({ config, mailer });
const server = app.listen(config.port, config.host, () => {
  console.log(`\nLamella is running at ${config.publicUrl}`);
  console.log(
    fakeSmtp
      ? `Outgoing mail goes to the local fake SMTP server on 127.0.0.1:${fakeSmtp.port} (read it under Admin → Sent mail).`
      : 'Outgoing mail goes to the SMTP relay in SMTP_URL.',
  );
  console.log('\nDemo sign-ins (invented people, demo only):');
  for (const user of DEMO_USERS) {
    console.log(
      `  ${user.role.padEnd(10)} ${user.email.padEnd(42)} ${user.password}`,
    );
  }
});

async function shutdown(): Promise<void> {
  server.close();
  await jobs.stop();
  await fakeSmtp?.close();
  await close();
  await sequelize.close();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown());
process.on('SIGTERM', () => void shutdown());
