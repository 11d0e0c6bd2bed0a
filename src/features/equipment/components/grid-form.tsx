import { useState, type FormEvent } from 'react';
import { MATERIAL_IDS } from '../../../../shared/physics/attenuation.ts';
import {
  GRID_FIELD_LIMITS,
  GRID_QUANTITIES,
  type GridDto,
  type RoomDto,
} from '../../../../shared/schemas/equipment.schema.ts';
import { SelectField, TextField } from '../../../components/ui/field.tsx';
import { FormError } from '../../../components/ui/form-error.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useCreateGrid, useUpdateGrid } from '../api/grids.ts';
import { DerivedMark } from './derived-mark.tsx';
import { FormActions } from './form-actions.tsx';
import { formatNumber, materialName } from './format.ts';
import {
  gridPayload,
  initialGridText,
  readGridForm,
  type GridFormText,
  type GridNumberField,
} from './grid-form-state.ts';

const QUANTITY_LABELS: Record<(typeof GRID_QUANTITIES)[number], string> = {
  ratio: 'Grid ratio r (h/D)',
  stripFrequencyPerCm: 'Strip frequency N (lines/cm)',
  stripHeightUm: 'Strip height h (µm)',
  interspaceWidthUm: 'Interspace width D (µm)',
  stripThicknessUm: 'Strip thickness t (µm)',
};

const rangeHint = (key: keyof typeof GRID_FIELD_LIMITS): string => {
  const limit = GRID_FIELD_LIMITS[key];
  return `${limit.min}–${limit.max}${limit.unit ? ` ${limit.unit}` : ''}, ${limit.basis}`;
};

interface GridFormProps {
  rooms: RoomDto[];
  /** The grid to change; a new grid when absent. */
  grid?: GridDto;
  onDone: (grid: GridDto) => void;
  onCancel?: () => void;
}

/**
 * Adds or changes a grid. Any consistent subset of r, N, h, D and t is
 * enough: the rest is derived while typing, with the server's own rules.
 */
export function GridForm({ rooms, grid, onDone, onCancel }: GridFormProps) {
  const create = useCreateGrid();
  const update = useUpdateGrid(grid?.id ?? 0);
  const save = grid ? update : create;
  const [text, setText] = useState<GridFormText>(() => initialGridText(grid));
  const reading = readGridForm(text);
  const serverError = save.error instanceof ApiError ? save.error : null;

  const fieldError = (key: string) =>
    reading.problems.find((p) => p.path === key)?.message ??
    serverError?.fieldMessage(key);
  const bind = (key: keyof GridFormText) => ({
    value: text[key],
    onChange: (event: { target: { value: string } }) =>
      setText((previous) => ({ ...previous, [key]: event.target.value })),
  });
  const numberField = (key: GridNumberField, label: string, hint?: string) => (
    <TextField
      label={label}
      inputMode="decimal"
      autoComplete="off"
      error={fieldError(key)}
      hint={hint}
      {...bind(key)}
    />
  );

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    if (reading.problems.length > 0) return;
    save.mutate(gridPayload(text, reading.numbers), { onSuccess: onDone });
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label={grid ? `Change ${grid.label}` : 'Add a grid'}
      className="space-y-6 rounded-xl bg-white p-6 shadow-sm"
    >
      <div className="grid gap-4 md:grid-cols-3">
        <TextField
          label="Label"
          error={fieldError('label')}
          {...bind('label')}
        />
        <SelectField
          label="Room"
          error={fieldError('roomId')}
          {...bind('roomId')}
        >
          <option value="">Not kept in one room</option>
          {rooms.map((room) => (
            <option key={room.id} value={room.id}>
              {room.name}
            </option>
          ))}
        </SelectField>
        <TextField
          label="Serial number"
          error={fieldError('serial')}
          {...bind('serial')}
        />
      </div>

      <fieldset className="space-y-3">
        <legend className="font-semibold text-lamina-900">Construction</legend>
        <p className="text-sm text-slate-600">
          Enter what the label or data sheet gives; r = h/D and N = 10 000/(D +
          t) fill in the rest.
        </p>
        <div className="grid gap-4 md:grid-cols-5">
          {GRID_QUANTITIES.map((key) => {
            const derived = reading.derived[key];
            return (
              <div key={key}>
                {numberField(
                  key,
                  QUANTITY_LABELS[key],
                  derived === undefined ? rangeHint(key) : undefined,
                )}
                {derived !== undefined && !fieldError(key) && (
                  <p
                    className="mt-1 text-xs text-lamina-800"
                    data-testid={`derived-${key}`}
                  >
                    = {formatNumber(derived)} <DerivedMark />
                  </p>
                )}
              </div>
            );
          })}
        </div>
        {reading.missing.length > 0 && reading.problems.length === 0 && (
          <p className="text-xs text-slate-500" role="status">
            Not yet determined:{' '}
            {reading.missing.map((key) => QUANTITY_LABELS[key]).join(', ')}.
          </p>
        )}
      </fieldset>

      <fieldset className="grid gap-4 md:grid-cols-3">
        <legend className="mb-2 font-semibold text-lamina-900">
          Materials
        </legend>
        {(
          [
            ['stripMaterial', 'Strip material'],
            ['interspaceMaterial', 'Interspace material'],
            ['coverMaterial', 'Cover material'],
          ] as const
        ).map(([key, label]) => (
          <SelectField
            key={key}
            label={label}
            error={fieldError(key)}
            {...bind(key)}
          >
            <option value="">Not stated</option>
            {MATERIAL_IDS.map((id) => (
              <option key={id} value={id}>
                {materialName(id)}
              </option>
            ))}
          </SelectField>
        ))}
      </fieldset>

      <fieldset className="grid gap-4 md:grid-cols-3">
        <legend className="mb-2 font-semibold text-lamina-900">Focusing</legend>
        {numberField(
          'focusDistanceCm',
          'Focusing distance f0 (cm)',
          `${rangeHint('focusDistanceCm')}; empty for a parallel grid`,
        )}
        {numberField('focusRangeMinCm', 'Focusing range from (cm)')}
        {numberField('focusRangeMaxCm', 'Focusing range to (cm)')}
      </fieldset>

      <fieldset className="space-y-3">
        <legend className="font-semibold text-lamina-900">
          Stated IEC 60627 figures (from the maker, optional)
        </legend>
        <div className="grid gap-4 md:grid-cols-5">
          {numberField('statedTp', 'Primary transmission Tp')}
          {numberField('statedTs', 'Scatter transmission Ts')}
          {numberField(
            'statedContrastImprovementFactor',
            'Contrast improvement K',
          )}
          {numberField('statedBuckyFactor', 'Bucky factor B')}
          {numberField('statedSelectivity', 'Selectivity Σ')}
        </div>
        <TextField
          label="Source of the stated figures"
          error={fieldError('statedFiguresNote')}
          {...bind('statedFiguresNote')}
        />
      </fieldset>

      <TextField label="Notes" error={fieldError('notes')} {...bind('notes')} />

      <FormError error={serverError} />
      <FormActions
        submitLabel={grid ? 'Save changes' : 'Add grid'}
        isDisabled={save.isPending || reading.problems.length > 0}
        onCancel={onCancel}
        className="flex gap-3"
      />
    </form>
  );
}
