import type { Actor } from '../../shared/permissions.ts';
import type { StudyStatus } from '../../shared/schemas/study.schema.ts';
import { STUDY_STATUSES } from '../../shared/schemas/study.schema.ts';
import { canViewStudy, type StudyFacts } from './study.policy.ts';

/**
 * Who may read comparisons, set baselines and download reports.
 *
 * - Every signed-in role reads the board, trends and room summary, built
 *   from signed studies only.
 * - Physicists may add unsigned studies to the board on request (to look at
 *   a draft before signing it); nobody else may, and asking answers 403.
 * - Only physicists set, edit and remove baselines, and only from signed
 *   studies.
 * - A study's PDF and CSV follow the study's own visibility (404 when the
 *   viewer may not see it); the PDF exists for signed studies only (409).
 */

/** May the actor ask for unsigned studies on the board? */
export const canIncludeUnsignedStudies = (actor: Actor): boolean =>
  actor.role === 'physicist';

/** May the actor set, change or remove baselines? */
export const canManageBaselines = (actor: Actor): boolean =>
  actor.role === 'physicist';

/**
 * The study states the board's SQL is limited to for this viewer.
 * @param includeUnsigned the viewer asked for unsigned studies too; only
 *   honoured where {@link canIncludeUnsignedStudies} allows it.
 */
export function boardStatuses(
  actor: Actor,
  includeUnsigned: boolean,
): StudyStatus[] {
  return includeUnsigned && canIncludeUnsignedStudies(actor)
    ? [...STUDY_STATUSES]
    : ['signed'];
}

/** May the actor download the study's report or results? */
export const canDownloadStudyResults = (
  actor: Actor,
  study: StudyFacts,
): boolean => canViewStudy(actor, study);
