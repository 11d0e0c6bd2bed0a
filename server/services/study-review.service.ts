import { Op, QueryTypes, type Transaction } from 'sequelize';
import {
  assertOpenForChanges,
  nextStatus,
} from '../../shared/studies/study-state.ts';
import type { StudySnapshot } from '../../shared/studies/study-dto.ts';
import { DomainError } from '../../shared/errors.ts';
import { sequelize } from '../db/sequelize.ts';
import { notFound } from '../errors.ts';
import type { Mailer, OutgoingMail } from '../mail/mailer.ts';
import {
  studyReturnedMail,
  studySignedMail,
  studySubmittedMail,
} from '../mail/study-mail.ts';
import { AuditEvent } from '../models/audit-event.model.ts';
import { StudyComment } from '../models/study-comment.model.ts';
import { StudyRevision } from '../models/study-revision.model.ts';
import type { Study } from '../models/study.model.ts';
import { User } from '../models/user.model.ts';
import { presentSnapshot } from '../presenters/study.presenter.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import { listStudyImages } from './image-pairing.service.ts';
import {
  loadStudyParts,
  STUDY_AUDIT_TARGET,
  withLockedStudy,
} from './study.service.ts';

/** What review actions need from the outside world. */
export interface ReviewDeps {
  mailer: Mailer;
  publicUrl: string;
}

/** The outcome of a state change: the study and whether its mail went. */
export interface ReviewOutcome {
  study: Study;
  /** Addresses told; empty when no one needed telling. */
  notified: string[];
  mailDelivered: boolean;
}

const studyLink = (deps: ReviewDeps, study: Study) =>
  `${deps.publicUrl}/studies/${study.id}`;

async function deliver(deps: ReviewDeps, mail: OutgoingMail | null) {
  if (!mail) return true;
  try {
    await deps.mailer.send(mail);
    return true;
  } catch (error) {
    console.error('study mail delivery failed:', error);
    return false;
  }
}

async function actorName(audit: AuditContext, transaction: Transaction) {
  const actor = await User.findByPk(audit.actorId!, { transaction });
  return actor?.displayName ?? 'A colleague';
}

/** The study's author, unless they are the one acting (no mail to oneself). */
async function authorToTell(
  study: Study,
  audit: AuditContext,
  transaction: Transaction,
): Promise<User | null> {
  if (study.createdBy === audit.actorId) return null;
  const author = await User.findByPk(study.createdBy, { transaction });
  return author && !author.disabledAt ? author : null;
}

/**
 * A physicist must not review figures that a worker is still recomputing.
 * Conditions with no images assigned have nothing to compute, so only
 * those with images count.
 * @throws DomainError conflict while any such condition is queued or running.
 */
async function refuseWhileResultsPending(
  studyId: number,
  transaction: Transaction,
): Promise<void> {
  const [row] = await sequelize.query<{ pending: string }>(
    `SELECT count(*) AS pending
       FROM condition_analyses a
      WHERE a.study_id = :studyId
        AND a.status IN ('queued', 'running')
        AND EXISTS (SELECT 1 FROM image_assignments ia WHERE ia.condition_id = a.condition_id)`,
    { replacements: { studyId }, type: QueryTypes.SELECT, transaction },
  );
  const pending = Number(row?.pending ?? 0);
  if (pending > 0) {
    throw new DomainError(
      'conflict',
      `The results of ${pending} condition(s) are still being computed. Submit the study when they are done.`,
    );
  }
}

/**
 * Submits a draft or returned study for review and tells every active
 * physicist but the submitter (one message, all of them as recipients).
 * @throws DomainError invalid_state_transition unless draft or returned.
 */
