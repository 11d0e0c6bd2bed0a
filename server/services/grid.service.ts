import type { GridQuantity } from '../../shared/physics/grid-construction.ts';
import {
  GRID_QUANTITIES,
  type CreateGridInput,
  type DeriveGridInput,
  type GridDerivationDto,
  type UpdateGridInput,
} from '../../shared/schemas/equipment.schema.ts';
import {
  checkGridConstruction,
  gridRuleProblems,
} from '../../shared/schemas/equipment-rules.ts';
import { notFound, validationFailed } from '../errors.ts';
import { Grid } from '../models/grid.model.ts';
import type { AuditContext } from './audit.service.ts';
import {
  auditedChange,
  definedOnly,
  previousValues,
  requireRoomReference,
  snapshot,
} from './equipment.service.ts';

/** Grids, optionally of one room, by label. */
export function listGrids(filter: { roomId?: number }): Promise<Grid[]> {
  return Grid.findAll({
    where: definedOnly(filter),
    order: [['label', 'ASC']],
  });
}

/** @throws AppError 404 when there is no such grid. */
export async function findGridById(id: number): Promise<Grid> {
  const grid = await Grid.findByPk(id);
  if (!grid) throw notFound('grid');
  return grid;
}

/**
 * What a set of construction values determines, without saving: derived
 * values, what is still missing, and per-field problems (inconsistent or
 * out-of-range values are reported, not thrown).
 * @param input any subset of r, N (lines/cm), h, D, t (µm).
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4; PHYSICS.md §1.
 */
export function deriveGridPreview(input: DeriveGridInput): GridDerivationDto {
  return checkGridConstruction(input);
}

/** Derives the construction of the entered values or rejects them. */
function resolveConstruction(
  given: Partial<Record<GridQuantity, number | null>>,
  focus: Pick<
    CreateGridInput,
    'focusDistanceCm' | 'focusRangeMinCm' | 'focusRangeMaxCm'
  >,
) {
  const { check, problems } = gridRuleProblems({ ...given, ...focus });
  if (problems.length > 0) {
    throw validationFailed(problems, 'The grid values are not consistent.');
  }
  const stored = Object.fromEntries(
    GRID_QUANTITIES.map((key) => [key, check.values[key] ?? null]),
  ) as Record<GridQuantity, number | null>;
  return { ...stored, derivedFields: check.derivedFields };
}

const nullIfMissing = <T>(value: T | null | undefined): T | null =>
  value ?? null;

const gridMessages = (label?: string) => ({
  duplicate: `A grid labelled “${label}” already exists.`,
});

/**
 * Adds a grid, deriving the construction values not entered.
 * @throws AppError 400 for inconsistent construction, a focusing range that
 *   does not enclose the focusing distance, no ratio, or an unknown room;
 *   409 when the label is taken.
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4.
 */
export function createGrid(
  input: CreateGridInput,
  audit: AuditContext,
): Promise<Grid> {
  const construction = resolveConstruction(input, input);
  const values = {
    label: input.label,
    roomId: nullIfMissing(input.roomId),
    stripMaterial: nullIfMissing(input.stripMaterial),
    interspaceMaterial: nullIfMissing(input.interspaceMaterial),
    coverMaterial: nullIfMissing(input.coverMaterial),
    focusDistanceCm: nullIfMissing(input.focusDistanceCm),
    focusRangeMinCm: nullIfMissing(input.focusRangeMinCm),
    focusRangeMaxCm: nullIfMissing(input.focusRangeMaxCm),
    serial: nullIfMissing(input.serial),
    statedTp: nullIfMissing(input.statedTp),
    statedTs: nullIfMissing(input.statedTs),
    statedContrastImprovementFactor: nullIfMissing(
      input.statedContrastImprovementFactor,
    ),
    statedBuckyFactor: nullIfMissing(input.statedBuckyFactor),
    statedSelectivity: nullIfMissing(input.statedSelectivity),
    statedFiguresNote: nullIfMissing(input.statedFiguresNote),
    notes: nullIfMissing(input.notes),
  };
  return auditedChange(
    audit,
    gridMessages(input.label),
    async (transaction) => {
      if (values.roomId !== null) {
        await requireRoomReference(values.roomId, transaction);
      }
      const grid = await Grid.create(
        { ...values, ...construction },
        { transaction },
      );
      return {
        result: grid,
        event: {
          action: 'grid.created',
          targetType: 'grid',
          targetId: grid.id,
          details: snapshot(grid),
        },
      };
    },
  );
}

/** The construction values that were entered, not derived. */
function enteredConstruction(
  grid: Grid,
): Partial<Record<GridQuantity, number>> {
  return Object.fromEntries(
    GRID_QUANTITIES.filter(
      (key) => grid[key] !== null && !grid.derivedFields.includes(key),
    ).map((key) => [key, grid[key] as number]),
  );
}

/**
 * Changes a grid. Construction values in the change replace the entered
 * ones (null clears one); the derived values are worked out again from the
 * result, so a change that contradicts the other entered values is refused.
 * @throws AppError 400 for inconsistent values or an unknown room; 409 when
 *   the new label is taken.
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4.
 */
export function updateGrid(
  grid: Grid,
  input: UpdateGridInput,
  audit: AuditContext,
): Promise<Grid> {
  const change = definedOnly(input);
  const entered = { ...enteredConstruction(grid), ...pickConstruction(change) };
  const construction = resolveConstruction(entered, {
    focusDistanceCm:
      change.focusDistanceCm !== undefined
        ? change.focusDistanceCm
        : grid.focusDistanceCm,
    focusRangeMinCm:
      change.focusRangeMinCm !== undefined
        ? change.focusRangeMinCm
        : grid.focusRangeMinCm,
    focusRangeMaxCm:
      change.focusRangeMaxCm !== undefined
        ? change.focusRangeMaxCm
        : grid.focusRangeMaxCm,
  });
  return auditedChange(
    audit,
    gridMessages(input.label),
    async (transaction) => {
      if (change.roomId !== undefined && change.roomId !== null) {
        await requireRoomReference(change.roomId, transaction);
      }
      const before = previousValues(grid, { ...change, ...construction });
      await grid.update({ ...change, ...construction }, { transaction });
      return {
        result: grid,
        event: {
          action: 'grid.updated',
          targetType: 'grid',
          targetId: grid.id,
          details: {
            before,
            change,
            derivedFields: construction.derivedFields,
          },
        },
      };
    },
  );
}

function pickConstruction(
  change: Partial<UpdateGridInput>,
): Partial<Record<GridQuantity, number | null>> {
  return Object.fromEntries(
    GRID_QUANTITIES.filter((key) => key in change).map((key) => [
      key,
      change[key] ?? null,
    ]),
  );
}

/** @throws AppError 409 when a study still refers to the grid. */
export function deleteGrid(grid: Grid, audit: AuditContext): Promise<void> {
  return auditedChange(
    audit,
    { inUse: 'This grid is in use by a study, so it cannot be deleted.' },
    async (transaction) => {
      const details = snapshot(grid);
      await grid.destroy({ transaction });
      return {
        result: undefined,
        event: {
          action: 'grid.deleted',
          targetType: 'grid',
          targetId: grid.id,
          details,
        },
      };
    },
  );
}
