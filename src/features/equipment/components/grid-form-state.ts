import {
  createGridSchema,
  GRID_QUANTITIES,
  type CreateGridInput,
  type GridDto,
} from '../../../../shared/schemas/equipment.schema.ts';
import { gridRuleProblems } from '../../../../shared/schemas/equipment-rules.ts';
import type { GridQuantity } from '../../../../shared/physics/grid-construction.ts';
import type { ErrorDetail } from '../../../../shared/errors.ts';
import { parseNumberField } from './format.ts';

/** Number fields of the grid form other than the construction. */
export const GRID_NUMBER_FIELDS = [
  ...GRID_QUANTITIES,
  'focusDistanceCm',
  'focusRangeMinCm',
  'focusRangeMaxCm',
  'statedTp',
  'statedTs',
  'statedContrastImprovementFactor',
  'statedBuckyFactor',
  'statedSelectivity',
] as const;
export type GridNumberField = (typeof GRID_NUMBER_FIELDS)[number];

export const GRID_TEXT_FIELDS = [
  'label',
  'roomId',
  'serial',
  'stripMaterial',
  'interspaceMaterial',
  'coverMaterial',
  'statedFiguresNote',
  'notes',
] as const;
export type GridTextField = (typeof GRID_TEXT_FIELDS)[number];

/** What the form holds: the text of every field as typed. */
export type GridFormText = Record<GridNumberField | GridTextField, string>;

const asText = (value: number | string | null | undefined): string =>
  value === null || value === undefined ? '' : String(value);

/** The form's starting text: empty, or a grid's entered (not derived) values. */
export function initialGridText(grid?: GridDto): GridFormText {
  const text = Object.fromEntries(
    [...GRID_NUMBER_FIELDS, ...GRID_TEXT_FIELDS].map((key) => [key, '']),
  ) as GridFormText;
  if (!grid) return text;
  for (const key of [...GRID_NUMBER_FIELDS, ...GRID_TEXT_FIELDS]) {
    const isDerived = (grid.derivedFields as string[]).includes(key);
    text[key] = isDerived ? '' : asText(grid[key]);
  }
  return text;
}

/** The live reading of the form: parsed values, derivation and problems. */
export interface GridFormReading {
  numbers: Record<GridNumberField, number | null>;
  derived: Partial<Record<GridQuantity, number>>;
  missing: GridQuantity[];
  /** Per-field problems found in the browser, by the server's own rules. */
  problems: ErrorDetail[];
}

/**
 * Reads the typed text with the same rules the server applies: each
 * number against its range, then the cross-field rules
 * (consistency, ratio known, focusing range around the focusing distance).
 */
export function readGridForm(text: GridFormText): GridFormReading {
  const numbers = Object.fromEntries(
    GRID_NUMBER_FIELDS.map((key) => [key, parseNumberField(text[key])]),
  ) as Record<GridNumberField, number | null>;
  const problems: ErrorDetail[] = [];
  for (const key of GRID_NUMBER_FIELDS) {
    if (Number.isNaN(numbers[key])) {
      problems.push({ path: key, message: 'Enter a number.' });
    }
  }
  for (const key of GRID_NUMBER_FIELDS) {
    const value = numbers[key];
    if (value === null || Number.isNaN(value)) continue;
    const parsed = createGridSchema.shape[key].safeParse(value);
    if (!parsed.success) {
      problems.push({ path: key, message: parsed.error.issues[0]!.message });
    }
  }
  const usable = Object.fromEntries(
    GRID_NUMBER_FIELDS.map((key) => {
      const value = numbers[key];
      const bad = problems.some((p) => p.path === key);
      return [key, value === null || bad ? null : value];
    }),
  ) as Record<GridNumberField, number | null>;
  const rules = gridRuleProblems(usable);
  const derived = Object.fromEntries(
    rules.check.derivedFields.map((key) => [key, rules.check.values[key]!]),
  );
  return {
    numbers,
    derived,
    missing: rules.check.missing,
    problems: [...problems, ...rules.problems],
  };
}

/** The request body for the form's text; empty fields are sent as null. */
export function gridPayload(
  text: GridFormText,
  numbers: GridFormReading['numbers'],
): CreateGridInput {
  const optional = (value: string) => (value.trim() === '' ? null : value);
  return {
    ...numbers,
    label: text.label,
    roomId: text.roomId === '' ? null : Number(text.roomId),
    serial: optional(text.serial),
    stripMaterial: optional(
      text.stripMaterial,
    ) as CreateGridInput['stripMaterial'],
    interspaceMaterial: optional(
      text.interspaceMaterial,
    ) as CreateGridInput['interspaceMaterial'],
    coverMaterial: optional(
      text.coverMaterial,
    ) as CreateGridInput['coverMaterial'],
    statedFiguresNote: optional(text.statedFiguresNote),
    notes: optional(text.notes),
  };
}
