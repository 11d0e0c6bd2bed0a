import type { SentMailDto } from '../../shared/schemas/mail.schema.ts';
import type { SentMail } from '../models/sent-mail.model.ts';

export const presentSentMail = (mail: SentMail): SentMailDto => ({
  id: mail.id,
  from: mail.envelopeFrom,
  to: mail.envelopeTo,
  subject: mail.subject,
  text: mail.textBody,
  receivedAt: mail.receivedAt.toISOString(),
});
