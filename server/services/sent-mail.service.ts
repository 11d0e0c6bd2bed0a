import { Op } from 'sequelize';
import { SentMail } from '../models/sent-mail.model.ts';

/** Received messages, newest first, optionally for one recipient. */
export function listSentMail(query: {
  to?: string;
  limit: number;
}): Promise<SentMail[]> {
  return SentMail.findAll({
    where: query.to
      ? { envelopeTo: { [Op.contains]: [query.to.toLowerCase()] } }
      : {},
    order: [['id', 'DESC']],
    limit: query.limit,
  });
}
