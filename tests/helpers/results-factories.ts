import { createHash, randomUUID } from 'node:crypto';
import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import { fromRoot } from '../../server/config/paths.ts';
import { sequelize } from '../../server/db/sequelize.ts';
import { ConditionAnalysis } from '../../server/models/condition-analysis.model.ts';
import { ConditionFigure } from '../../server/models/condition-figure.model.ts';
import type { Grid } from '../../server/models/grid.model.ts';
import { ImageAssignment } from '../../server/models/image-assignment.model.ts';
import type { Room } from '../../server/models/room.model.ts';
import { StudyCondition } from '../../server/models/study-condition.model.ts';
import { StudyGrid } from '../../server/models/study-grid.model.ts';
import { Study } from '../../server/models/study.model.ts';
import type { User } from '../../server/models/user.model.ts';
import type { GridVerdictOutcome } from '../../shared/analysis/verdict.ts';
import type { FigureKey } from '../../shared/figures.ts';
import {
  studyPlanSchema,
  type Arm,
  type FilterLayer,
  type StudyStatus,
} from '../../shared/schemas/study.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { buildUser } from './factories.ts';
import {
  buildDetector,
  buildGrid,
  buildImageRow,
  buildRoom,
  SMALL_PLAN,
} from './study-factories.ts';

/**
 * Rows for comparison, baseline and report tests, inserted directly: a
 * study with its conditions, one finished analysis per condition and its
 * figures as the results engineer's service stores them.
 */

/** A figure to store; the interval defaults to value ± 2·SE. */
export interface SeedFigure {
  value: number;
  se?: number;
  ciLow?: number;
  ciHigh?: number;
  n?: number;
  degreesOfFreedom?: number | null;
  basis?: string;
}

export interface SeedCondition {
  kvp: number;
  phantomThicknessCm: number;
  /** Index into the study's grids (default 0). */
  grid?: number;
  addedFiltration?: FilterLayer[];
  hvlMmAl?: number | null;
  figures: Partial<Record<FigureKey, SeedFigure>>;
  verdictOutcome?: GridVerdictOutcome | null;
  warnings?: Warning[];
  /** Stored as the analysis result's `analysis.method`. */
  method?: Record<string, unknown>;
}

export interface SeedStudyOptions {
  room?: Room;
  grids?: Grid[];
  detector?: boolean;
  status?: StudyStatus;
  title?: string;
  revision?: number;
  createdBy?: User;
  signedBy?: User;
  signedAt?: Date;
  createdAt?: Date;
  conditions: SeedCondition[];
}

export interface SeededStudy {
  study: Study;
  room: Room;
  grids: Grid[];
  conditions: StudyCondition[];
  analyses: ConditionAnalysis[];
  signer: User | null;
}

/** The method a seeded analysis records (as the analysis engine words it). */
export const SEED_METHOD = {
  signal: ['linearised with a linear detector calibration'],
  cnrDefinition: 'background-sd',
  cnr: 'CNR = ΔS/σ_bg (background SD)',
  doseMeasure: 'mas',
  doseLabel: 'tube exposure (mAs)',
  uncertainty: 'Student t over replicate images',
};

const tag = () => randomUUID().slice(0, 8);

/**
 * A study of a room with conditions, finished analyses and figures.
 * Signed studies get a signer (a new physicist) and a signed date (now,
 * unless given); creation dates can be set to place studies in time.
 */
export async function seedStudyWithResults(
  options: SeedStudyOptions,
): Promise<SeededStudy> {
  const status = options.status ?? 'signed';
  const room = options.room ?? (await buildRoom());
  const grids = options.grids ?? [await buildGrid(12, room.id)];
  const detector =
    options.detector === false ? null : await buildDetector(room.id);
  const creator = options.createdBy ?? (await buildUser({ role: 'resident' }));
  const signer =
    status === 'signed'
      ? (options.signedBy ?? (await buildUser({ role: 'physicist' })))
      : null;
  // Created unsigned and signed at the end, as the review flow does, so a
  // board reading meanwhile never sees a signed study without its figures.
  const study = await Study.create({
    roomId: room.id,
    detectorId: detector?.id ?? null,
    title: options.title ?? `Grid study ${tag()}`,
    purpose: 'Check what the grid buys at equal dose (test).',
    status: status === 'signed' ? 'submitted' : status,
    revision: options.revision ?? 1,
    plan: studyPlanSchema.parse(SMALL_PLAN),
    createdBy: creator.id,
    signedBy: null,
    signedAt: null,
    submittedAt: null,
    ...(options.createdAt ? { createdAt: options.createdAt } : {}),
  });
  await Promise.all(
    grids.map((grid, position) =>
      StudyGrid.create({
        studyId: study.id,
        gridId: grid.id,
        position: position + 1,
      }),
    ),
  );
  const conditions: StudyCondition[] = [];
  const analyses: ConditionAnalysis[] = [];
  for (const [index, seed] of options.conditions.entries()) {
    const grid = grids[seed.grid ?? 0]!;
    const condition = await StudyCondition.create({
      studyId: study.id,
      conditionKey: `kv${seed.kvp}|t${seed.phantomThicknessCm}|g${grid.id}|${index}`,
      position: index + 1,
      kvp: seed.kvp,
      addedFiltration: seed.addedFiltration ?? [],
      hvlMmAl: seed.hvlMmAl ?? null,
      phantomThicknessCm: seed.phantomThicknessCm,
      gridId: grid.id,
    });
    const analysis = await ConditionAnalysis.create({
      studyId: study.id,
      conditionId: condition.id,
      status: 'done',
      options: {},
      result: {
        analysis: { method: seed.method ?? SEED_METHOD },
        primaryObject: 'disc',
      },
      verdictOutcome: seed.verdictOutcome ?? null,
      verdictSentence: null,
      warnings: seed.warnings ?? [],
      errorCode: null,
      errorMessage: null,
      computedAt: new Date(),
    });
    await ConditionFigure.bulkCreate(
      (Object.entries(seed.figures) as Array<[FigureKey, SeedFigure]>).map(
        ([figure, f]) => {
          const se = f.se ?? 0.02;
          return {
            analysisId: analysis.id,
            studyId: study.id,
            conditionId: condition.id,
            figure,
            value: f.value,
            standardError: se,
            ciLow: f.ciLow ?? f.value - 2 * se,
            ciHigh: f.ciHigh ?? f.value + 2 * se,
            degreesOfFreedom: f.degreesOfFreedom ?? 4,
            n: f.n ?? 3,
            basis: (f.basis ?? 'replicates') as ConditionFigure['basis'],
          };
        },
      ),
    );
    conditions.push(condition);
    analyses.push(analysis);
  }
  if (signer) {
    await study.update({
      status: 'signed',
      signedBy: signer.id,
      signedAt: options.signedAt ?? new Date(),
    });
  }
  return { study, room, grids, conditions, analyses, signer };
}

