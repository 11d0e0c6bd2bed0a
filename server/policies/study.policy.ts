import type { Actor } from '../../shared/permissions.ts';
import type { StudyStatus } from '../../shared/schemas/study.schema.ts';
import type { StudyPermissionsDto } from '../../shared/studies/study-dto.ts';
import {
  actionsFrom,
  isOpenForChanges,
} from '../../shared/studies/study-state.ts';

export { assertOpenForChanges } from '../../shared/studies/study-state.ts';

/**
 * Who may do what with a study. The one place for these rules.
 *
 * - Physicists and residents prepare studies; physicists review and sign.
 *   A physicist may sign a study they created (common practice in QA when
 *   one physicist runs the service); it is recorded as `selfSigned`.
 * - Residents change only the studies they created; physicists change any.
 * - Admins read every study but change none; committee members read signed
 *   studies only.
 * - A study the viewer may not see answers 404 (its existence stays hidden),
 *   on every route; an action the viewer's role does not allow on a study
 *   they can see answers 403; an action the study's state does not allow
 *   answers 409 (`study_locked` for changes, `invalid_state_transition` for
 *   state moves).
 */

/** The facts about a study the rules need. */
export interface StudyFacts {
  createdBy: number;
  status: StudyStatus;
}

const preparesStudies = (actor: Actor): boolean =>
  actor.role === 'physicist' || actor.role === 'resident';

/** May the actor start a study? */
export const canCreateStudy = (actor: Actor): boolean => preparesStudies(actor);

/** Does the actor's role let them return and sign studies at all? */
export const canSignStudies = (actor: Actor): boolean =>
  actor.role === 'physicist';

/** May the actor see the study at all? */
export const canViewStudy = (actor: Actor, study: StudyFacts): boolean =>
  actor.role === 'committee' ? study.status === 'signed' : true;

/** Does the actor's role let them change this study (when its state allows)? */
export const canEditStudy = (actor: Actor, study: StudyFacts): boolean =>
  actor.role === 'physicist' ||
  (actor.role === 'resident' && study.createdBy === actor.id);

/** May the actor submit the study for review (when its state allows)? */
export const canSubmitStudy = (actor: Actor, study: StudyFacts): boolean =>
  canEditStudy(actor, study);

/** May the actor return or sign the study (when its state allows)? */
export const canReviewStudy = (actor: Actor, study: StudyFacts): boolean =>
  canSignStudies(actor) && canViewStudy(actor, study);

/** May the actor write in the study's thread (when its state allows)? */
export const canCommentOnStudy = (actor: Actor, study: StudyFacts): boolean =>
  preparesStudies(actor) && canViewStudy(actor, study);

/** May the actor start a new revision of a signed study? */
export const canReviseStudy = (actor: Actor, study: StudyFacts): boolean =>
  canEditStudy(actor, study);

/**
 * May the actor add images to the study now? Their role must allow editing
 * it and the study must be open (draft or returned).
 */
export const canAddImagesToStudy = (actor: Actor, study: StudyFacts): boolean =>
  canEditStudy(actor, study) && isOpenForChanges(study.status);

/** The status a list must be limited to for this viewer, if any. */
export const studyListScope = (actor: Actor): StudyStatus | null =>
  actor.role === 'committee' ? 'signed' : null;

/** Flags the client uses to offer only what will be accepted now. */
export function studyPermissions(
  actor: Actor,
  study: StudyFacts,
): StudyPermissionsDto {
  const open = isOpenForChanges(study.status);
  const actions = actionsFrom(study.status);
  return {
    edit: open && canEditStudy(actor, study),
    addImages: canAddImagesToStudy(actor, study),
    submit: actions.includes('submit') && canSubmitStudy(actor, study),
    return: actions.includes('return') && canReviewStudy(actor, study),
    sign: actions.includes('sign') && canReviewStudy(actor, study),
    comment:
      open || study.status === 'submitted'
        ? canCommentOnStudy(actor, study)
        : false,
    revise: actions.includes('revise') && canReviseStudy(actor, study),
  };
}
