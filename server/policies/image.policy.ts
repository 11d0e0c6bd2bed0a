import type { Actor } from '../../shared/permissions.ts';
import { isOpenForChanges } from '../../shared/studies/study-state.ts';
import { canEditStudy, canViewStudy, type StudyFacts } from './study.policy.ts';

/**
 * Who may do what with an image. An image in a study follows its study's
 * rules (study.policy.ts); an image in no study is visible to staff only.
 * As for studies, an image the viewer may not see answers 404, an action
 * their role does not allow 403, and a change the study's state does not
 * allow 409 study_locked.
 */

/** The facts about an image the rules need. */
export interface ImageFacts {
  uploadedBy: number;
  /** The image's study, or null when it is in none. */
  study: StudyFacts | null;
}

const preparesStudies = (actor: Actor): boolean =>
  actor.role === 'physicist' || actor.role === 'resident';

/** May the actor upload images at all? Physicists and residents. */
export const canUploadImages = (actor: Actor): boolean =>
  preparesStudies(actor);

/**
 * May the actor see an image, its previews, pixels and statistics? Staff
 * see every image; the committee sees images of signed studies only.
 */
export const canReadImage = (actor: Actor, image: ImageFacts): boolean =>
  image.study ? canViewStudy(actor, image.study) : actor.role !== 'committee';

/**
 * Does the actor's role let them correct the image's acquisition values
 * (when the study's state allows)? Those who may edit its study; for an
 * image in no study, physicists and the resident who uploaded it.
 */
export const canCorrectImage = (actor: Actor, image: ImageFacts): boolean =>
  image.study
    ? canEditStudy(actor, image.study)
    : actor.role === 'physicist' ||
      (actor.role === 'resident' && image.uploadedBy === actor.id);

/** The flags the client uses to offer corrections only when accepted. */
export const imagePermissions = (
  actor: Actor,
  image: ImageFacts,
): { correct: boolean } => ({
  correct:
    canCorrectImage(actor, image) &&
    (image.study === null || isOpenForChanges(image.study.status)),
});
