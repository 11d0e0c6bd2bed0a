import nodemailer from 'nodemailer';

/** A message Lamella sends. */
export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
}

/**
 * A mailer for an SMTP relay URL, or for Lamella's own fake server on
 * loopback (which offers no TLS, so none is attempted).
 */
export function createMailer(options: {
  from: string;
  smtpUrl?: string | null;
  fakeSmtpPort?: number;
}): Mailer {
  const transport = options.smtpUrl
    ? nodemailer.createTransport(options.smtpUrl)
    : nodemailer.createTransport({
        host: '127.0.0.1',
        port: options.fakeSmtpPort,
        secure: false,
        ignoreTLS: true,
      });
  return {
    async send(mail) {
      await transport.sendMail({ from: options.from, ...mail });
    },
  };
}
