import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
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
  const update = (index: number, change: Partial<BeamRow>) =>
    onChange(rows.map((row, i) => (i === index ? { ...row, ...change } : row)));
  const at = (i: number, field: string) =>
    errorAt(errors, `plan.beamQualities.${i}.${field}`);

  return (
    <fieldset className="space-y-3">
      <legend className="text-sm font-semibold text-slate-700">
        Beam qualities
      </legend>
      {errors['plan.beamQualities'] && (
        <p role="alert" className="text-xs text-red-700">
          {errors['plan.beamQualities']}
        </p>
      )}
      {rows.map((row, i) => (
        <div
          key={i}
          className="grid items-end gap-3 sm:grid-cols-5"
          data-testid={`beam-row-${i}`}
        >
          <TextField
            label={`Tube voltage ${i + 1} (kV)`}
            inputMode="decimal"
            value={row.kvp}
            onChange={(e) => update(i, { kvp: e.target.value })}
            error={at(i, 'kvp')}
          />
          <TextField
            label="Added Cu (mm)"
            inputMode="decimal"
            value={row.cuMm}
            placeholder="none"
            onChange={(e) => update(i, { cuMm: e.target.value })}
            error={at(i, 'addedFiltration')}
          />
          <TextField
            label="Added Al (mm)"
            inputMode="decimal"
            value={row.alMm}
            placeholder="none"
            onChange={(e) => update(i, { alMm: e.target.value })}
          />
          <TextField
            label="HVL if measured (mm Al)"
            inputMode="decimal"
            value={row.hvlMmAl}
            onChange={(e) => update(i, { hvlMmAl: e.target.value })}
            error={at(i, 'hvlMmAl')}
          />
          <Button
            variant="quiet"
            disabled={rows.length === 1}
            onClick={() => onChange(rows.filter((_, j) => j !== i))}
          >
            Remove
          </Button>
        </div>
      ))}
      <Button
        variant="secondary"
        onClick={() => onChange([...rows, emptyBeam()])}
      >
        Add a beam quality
      </Button>
    </fieldset>
  );
}
