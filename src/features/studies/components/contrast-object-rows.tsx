import { TextField } from '../../../components/ui/field.tsx';
import { EditableRows } from './editable-rows.tsx';
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
  const at = (i: number, field: string) =>
    errorAt(errors, `plan.phantom.contrastObjects.${i}.${field}`);

  return (
    <EditableRows
      legend="Contrast objects"
      rows={rows}
      onChange={onChange}
      newRow={emptyObject}
      addLabel="Add a contrast object"
      notice={
        rows.length === 0 && (
          <p className="text-sm text-slate-500">
            No contrast object: background regions only.
          </p>
        )
      }
      renderFields={(row, i, update) => (
        <>
          <TextField
            label={`Object ${i + 1} name`}
            value={row.name}
            onChange={(e) => update({ name: e.target.value })}
            error={at(i, 'name')}
          />
          <TextField
            label="Material"
            value={row.material}
            onChange={(e) => update({ material: e.target.value })}
            error={at(i, 'material')}
          />
          <TextField
            label="Thickness (mm)"
            inputMode="decimal"
            value={row.thicknessMm}
            onChange={(e) => update({ thicknessMm: e.target.value })}
            error={at(i, 'thicknessMm')}
          />
          <TextField
            label="Diameter (mm)"
            inputMode="decimal"
            value={row.diameterMm}
            onChange={(e) => update({ diameterMm: e.target.value })}
            error={at(i, 'diameterMm')}
          />
        </>
      )}
    />
  );
}
