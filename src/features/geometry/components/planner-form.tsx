import { useState, type FormEvent } from 'react';
import type { PlanRequestInput } from '../../../../shared/schemas/geometry-api.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import type { ApiError } from '../../../lib/api-client.ts';
import { parseNumberField } from './format.ts';
import { GridPicker, type GridChoice } from './grid-picker.tsx';

const INITIAL = {
  ratio: '',
  focusDistanceCm: '',
  sourceGridDistanceCm: '',
  fieldWidthCm: '',
  lateralOffsetCm: '0',
  tiltDeg: '0',
  focusingCriterion: '0.6',
};
type Field = keyof typeof INITIAL;

/** The planner's inputs: a grid (typed or from the register) and its set-up. */
export function PlannerForm({
  onSubmit,
  isPending,
  error,
}: {
  onSubmit: (input: PlanRequestInput) => void;
  isPending: boolean;
  error: ApiError | null;
}) {
  const [values, setValues] = useState(INITIAL);
  const [grid, setGrid] = useState<GridChoice>('typed');
  const [isUpsideDown, setIsUpsideDown] = useState(false);

  const field = (name: Field, label: string, hint?: string) => (
    <TextField
      label={label}
      inputMode="decimal"
      value={values[name]}
      hint={hint}
      disabled={
        grid !== 'typed' && (name === 'ratio' || name === 'focusDistanceCm')
      }
      onChange={(e) => setValues({ ...values, [name]: e.target.value })}
      error={error?.fieldMessage(name)}
    />
  );

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    const number = (name: Field) => parseNumberField(values[name]);
    // Empty fields go out as undefined; the server names each one it needs.
    onSubmit({
      ...(grid === 'typed'
        ? { ratio: number('ratio'), focusDistanceCm: number('focusDistanceCm') }
        : { gridId: grid }),
      sourceGridDistanceCm: number('sourceGridDistanceCm'),
      fieldWidthCm: number('fieldWidthCm'),
      lateralOffsetCm: number('lateralOffsetCm'),
      tiltDeg: number('tiltDeg'),
      focusingCriterion: number('focusingCriterion'),
      isUpsideDown,
    } as PlanRequestInput);
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label="Geometry planner"
      className="grid gap-4 rounded-xl bg-white p-6 shadow-sm md:grid-cols-4"
    >
      <div className="md:col-span-2">
        <GridPicker
          value={grid}
          error={error?.fieldMessage('gridId')}
          isUsable={(g) => g.ratio !== null && g.focusDistanceCm !== null}
          onChange={(choice, picked) => {
            setGrid(choice);
            if (picked) {
              setValues({
                ...values,
                ratio: String(picked.ratio ?? ''),
                focusDistanceCm: String(picked.focusDistanceCm ?? ''),
              });
            }
          }}
        />
      </div>
      {field('ratio', 'Grid ratio')}
      {field('focusDistanceCm', 'Focusing distance f0 (cm)')}
      {field(
        'sourceGridDistanceCm',
        'SID (cm)',
        'Focal spot to grid; the SID when the grid lies on the detector.',
      )}
      {field('fieldWidthCm', 'Field width (cm)', 'Across the strips.')}
      {field(
        'lateralOffsetCm',
        'Lateral offset (cm)',
        'Focal spot off the centre line, across the strips.',
      )}
      {field('tiltDeg', 'Tilt (°)', 'About an axis parallel to the strips.')}
      {field(
        'focusingCriterion',
        'Focusing-range criterion',
        'Edge primary relative to centred; 0.6 from memory of IEC 60627.',
      )}
      <label className="flex items-center gap-2 self-end pb-2 text-sm font-semibold text-slate-700">
        <input
          type="checkbox"
          checked={isUpsideDown}
          onChange={(e) => setIsUpsideDown(e.target.checked)}
        />
        Grid upside down
      </label>
      <div className="flex items-end">
        <Button type="submit" disabled={isPending}>
          Plan
        </Button>
      </div>
      {error && (
        <p role="alert" className="text-sm text-red-700 md:col-span-4">
          {error.message}
        </p>
      )}
    </form>
  );
}
