import type { AddressInfo } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { SentMail } from '../models/sent-mail.model.ts';

const MAX_MESSAGE_BYTES = 5 * 1024 * 1024;

/**
 * Starts Lamella's local SMTP server on 127.0.0.1. Every message it receives
 * is stored in `sent_mail`, where admins read it in the sent-mail page.
 * @param port 0 picks a free port; the chosen one is returned.
 */
export async function startFakeSmtpServer(
  port: number,
): Promise<{ port: number; close: () => Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    // smtp-server's built-in certificate has expired; loopback needs no TLS.
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) =>
            SentMail.create({
              envelopeFrom:
                (session.envelope.mailFrom &&
                  session.envelope.mailFrom.address) ||
                '',
              envelopeTo: session.envelope.rcptTo.map((r) => r.address),
              subject: parsed.subject ?? '(no subject)',
              textBody: parsed.text ?? '',
              htmlBody: typeof parsed.html === 'string' ? parsed.html : null,
              rawSizeBytes: raw.length,
              receivedAt: new Date(),
            }),
          )
          .then(() => callback())
          .catch((error: unknown) =>
            callback(error instanceof Error ? error : new Error(String(error))),
          );
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = server.server.address() as AddressInfo;
  return {
    port: address.port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
