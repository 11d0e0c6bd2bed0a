import {
  MATERIAL_IDS,
  materialInfo,
  type MaterialId,
} from '../../../../shared/physics/attenuation.ts';
import { SelectField } from '../../../components/ui/field.tsx';

/** A material from the attenuation tables, optionally with "none". */
export function MaterialSelect({
  label,
  value,
  onChange,
  error,
  noneLabel,
  disabled,
}: {
  label: string;
  value: MaterialId | '';
  onChange: (value: MaterialId | '') => void;
  error?: string;
  /** Offer an empty choice with this label. */
  noneLabel?: string;
  disabled?: boolean;
}) {
  return (
    <SelectField
      label={label}
      value={value}
      error={error}
      disabled={disabled}
      onChange={(e) => onChange(e.target.value as MaterialId | '')}
    >
      {noneLabel && <option value="">{noneLabel}</option>}
      {MATERIAL_IDS.map((id) => (
        <option key={id} value={id}>
          {materialInfo(id).name}
        </option>
      ))}
    </SelectField>
  );
}
