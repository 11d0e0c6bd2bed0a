import type { Role } from '../permissions.ts';
import type {
  Arm,
  FilterLayer,
  PhantomMaterial,
  StudyPlan,
  StudyStatus,
} from '../schemas/study.schema.ts';
import type { Warning } from '../warnings.ts';
import type { ExpectedAcquisition } from './expected-acquisitions.ts';
import type { OpenSlot, PairingProposal } from './pairing.ts';
import type { StudyAction } from './study-state.ts';

/** The shapes the study API sends; dates are ISO 8601 strings. */

export interface UserRefDto {
  id: number;
  displayName: string;
  role: Role;
}

export interface RoomRefDto {
  id: number;
  name: string;
  site: string;
}

export interface DetectorRefDto {
  id: number;
  roomId: number;
  name: string;
  detectorType: string;
}

export interface GridRefDto {
  id: number;
  label: string;
  roomId: number | null;
  ratio: number | null;
  stripFrequencyPerCm: number | null;
  focusDistanceCm: number | null;
  serial: string | null;
}

/** One condition: a beam quality × phantom thickness × grid under test. */
export interface StudyConditionDto {
  id: number;
  studyId: number;
  /** Checklist order, from 1. */
  position: number;
  key: string;
  kvp: number;
  addedFiltration: FilterLayer[];
  hvlMmAl: number | null;
  phantomThicknessCm: number;
  phantomMaterial: PhantomMaterial;
  gridId: number;
  /** e.g. "70 kV (none) · 20 cm PMMA · G12". */
  label: string;
}

/** What the viewer may do now (roles and state together). */
export interface StudyPermissionsDto {
  edit: boolean;
  addImages: boolean;
  submit: boolean;
  return: boolean;
  sign: boolean;
  comment: boolean;
  revise: boolean;
}

export interface StudySummaryDto {
  id: number;
  title: string;
  status: StudyStatus;
  revision: number;
  room: RoomRefDto;
  createdBy: UserRefDto;
  signedBy: UserRefDto | null;
  /** True when the physicist who signed also created the study. */
  selfSigned: boolean;
  submittedAt: string | null;
  signedAt: string | null;
  createdAt: string;
  updatedAt: string;
  expectedAcquisitionCount: number;
}

export interface StudyDto extends StudySummaryDto {
  purpose: string;
  detector: DetectorRefDto | null;
  grids: GridRefDto[];
  plan: StudyPlan;
  conditions: StudyConditionDto[];
  /** State actions the state allows, whoever asks. */
  stateActions: StudyAction[];
  permissions: StudyPermissionsDto;
  /** Focusing-range warnings from the plan's and the images' geometry. */
  geometryWarnings: Warning[];
}

/** Where one image sits in a study. */
export interface AssignmentDto {
  imageId: number;
  conditionId: number;
  arm: Arm;
  replicate: number;
  proposedBy: 'auto' | 'user';
  reason: string;
  assignedBy: number;
  updatedAt: string;
}

/** An image of a study with the header facts pairing reads and its warnings. */
export interface StudyImageDto {
  id: number;
  originalName: string;
  kvp: number | null;
  exposureMas: number | null;
  grid: string[] | null;
  gridId: string | null;
  bodyPartThicknessMm: number | null;
  stationName: string | null;
  acquisitionDateTime: string | null;
  warnings: Warning[];
  assignment: AssignmentDto | null;
}

export interface StudyAssignmentsDto {
  images: StudyImageDto[];
  openSlots: OpenSlot[];
}

export interface PairingProposalsDto {
  proposals: PairingProposal[];
  openSlots: OpenSlot[];
}

export interface StudyCommentDto {
  id: number;
  author: UserRefDto;
  revision: number;
  kind: 'comment' | 'return' | 'sign';
  body: string;
  createdAt: string;
}

export interface StudyAuditEntryDto {
  id: number;
  action: string;
  actor: UserRefDto | null;
  details: Record<string, unknown>;
  at: string;
}

/** A revision as listed: signed ones have a snapshot to read. */
export interface StudyRevisionSummaryDto {
  revision: number;
  status: StudyStatus;
  signedBy: UserRefDto | null;
  signedAt: string | null;
  selfSigned: boolean;
  isCurrent: boolean;
}

/** What was signed, frozen: read back unchanged by later revisions. */
export interface StudySnapshot {
  format: 1;
  study: {
    id: number;
    title: string;
    purpose: string;
    revision: number;
    room: RoomRefDto;
    detector: DetectorRefDto | null;
    createdBy: UserRefDto;
  };
  plan: StudyPlan;
  grids: GridRefDto[];
  conditions: StudyConditionDto[];
  assignments: (AssignmentDto & { originalName: string; sha256: string })[];
  signedBy: UserRefDto;
  signedAt: string;
  selfSigned: boolean;
}

export interface StudyRevisionDto {
  revision: number;
  signedBy: UserRefDto;
  signedAt: string;
  snapshot: StudySnapshot;
}

/** One line of the printable checklist. */
export interface ChecklistStepDto extends ExpectedAcquisition {
  gridLabel: string;
}

export interface ChecklistDto {
  study: {
    id: number;
    title: string;
    revision: number;
    status: StudyStatus;
    room: RoomRefDto;
    detector: DetectorRefDto | null;
  };
  plan: StudyPlan;
  grids: GridRefDto[];
  steps: ChecklistStepDto[];
  cautions: string[];
}

/** The equipment a plan may name. */
export interface StudyOptionsDto {
  rooms: RoomRefDto[];
  detectors: DetectorRefDto[];
  grids: GridRefDto[];
}
