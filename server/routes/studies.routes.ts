import { Router, type Request, type Response } from 'express';
import {
  commentSchema,
  createStudySchema,
  listStudiesQuerySchema,
  returnStudySchema,
  revisionParamsSchema,
  saveAssignmentsSchema,
  signStudySchema,
  studyIdParamsSchema,
  updateStudySchema,
} from '../../shared/schemas/study.schema.ts';
import type { StudyRevisionDto } from '../../shared/studies/study-dto.ts';
import { assertOpenForChanges } from '../../shared/studies/study-state.ts';
import type { AppDeps } from '../app.ts';
import { authorize, currentUser } from '../middleware/authenticate.ts';
import type { Study } from '../models/study.model.ts';
import {
  canCommentOnStudy,
  canCreateStudy,
  canEditStudy,
  canReviewStudy,
  canReviseStudy,
  canSubmitStudy,
} from '../policies/study.policy.ts';
import {
  presentAssignment,
  presentAuditEntry,
  presentChecklist,
  presentComment,
  presentRevisionList,
  presentStudy,
  presentStudyImage,
  presentStudyOptions,
  presentStudySummary,
  presentUserRef,
} from '../presenters/study.presenter.ts';
import type { AuditContext } from '../services/audit.service.ts';
import {
  listStudyImages,
  pairingFacts,
  proposeStudyPairing,
  saveAssignments,
  studyOpenSlots,
} from '../services/image-pairing.service.ts';
import {
  loadStudyEquipment,
  listStudyOptions,
} from '../services/study-plan.service.ts';
import {
  addComment,
  findSignedRevision,
  listComments,
  listSignedRevisions,
  listStudyAudit,
  returnStudy,
  reviseStudy,
  signStudy,
  submitStudy,
  usersById,
  type ReviewOutcome,
} from '../services/study-review.service.ts';
import {
  createStudy,
  findStudyFor,
  listStudies,
  loadStudyParts,
  loadStudyRefs,
  updateStudy,
} from '../services/study.service.ts';

const auditOf = (req: Request): AuditContext => ({
  actorId: currentUser(req).id,
  ipAddress: req.ip ?? null,
});

/** The study named by `:id`, if the viewer may see it (404 otherwise). */
const studyOf = (req: Request): Promise<Study> =>
  findStudyFor(currentUser(req), studyIdParamsSchema.parse(req.params).id);

async function sendStudy(
  req: Request,
  res: Response,
  study: Study,
  status = 200,
  meta?: Record<string, unknown>,
): Promise<void> {
  const parts = await loadStudyParts(study);
  res.status(status).json({
    data: presentStudy(study, parts, currentUser(req)),
    ...(meta ? { meta } : {}),
  });
}

const outcomeMeta = (o: ReviewOutcome) => ({
  mailDelivered: o.mailDelivered,
  notified: o.notified.length,
});

/**
 * Studies: plan, checklist, pairing of images to conditions, review and
 * sign-off, comments, audit trail and signed revisions. Rules in
 * study.policy.ts; a study the viewer may not see is 404 everywhere.
 */
