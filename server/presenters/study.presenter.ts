import { SAFETY_CAUTIONS } from '../../shared/cautions.ts';
import type { Actor } from '../../shared/permissions.ts';
import { describeCondition } from '../../shared/studies/condition-label.ts';
import {
  expectedAcquisitionCount,
  expectedAcquisitions,
} from '../../shared/studies/expected-acquisitions.ts';
import type {
  AssignmentDto,
  ChecklistDto,
  DetectorRefDto,
  GridRefDto,
  RoomRefDto,
  StudyAuditEntryDto,
  StudyCommentDto,
  StudyConditionDto,
  StudyDto,
  StudyOptionsDto,
  StudyImageDto,
  StudyRevisionSummaryDto,
  StudySnapshot,
  StudySummaryDto,
  UserRefDto,
} from '../../shared/studies/study-dto.ts';
import type { PairingImage } from '../../shared/studies/pairing.ts';
import { actionsFrom } from '../../shared/studies/study-state.ts';
import type { AuditEvent } from '../models/audit-event.model.ts';
import type { Detector } from '../models/detector.model.ts';
import type { Grid } from '../models/grid.model.ts';
import type { ImageAssignment } from '../models/image-assignment.model.ts';
import type { Image } from '../models/image.model.ts';
import type { Room } from '../models/room.model.ts';
import type { StudyComment } from '../models/study-comment.model.ts';
import type { StudyRevision } from '../models/study-revision.model.ts';
import type { StudyCondition } from '../models/study-condition.model.ts';
import type { Study } from '../models/study.model.ts';
import type { User } from '../models/user.model.ts';
import { studyPermissions } from '../policies/study.policy.ts';
import {
  studyGeometryWarnings,
  type GeometryCheckImage,
} from '../services/study-geometry-check.service.ts';

/** The related rows a study's presentation needs, loaded by the service. */
export interface StudyRefs {
  rooms: Map<number, Room>;
  users: Map<number, User>;
  gridCounts: Map<number, number>;
}

export const presentUserRef = (user: User): UserRefDto => ({
  id: user.id,
  displayName: user.displayName,
  role: user.role,
});

export const presentRoomRef = (room: Room): RoomRefDto => ({
  id: room.id,
  name: room.name,
  site: room.site,
});

export const presentDetectorRef = (detector: Detector): DetectorRefDto => ({
  id: detector.id,
  roomId: detector.roomId,
  name: detector.name,
  detectorType: detector.detectorType,
});

export const presentGridRef = (grid: Grid): GridRefDto => ({
  id: grid.id,
  label: grid.label,
  roomId: grid.roomId,
  ratio: grid.ratio,
  stripFrequencyPerCm: grid.stripFrequencyPerCm,
  focusDistanceCm: grid.focusDistanceCm,
  serial: grid.serial,
});

const iso = (d: Date | null): string | null => (d ? d.toISOString() : null);

function userOf(refs: StudyRefs, id: number): UserRefDto {
  const user = refs.users.get(id);
  // A user row cannot vanish (RESTRICT), so a miss is a loading slip.
  if (!user) throw new Error(`user ${id} was not loaded`);
  return presentUserRef(user);
}

/** A study as listed. */
export function presentStudySummary(
  study: Study,
  refs: StudyRefs,
): StudySummaryDto {
  return {
    id: study.id,
    title: study.title,
    status: study.status,
    revision: study.revision,
    room: presentRoomRef(refs.rooms.get(study.roomId)!),
    createdBy: userOf(refs, study.createdBy),
    signedBy: study.signedBy === null ? null : userOf(refs, study.signedBy),
    selfSigned: study.signedBy !== null && study.signedBy === study.createdBy,
    submittedAt: iso(study.submittedAt),
    signedAt: iso(study.signedAt),
    createdAt: study.createdAt.toISOString(),
    updatedAt: study.updatedAt.toISOString(),
    expectedAcquisitionCount: expectedAcquisitionCount(
      study.plan,
      refs.gridCounts.get(study.id) ?? 0,
    ),
  };
}

/** One condition, with its label in words. */
export function presentCondition(
  condition: StudyCondition,
  study: Pick<Study, 'plan'>,
  grids: readonly Grid[],
): StudyConditionDto {
  const material = study.plan.phantom.material;
  const gridLabel =
    grids.find((g) => g.id === condition.gridId)?.label ?? 'grid';
  return {
    id: condition.id,
    studyId: condition.studyId,
    position: condition.position,
    key: condition.conditionKey,
    kvp: condition.kvp,
    addedFiltration: condition.addedFiltration,
    hvlMmAl: condition.hvlMmAl,
    phantomThicknessCm: condition.phantomThicknessCm,
    phantomMaterial: material,
    gridId: condition.gridId,
    label: describeCondition(condition, material, gridLabel),
  };
}

/** A study with everything its page shows, and what the viewer may do. */
export function presentStudy(
  study: Study,
  parts: {
    refs: StudyRefs;
    detector: Detector | null;
    grids: Grid[];
    conditions: StudyCondition[];
    geometryImages?: GeometryCheckImage[];
  },
  viewer: Actor,
): StudyDto {
  return {
    ...presentStudySummary(study, parts.refs),
    purpose: study.purpose,
    detector: parts.detector ? presentDetectorRef(parts.detector) : null,
    grids: parts.grids.map(presentGridRef),
    plan: study.plan,
    conditions: parts.conditions.map((c) =>
      presentCondition(c, study, parts.grids),
    ),
    stateActions: actionsFrom(study.status),
    permissions: studyPermissions(viewer, study),
    geometryWarnings: studyGeometryWarnings(
      study,
      parts.grids,
      parts.geometryImages,
    ),
  };
}

