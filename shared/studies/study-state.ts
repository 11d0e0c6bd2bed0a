import { DomainError } from '../errors.ts';
import type { StudyStatus } from '../schemas/study.schema.ts';

/** What can happen to a study's state. */
export const STUDY_ACTIONS = ['submit', 'return', 'sign', 'revise'] as const;
export type StudyAction = (typeof STUDY_ACTIONS)[number];

/**
 * The review cycle: a draft is submitted; the physicist returns it (with a
 * comment) or signs it; a returned study is edited and submitted again; a
 * signed study is frozen and only a new revision (a fresh draft) moves on.
 */
const TRANSITIONS: Record<
  StudyAction,
  { from: readonly StudyStatus[]; to: StudyStatus }
> = {
  submit: { from: ['draft', 'returned'], to: 'submitted' },
  return: { from: ['submitted'], to: 'returned' },
  sign: { from: ['submitted'], to: 'signed' },
  revise: { from: ['signed'], to: 'draft' },
};

const STATUS_WORDS: Record<StudyStatus, string> = {
  draft: 'a draft',
  submitted: 'waiting for review',
  returned: 'returned for changes',
  signed: 'signed',
};

const ACTION_WORDS: Record<StudyAction, string> = {
  submit: 'submitted',
  return: 'returned',
  sign: 'signed',
  revise: 'revised',
};

/**
 * The state a study moves to when `action` is taken.
 * @throws DomainError invalid_state_transition when the action is not allowed
 *   from `from` (e.g. signing a draft).
 */
export function nextStatus(
  from: StudyStatus,
  action: StudyAction,
): StudyStatus {
  const rule = TRANSITIONS[action];
  if (!rule.from.includes(from)) {
    throw new DomainError(
      'invalid_state_transition',
      `A study that is ${STATUS_WORDS[from]} cannot be ${ACTION_WORDS[action]}.`,
    );
  }
  return rule.to;
}

/** The actions the state allows, whoever asks (roles are checked apart). */
export function actionsFrom(status: StudyStatus): StudyAction[] {
  return STUDY_ACTIONS.filter((a) => TRANSITIONS[a].from.includes(status));
}

/** True while the plan, images, assignments and comments may change. */
export const isOpenForChanges = (status: StudyStatus): boolean =>
  status === 'draft' || status === 'returned';

/**
 * Refuses a change to a study that is under review or signed.
 * @throws DomainError study_locked, with a message saying what to do instead.
 */
export function assertOpenForChanges(status: StudyStatus): void {
  if (status === 'signed') {
    throw new DomainError(
      'study_locked',
      'This study is signed and read-only. Start a new revision to change it; the signed revision stays as it is.',
    );
  }
  if (status === 'submitted') {
    throw new DomainError(
      'study_locked',
      'This study is waiting for review and cannot change until the physicist returns it.',
    );
  }
}
