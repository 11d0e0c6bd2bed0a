import { Op } from 'sequelize';
import { SentMail } from '../../server/models/sent-mail.model.ts';

/**
 * Waits until the fake SMTP server has stored a message to `to`, and returns
 * the newest one. Polls, since SMTP delivery finishes after the API answers.
 */
export async function waitForMail(
  to: string,
  timeoutMs = 10_000,
): Promise<SentMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const mail = await SentMail.findOne({
      where: { envelopeTo: { [Op.contains]: [to] } },
      order: [['id', 'DESC']],
    });
    if (mail) return mail;
    if (Date.now() > deadline)
      throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The first link in a message that points at `pathPrefix`. */
export function linkIn(mail: SentMail, pathPrefix: string): URL {
  const match = mail.textBody.match(
    new RegExp(`https?://\\S*${pathPrefix}\\S*`),
  );
  if (!match) throw new Error(`no ${pathPrefix} link in: ${mail.textBody}`);
  return new URL(match[0]);
}
