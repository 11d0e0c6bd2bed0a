/** A moment as the review screens show it: medium date, short time (en-GB). */
export const formatDateTime = (iso: string): string =>
  new Date(iso).toLocaleString('en-GB', {
    dateStyle: 'medium',
    timeStyle: 'short',
  });