export async function submitStudy(
  studyId: number,
  audit: AuditContext,
  deps: ReviewDeps,
): Promise<ReviewOutcome> {
  const { study, mail } = await withLockedStudy(studyId, async (s, t) => {
    s.status = nextStatus(s.status, 'submit');
    await refuseWhileResultsPending(s.id, t);
    s.submittedAt = new Date();
    await s.save({ transaction: t });
    await recordAudit(
      audit,
      {
        action: 'study.submitted',
        targetType: STUDY_AUDIT_TARGET,
        targetId: s.id,
        details: { revision: s.revision },
      },
      t,
    );
    const physicists = await User.findAll({
      where: {
        role: 'physicist',
        disabledAt: null,
        passwordHash: { [Op.ne]: null },
        ...(audit.actorId === null ? {} : { id: { [Op.ne]: audit.actorId } }),
      },
      transaction: t,
    });
    const to = physicists.map((p) => p.email);
    return {
      study: s,
      mail:
        to.length === 0
          ? null
          : studySubmittedMail({
              to: to.join(', '),
              studyTitle: s.title,
              revision: s.revision,
              actorName: await actorName(audit, t),
              link: studyLink(deps, s),
            }),
    };
  });
  return {
    study,
    notified: mail ? mail.to.split(', ') : [],
    mailDelivered: await deliver(deps, mail),
  };
}

/**
 * Returns a submitted study to its author with a comment (kept in the
 * thread and mailed to the author).
 * @throws DomainError invalid_state_transition unless submitted.
 */
export async function returnStudy(
  studyId: number,
  comment: string,
  audit: AuditContext,
  deps: ReviewDeps,
): Promise<ReviewOutcome> {
  const { study, mail } = await withLockedStudy(studyId, async (s, t) => {
    s.status = nextStatus(s.status, 'return');
    await s.save({ transaction: t });
    const note = await StudyComment.create(
      {
        studyId: s.id,
        authorId: audit.actorId!,
        revision: s.revision,
        kind: 'return',
        body: comment,
      },
      { transaction: t },
    );
    await recordAudit(
      audit,
      {
        action: 'study.returned',
        targetType: STUDY_AUDIT_TARGET,
        targetId: s.id,
        details: { revision: s.revision, commentId: note.id, comment },
      },
      t,
    );
    const author = await authorToTell(s, audit, t);
    return {
      study: s,
      mail: author
        ? studyReturnedMail({
            to: author.email,
            studyTitle: s.title,
            revision: s.revision,
            actorName: await actorName(audit, t),
            link: studyLink(deps, s),
            comment,
          })
        : null,
    };
  });
  return {
    study,
    notified: mail ? [mail.to] : [],
    mailDelivered: await deliver(deps, mail),
  };
}

/**
 * Signs a submitted study: freezes the revision into study_revisions and
 * tells the author. Signing one's own study is allowed and recorded.
 * @throws DomainError invalid_state_transition unless submitted.
 */
export async function signStudy(
  studyId: number,
  comment: string | undefined,
  audit: AuditContext,
  deps: ReviewDeps,
): Promise<ReviewOutcome> {
  const { study, mail } = await withLockedStudy(studyId, async (s, t) => {
    s.status = nextStatus(s.status, 'sign');
    const signedAt = new Date();
    s.signedBy = audit.actorId;
    s.signedAt = signedAt;
    await s.save({ transaction: t });
    const selfSigned = s.createdBy === audit.actorId;
    if (comment) {
      await StudyComment.create(
        {
          studyId: s.id,
          authorId: audit.actorId!,
          revision: s.revision,
          kind: 'sign',
          body: comment,
        },
        { transaction: t },
      );
    }
    await StudyRevision.create(
      {
        studyId: s.id,
        revision: s.revision,
        snapshot: await buildSnapshot(s, t),
        signedBy: audit.actorId!,
        signedAt,
      },
      { transaction: t },
    );
    await recordAudit(
      audit,
      {
        action: 'study.signed',
        targetType: STUDY_AUDIT_TARGET,
        targetId: s.id,
        details: { revision: s.revision, selfSigned },
      },
      t,
    );
    const author = await authorToTell(s, audit, t);
    return {
      study: s,
      mail: author
        ? studySignedMail({
            to: author.email,
            studyTitle: s.title,
            revision: s.revision,
            actorName: await actorName(audit, t),
            link: studyLink(deps, s),
          })
        : null,
    };
  });
  return {
    study,
    notified: mail ? [mail.to] : [],
    mailDelivered: await deliver(deps, mail),
  };
}

