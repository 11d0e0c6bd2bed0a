import type { OutgoingMail } from './mailer.ts';

const footer =
  '\n\n-- \nLamella, grid image-quality studies. You receive this because an administrator added your address.';

/** The invitation a new user receives. */
export function invitationMail(args: {
  to: string;
  displayName: string;
  role: string;
  link: string;
}): OutgoingMail {
  return {
    to: args.to,
    subject: 'You are invited to Lamella',
    text: `Hello ${args.displayName},\n\nYou have been invited to Lamella as ${args.role}.\nSet your password here (valid for 7 days):\n\n${args.link}${footer}`,
  };
}

/** The password-reset link. */
export function passwordResetMail(args: {
  to: string;
  displayName: string;
  link: string;
}): OutgoingMail {
  return {
    to: args.to,
    subject: 'Reset your Lamella password',
    text: `Hello ${args.displayName},\n\nSomeone asked to reset the password of this Lamella account. If it was you, choose a new password here (valid for 1 hour):\n\n${args.link}\n\nIf it was not you, ignore this message; your password is unchanged.${footer}`,
  };
}
