import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import {
  emptyObject,
  errorAt,
  type FieldErrors,
  type ObjectRow,
} from './plan-form-state.ts';

interface ContrastObjectRowsProps {
  rows: ObjectRow[];
  errors: FieldErrors;
  onChange: (rows: ObjectRow[]) => void;
}

/** The phantom's contrast objects: name, material, thickness, diameter. */
export function ContrastObjectRows({
  rows,
  errors,
  onChange,
}: ContrastObjectRowsProps) {
  const update = (index: number, change: Partial<ObjectRow>) =>
    onChange(rows.map((row, i) => (i === index ? { ...row, ...change } : row)));
  const at = (i: number, field: string) =>
    errorAt(errors, `plan.phantom.contrastObjects.${i}.${field}`);

  return (
    <fieldset className="space-y-3">
      <legend className="text-sm font-semibold text-slate-700">
        Contrast objects
      </legend>
      {rows.length === 0 && (
        <p className="text-sm text-slate-500">
          No contrast object: background regions only.
        </p>
      )}
      {rows.map((row, i) => (
        <div key={i} className="grid items-end gap-3 sm:grid-cols-5">
          <TextField
            label={`Object ${i + 1} name`}
            value={row.name}
            onChange={(e) => update(i, { name: e.target.value })}
            error={at(i, 'name')}
          />
          <TextField
            label="Material"
            value={row.material}
            onChange={(e) => update(i, { material: e.target.value })}
            error={at(i, 'material')}
          />
          <TextField
            label="Thickness (mm)"
            inputMode="decimal"
            value={row.thicknessMm}
            onChange={(e) => update(i, { thicknessMm: e.target.value })}
            error={at(i, 'thicknessMm')}
          />
          <TextField
            label="Diameter (mm)"
            inputMode="decimal"
            value={row.diameterMm}
            onChange={(e) => update(i, { diameterMm: e.target.value })}
            error={at(i, 'diameterMm')}
          />
          <Button
            variant="quiet"
            onClick={() => onChange(rows.filter((_, j) => j !== i))}
          >
            Remove
          </Button>
        </div>
      ))}
      <Button
        variant="secondary"
        onClick={() => onChange([...rows, emptyObject()])}
      >
        Add a contrast object
      </Button>
    </fieldset>
  );
}
