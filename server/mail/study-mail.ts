import type { OutgoingMail } from './mailer.ts';

const footer =
  '\n\n-- \nLamella, grid image-quality studies. You receive this because a study you work on needs you.';

interface StudyMailArgs {
  to: string;
  studyTitle: string;
  revision: number;
  actorName: string;
  link: string;
}

/** To the physicists: a study waits for their review. */
export function studySubmittedMail(args: StudyMailArgs): OutgoingMail {
  return {
    to: args.to,
    subject: `Study waiting for review: ${args.studyTitle}`,
    text: `Hello,\n\n${args.actorName} submitted "${args.studyTitle}" (revision ${args.revision}) for review.\nRead it, then return it with comments or sign it:\n\n${args.link}${footer}`,
  };
}

/** To the study's author: the physicist returned it, with the comment. */
export function studyReturnedMail(
  args: StudyMailArgs & { comment: string },
): OutgoingMail {
  return {
    to: args.to,
    subject: `Study returned for changes: ${args.studyTitle}`,
    text: `Hello,\n\n${args.actorName} returned "${args.studyTitle}" (revision ${args.revision}) with this comment:\n\n${args.comment}\n\nMake the changes and submit it again:\n\n${args.link}${footer}`,
  };
}

/** To the study's author: the physicist signed it. */
export function studySignedMail(args: StudyMailArgs): OutgoingMail {
  return {
    to: args.to,
    subject: `Study signed: ${args.studyTitle}`,
    text: `Hello,\n\n${args.actorName} signed "${args.studyTitle}" (revision ${args.revision}). It is now read-only; committee members can read it.\n\n${args.link}${footer}`,
  };
}
