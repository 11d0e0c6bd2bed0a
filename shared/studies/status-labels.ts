import type { StudyStatus } from '../schemas/study.schema.ts';

/** How each study state is named in the interface. */
export const STUDY_STATUS_LABELS: Record<StudyStatus, string> = {
  draft: 'Draft',
  submitted: 'Waiting for review',
  returned: 'Returned for changes',
  signed: 'Signed',
};