export function studiesRouter(deps: AppDeps): Router {
  const router = Router();
  const reviewDeps = { mailer: deps.mailer, publicUrl: deps.config.publicUrl };

  router.get('/', async (req, res) => {
    const query = listStudiesQuerySchema.parse(req.query);
    const studies = await listStudies(currentUser(req), query);
    const refs = await loadStudyRefs(studies);
    res.json({ data: studies.map((s) => presentStudySummary(s, refs)) });
  });

  router.get('/options', async (_req, res) => {
    res.json({ data: presentStudyOptions(await listStudyOptions()) });
  });

  router.post('/', async (req, res) => {
    authorize(canCreateStudy(currentUser(req)));
    const input = createStudySchema.parse(req.body);
    await sendStudy(req, res, await createStudy(input, auditOf(req)), 201);
  });

  router.get('/:id', async (req, res) => {
    await sendStudy(req, res, await studyOf(req));
  });

  router.patch('/:id', async (req, res) => {
    const study = await studyOf(req);
    authorize(canEditStudy(currentUser(req), study));
    const input = updateStudySchema.parse(req.body);
    await sendStudy(req, res, await updateStudy(study.id, input, auditOf(req)));
  });

  router.get('/:id/checklist', async (req, res) => {
    const study = await studyOf(req);
    res.json({
      data: presentChecklist(study, await loadStudyEquipment(study)),
    });
  });

  router.get('/:id/assignments', async (req, res) => {
    const study = await studyOf(req);
    const { images, assignments } = await listStudyImages(study.id);
    res.json({
      data: {
        images: images.map((image) =>
          presentStudyImage(
            image,
            pairingFacts(image),
            assignments.find((a) => a.imageId === image.id) ?? null,
          ),
        ),
        openSlots: await studyOpenSlots(study, assignments),
      },
    });
  });

  router.post('/:id/pairing/propose', async (req, res) => {
    const study = await studyOf(req);
    authorize(canEditStudy(currentUser(req), study));
    assertOpenForChanges(study.status);
    res.json({ data: await proposeStudyPairing(study) });
  });

  router.put('/:id/assignments', async (req, res) => {
    const study = await studyOf(req);
    authorize(canEditStudy(currentUser(req), study));
    const input = saveAssignmentsSchema.parse(req.body);
    await saveAssignments(study.id, input, auditOf(req));
    const { assignments } = await listStudyImages(study.id);
    res.json({
      data: {
        assignments: assignments.map(presentAssignment),
        openSlots: await studyOpenSlots(study, assignments),
      },
    });
  });

  router.post('/:id/submit', async (req, res) => {
    const study = await studyOf(req);
    authorize(canSubmitStudy(currentUser(req), study));
    const outcome = await submitStudy(study.id, auditOf(req), reviewDeps);
    await sendStudy(req, res, outcome.study, 200, outcomeMeta(outcome));
  });

  router.post('/:id/return', async (req, res) => {
    const study = await studyOf(req);
    authorize(
      canReviewStudy(currentUser(req), study),
      'Only a physicist can return a study.',
    );
    const { comment } = returnStudySchema.parse(req.body);
    const outcome = await returnStudy(
      study.id,
      comment,
      auditOf(req),
      reviewDeps,
    );
    await sendStudy(req, res, outcome.study, 200, outcomeMeta(outcome));
  });

  router.post('/:id/sign', async (req, res) => {
    const study = await studyOf(req);
    authorize(
      canReviewStudy(currentUser(req), study),
      'Only a physicist can sign a study.',
    );
    const { comment } = signStudySchema.parse(req.body);
    const outcome = await signStudy(
      study.id,
      comment || undefined,
      auditOf(req),
      reviewDeps,
    );
    await sendStudy(req, res, outcome.study, 200, outcomeMeta(outcome));
  });

  router.post('/:id/revise', async (req, res) => {
    const study = await studyOf(req);
    authorize(canReviseStudy(currentUser(req), study));
    await sendStudy(req, res, await reviseStudy(study.id, auditOf(req)));
  });

  router.get('/:id/comments', async (req, res) => {
    const study = await studyOf(req);
    const comments = await listComments(study.id);
    const users = await usersById(comments.map((c) => c.authorId));
    res.json({
      data: comments.map((c) => presentComment(c, users.get(c.authorId)!)),
    });
  });

  router.post('/:id/comments', async (req, res) => {
    const study = await studyOf(req);
    authorize(canCommentOnStudy(currentUser(req), study));
    const { body } = commentSchema.parse(req.body);
    const comment = await addComment(study.id, body, auditOf(req));
    const users = await usersById([comment.authorId]);
    res
      .status(201)
      .json({ data: presentComment(comment, users.get(comment.authorId)!) });
  });

  router.get('/:id/audit', async (req, res) => {
    const study = await studyOf(req);
    const events = await listStudyAudit(study.id);
    const users = await usersById(events.map((e) => e.actorId));
    res.json({
      data: events.map((e) =>
        presentAuditEntry(
          e,
          e.actorId === null ? null : (users.get(e.actorId) ?? null),
        ),
      ),
    });
  });

  router.get('/:id/revisions', async (req, res) => {
    const study = await studyOf(req);
    const signed = await listSignedRevisions(study.id);
    const users = await usersById(signed.map((r) => r.signedBy));
    const list = presentRevisionList(study, signed, users);
    res.json({ data: list });
  });

  router.get('/:id/revisions/:revision', async (req, res) => {
    const study = await studyOf(req);
    const { revision } = revisionParamsSchema.parse(req.params);
    const row = await findSignedRevision(study.id, revision);
    const users = await usersById([row.signedBy]);
    const data: StudyRevisionDto = {
      revision: row.revision,
      signedBy: presentUserRef(users.get(row.signedBy)!),
      signedAt: row.signedAt.toISOString(),
      snapshot: row.snapshot,
    };
    res.json({ data });
  });

  return router;
}