/** The frozen copy of a study as it is being signed. */
async function buildSnapshot(
  study: Study,
  transaction: Transaction,
): Promise<StudySnapshot> {
  const [parts, { images, assignments }] = await Promise.all([
    loadStudyParts(study, transaction),
    listStudyImages(study.id, transaction),
  ]);
  const signer = await User.findByPk(study.signedBy!, { transaction });
  parts.refs.users.set(signer!.id, signer!);
  return presentSnapshot(study, { ...parts, images, assignments });
}

/**
 * Opens revision n+1 of a signed study as a draft; revision n stays frozen
 * in study_revisions and readable.
 * @throws DomainError invalid_state_transition unless signed.
 */
export function reviseStudy(
  studyId: number,
  audit: AuditContext,
): Promise<Study> {
  return withLockedStudy(studyId, async (s, t) => {
    s.status = nextStatus(s.status, 'revise');
    const fromRevision = s.revision;
    s.set({
      revision: fromRevision + 1,
      signedBy: null,
      signedAt: null,
      submittedAt: null,
    });
    await s.save({ transaction: t });
    await recordAudit(
      audit,
      {
        action: 'study.revised',
        targetType: STUDY_AUDIT_TARGET,
        targetId: s.id,
        details: { fromRevision, revision: s.revision },
      },
      t,
    );
    return s;
  });
}

/**
 * Adds a comment to the study's thread.
 * @throws DomainError study_locked when the study is signed.
 */
export function addComment(
  studyId: number,
  body: string,
  audit: AuditContext,
): Promise<StudyComment> {
  return withLockedStudy(studyId, async (s, t) => {
    if (s.status === 'signed') assertOpenForChanges(s.status);
    const comment = await StudyComment.create(
      {
        studyId: s.id,
        authorId: audit.actorId!,
        revision: s.revision,
        kind: 'comment',
        body,
      },
      { transaction: t },
    );
    await recordAudit(
      audit,
      {
        action: 'study.commented',
        targetType: STUDY_AUDIT_TARGET,
        targetId: s.id,
        details: { commentId: comment.id, revision: s.revision },
      },
      t,
    );
    return comment;
  });
}

/** Loads the users with these ids, keyed by id. */
export async function usersById(
  ids: readonly (number | null)[],
): Promise<Map<number, User>> {
  const wanted = [...new Set(ids.filter((id): id is number => id !== null))];
  const users = await User.findAll({ where: { id: { [Op.in]: wanted } } });
  return new Map(users.map((u) => [u.id, u]));
}

/** The study's thread, oldest first. */
export function listComments(studyId: number): Promise<StudyComment[]> {
  return StudyComment.findAll({ where: { studyId }, order: [['id', 'ASC']] });
}

/**
 * The study's audit trail, newest first: its own events and those others
 * file with `details.studyId` (image uploads, regions, results).
 */
export function listStudyAudit(studyId: number): Promise<AuditEvent[]> {
  return AuditEvent.findAll({
    where: {
      [Op.or]: [
        { targetType: STUDY_AUDIT_TARGET, targetId: String(studyId) },
        { details: { studyId } },
      ],
    },
    order: [['id', 'DESC']],
    limit: 500,
  });
}

/** The study's signed revisions, oldest first. */
export function listSignedRevisions(studyId: number): Promise<StudyRevision[]> {
  return StudyRevision.findAll({
    where: { studyId },
    order: [['revision', 'ASC']],
  });
}

/**
 * One signed revision of a study.
 * @throws AppError 404 when that revision was never signed.
 */
export async function findSignedRevision(
  studyId: number,
  revision: number,
): Promise<StudyRevision> {
  const row = await StudyRevision.findOne({ where: { studyId, revision } });
  if (!row) throw notFound('signed revision');
  return row;
}
