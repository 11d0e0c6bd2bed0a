/** A message as shown in the sent-mail view. */
export interface SentMailDto {
  id: number;
  from: string;
  to: string[];
  subject: string;
  text: string;
  receivedAt: string;
}
