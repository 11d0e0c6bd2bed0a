import { TextField } from '../../../components/ui/field.tsx';
import { EditableRows } from './editable-rows.tsx';
import {
  emptyBeam,
  errorAt,
  type BeamRow,
  type FieldErrors,
} from './plan-form-state.ts';

interface BeamQualityRowsProps {
  rows: BeamRow[];
  errors: FieldErrors;
  onChange: (rows: BeamRow[]) => void;
}

/** One line per beam quality: kV, added Cu and Al, measured HVL. */
export function BeamQualityRows({
  rows,
  errors,
  onChange,
}: BeamQualityRowsProps) {
  const at = (i: number, field: string) =>
    errorAt(errors, `plan.beamQualities.${i}.${field}`);

  return (
    <EditableRows
      legend="Beam qualities"
      rows={rows}
      onChange={onChange}
      newRow={emptyBeam}
      addLabel="Add a beam quality"
      minRows={1}
      rowTestId={(i) => `beam-row-${i}`}
      notice={
        errors['plan.beamQualities'] && (
          <p role="alert" className="text-xs text-red-700">
            {errors['plan.beamQualities']}
          </p>
        )
      }
      renderFields={(row, i, update) => (
        <>
          <TextField
            label={`Tube voltage ${i + 1} (kV)`}
            inputMode="decimal"
            value={row.kvp}
            onChange={(e) => update({ kvp: e.target.value })}
            error={at(i, 'kvp')}
          />
          <TextField
            label="Added Cu (mm)"
            inputMode="decimal"
            value={row.cuMm}
            placeholder="none"
            onChange={(e) => update({ cuMm: e.target.value })}
            error={at(i, 'addedFiltration')}
          />
          <TextField
            label="Added Al (mm)"
            inputMode="decimal"
            value={row.alMm}
            placeholder="none"
            onChange={(e) => update({ alMm: e.target.value })}
          />
          <TextField
            label="HVL if measured (mm Al)"
            inputMode="decimal"
            value={row.hvlMmAl}
            onChange={(e) => update({ hvlMmAl: e.target.value })}
            error={at(i, 'hvlMmAl')}
          />
        </>
      )}
    />
  );
}