export const presentAssignment = (a: ImageAssignment): AssignmentDto => ({
  imageId: a.imageId,
  conditionId: a.conditionId,
  arm: a.arm,
  replicate: a.replicate,
  proposedBy: a.proposedBy,
  reason: a.reason,
  assignedBy: a.assignedBy,
  updatedAt: a.updatedAt.toISOString(),
});

export const presentComment = (
  comment: StudyComment,
  author: User,
): StudyCommentDto => ({
  id: comment.id,
  author: presentUserRef(author),
  revision: comment.revision,
  kind: comment.kind,
  body: comment.body,
  createdAt: comment.createdAt.toISOString(),
});

export const presentAuditEntry = (
  event: AuditEvent,
  actor: User | null,
): StudyAuditEntryDto => ({
  id: Number(event.id),
  action: event.action,
  actor: actor ? presentUserRef(actor) : null,
  details: event.details,
  at: event.createdAt.toISOString(),
});

/**
 * The printable checklist: every exposure of the plan in the order to make
 * it, with its settings, and the radiation-safety cautions.
 */
export function presentChecklist(
  study: Study,
  equipment: { room: Room; detector: Detector | null; grids: Grid[] },
): ChecklistDto {
  const labelOf = (id: number) =>
    equipment.grids.find((g) => g.id === id)?.label ?? '';
  return {
    study: {
      id: study.id,
      title: study.title,
      revision: study.revision,
      status: study.status,
      room: presentRoomRef(equipment.room),
      detector: equipment.detector
        ? presentDetectorRef(equipment.detector)
        : null,
    },
    plan: study.plan,
    grids: equipment.grids.map(presentGridRef),
    steps: expectedAcquisitions(
      study.plan,
      equipment.grids.map((g) => g.id),
    ).map((step) => ({ ...step, gridLabel: labelOf(step.gridId) })),
    cautions: [...SAFETY_CAUTIONS],
  };
}

export const presentStudyOptions = (options: {
  rooms: Room[];
  detectors: Detector[];
  grids: Grid[];
}): StudyOptionsDto => ({
  rooms: options.rooms.map(presentRoomRef),
  detectors: options.detectors.map(presentDetectorRef),
  grids: options.grids.map(presentGridRef),
});

/**
 * The frozen copy of a study being signed: what it planned, which grids and
 * conditions, and which file (by SHA-256) filled each place.
 */
export function presentSnapshot(
  study: Study,
  parts: {
    refs: StudyRefs;
    detector: Detector | null;
    grids: Grid[];
    conditions: StudyCondition[];
    images: Image[];
    assignments: ImageAssignment[];
  },
): StudySnapshot {
  const summary = presentStudySummary(study, parts.refs);
  return {
    format: 1,
    study: {
      id: study.id,
      title: study.title,
      purpose: study.purpose,
      revision: study.revision,
      room: summary.room,
      detector: parts.detector ? presentDetectorRef(parts.detector) : null,
      createdBy: summary.createdBy,
    },
    plan: study.plan,
    grids: parts.grids.map(presentGridRef),
    conditions: parts.conditions.map((c) =>
      presentCondition(c, study, parts.grids),
    ),
    assignments: parts.assignments.map((a) => {
      const image = parts.images.find((i) => i.id === a.imageId)!;
      return {
        ...presentAssignment(a),
        originalName: image.originalName,
        sha256: image.sha256,
      };
    }),
    signedBy: summary.signedBy!,
    signedAt: summary.signedAt!,
    selfSigned: summary.selfSigned,
  };
}

/** An image of a study with the facts pairing read and its trust warnings. */
export const presentStudyImage = (
  image: Image,
  facts: PairingImage,
  assignment: ImageAssignment | null,
): StudyImageDto => ({
  id: image.id,
  originalName: image.originalName,
  kvp: facts.kvp,
  exposureMas: facts.exposureMas,
  grid: facts.grid,
  gridId: facts.gridId,
  bodyPartThicknessMm: facts.bodyPartThicknessMm,
  stationName: facts.stationName,
  acquisitionDateTime: facts.acquisitionDateTime,
  warnings: image.warnings,
  assignment: assignment ? presentAssignment(assignment) : null,
});

/** The signed revisions, then the current one when it is not signed yet. */
export function presentRevisionList(
  study: Study,
  signed: readonly StudyRevision[],
  users: Map<number, User>,
): StudyRevisionSummaryDto[] {
  const list: StudyRevisionSummaryDto[] = signed.map((r) => ({
    revision: r.revision,
    status: 'signed',
    signedBy: presentUserRef(users.get(r.signedBy)!),
    signedAt: r.signedAt.toISOString(),
    selfSigned: r.snapshot.selfSigned,
    isCurrent: r.revision === study.revision,
  }));
  if (!signed.some((r) => r.revision === study.revision)) {
    list.push({
      revision: study.revision,
      status: study.status,
      signedBy: null,
      signedAt: null,
      selfSigned: false,
      isCurrent: true,
    });
  }
  return list;
}