/** A grid with stated IEC 60627 figures and a complete construction. */
export async function buildStatedGrid(roomId: number | null): Promise<Grid> {
  const grid = await buildGrid(12, roomId);
  return grid.update({
    stripThicknessUm: 36,
    interspaceMaterial: 'aluminium',
    stripMaterial: 'lead',
    statedTp: 0.7,
    statedTs: 0.1,
    statedContrastImprovementFactor: 3.2,
    statedBuckyFactor: 4.5,
    statedSelectivity: 7,
    statedFiguresNote: 'Maker’s data sheet (invented), IEC 60627 conditions.',
  });
}

/**
 * Stores DICOM bytes in an uploads folder as the image store would, with
 * an image row and its assignment to a condition's arm.
 * @param uploadsDir the app's uploads folder (relative to the project).
 */
export async function attachImage(options: {
  uploadsDir: string;
  bytes: Uint8Array;
  studyId: number;
  conditionId: number;
  arm: Arm;
  replicate?: number;
  uploadedBy: number;
  rows: number;
  columns: number;
  spacingMm?: number;
}): Promise<number> {
  const sha256 = createHash('sha256').update(options.bytes).digest('hex');
  const storageKey = `images/${sha256.slice(0, 2)}/${sha256}.dcm`;
  const file = path.join(fromRoot(options.uploadsDir), storageKey);
  await mkdir(path.dirname(file), { recursive: true });
  await writeFile(file, options.bytes);
  const image = await buildImageRow({
    uploadedBy: options.uploadedBy,
    studyId: options.studyId,
  });
  await image.update({
    sha256,
    storageKey,
    sizeBytes: options.bytes.byteLength,
    rows: options.rows,
    columns: options.columns,
    spacingRowMm: options.spacingMm ?? null,
    spacingColumnMm: options.spacingMm ?? null,
  });
  await ImageAssignment.create({
    imageId: image.id,
    studyId: options.studyId,
    conditionId: options.conditionId,
    arm: options.arm,
    replicate: options.replicate ?? 1,
    proposedBy: 'user',
    reason: '',
    assignedBy: options.uploadedBy,
  });
  return image.id;
}

/**
 * Gives a study its region layout (regions in pixels), and optionally an
 * image its own offset, as the region editor stores them.
 */
export async function setStudyLayout(options: {
  studyId: number;
  ownerId: number;
  regions: Array<{ name: string; role: string; spec: string }>;
  offsets?: Array<{ imageId: number; dxPx: number; dyPx: number }>;
}): Promise<number> {
  const [row] = await sequelize.query<{ id: number }>(
    `INSERT INTO region_layouts (name, description, units, regions, owner_id, study_id, created_at, updated_at)
     VALUES (:name, '', 'px', CAST(:regions AS jsonb), :ownerId, :studyId, now(), now())
     RETURNING id`,
    {
      type: QueryTypes.SELECT,
      replacements: {
        name: `Layout ${tag()}`,
        regions: JSON.stringify(options.regions),
        ownerId: options.ownerId,
        studyId: options.studyId,
      },
    },
  );
  for (const offset of options.offsets ?? []) {
    await sequelize.query(
      `INSERT INTO image_regions (image_id, layout_id, dx_px, dy_px, source, overrides, updated_by, created_at, updated_at)
       VALUES (:imageId, :layoutId, :dx, :dy, 'manual', '{}'::jsonb, :ownerId, now(), now())`,
      {
        replacements: {
          imageId: offset.imageId,
          layoutId: row!.id,
          dx: offset.dxPx,
          dy: offset.dyPx,
          ownerId: options.ownerId,
        },
      },
    );
  }
  return row!.id;
}
