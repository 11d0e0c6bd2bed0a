import { SelectField, TextField } from '../../../components/ui/field.tsx';
import type { ApiError } from '../../../lib/api-client.ts';

/** The beam as the form holds it, before it becomes a request. */
export interface BeamFormValues {
  kind: 'energy' | 'kramers' | 'spectrum';
  energyKeV: string;
  kvp: string;
  totalFiltrationMmAl: string;
  weighting: 'energy' | 'photons';
  spectrumCsv: string;
  fileName: string;
}

export const INITIAL_BEAM: BeamFormValues = {
  kind: 'kramers',
  energyKeV: '60',
  kvp: '80',
  totalFiltrationMmAl: '2.5',
  weighting: 'energy',
  spectrumCsv: '',
  fileName: '',
};

/** Beam inputs: one energy, a Kramers spectrum by kV, or a spectrum file. */
export function BeamFields({
  beam,
  onChange,
  error,
}: {
  beam: BeamFormValues;
  onChange: (beam: BeamFormValues) => void;
  error: ApiError | null;
}) {
  const set = (change: Partial<BeamFormValues>) =>
    onChange({ ...beam, ...change });
  const handleFile = async (file: File | undefined) => {
    if (!file) return;
    set({ spectrumCsv: await file.text(), fileName: file.name });
  };
  return (
    <>
      <SelectField
        label="Beam"
        value={beam.kind}
        onChange={(e) =>
          set({ kind: e.target.value as BeamFormValues['kind'] })
        }
      >
        <option value="energy">Single energy</option>
        <option value="kramers">Spectrum from kV (Kramers model)</option>
        <option value="spectrum">Spectrum file (energy_keV,fluence)</option>
      </SelectField>
      {beam.kind === 'energy' && (
        <TextField
          label="Energy (keV)"
          inputMode="decimal"
          value={beam.energyKeV}
          onChange={(e) => set({ energyKeV: e.target.value })}
          error={error?.fieldMessage('beam.energyKeV')}
        />
      )}
      {beam.kind === 'kramers' && (
        <>
          <TextField
            label="Tube voltage (kV)"
            inputMode="decimal"
            value={beam.kvp}
            onChange={(e) => set({ kvp: e.target.value })}
            error={error?.fieldMessage('beam.kvp')}
          />
          <TextField
            label="Total filtration (mm Al)"
            inputMode="decimal"
            value={beam.totalFiltrationMmAl}
            hint="2.5 mm Al is the usual minimum (from memory of IEC 60601-1-3)."
            onChange={(e) => set({ totalFiltrationMmAl: e.target.value })}
            error={error?.fieldMessage('beam.totalFiltrationMmAl')}
          />
        </>
      )}
      {beam.kind === 'spectrum' && (
        <TextField
          label="Spectrum file"
          type="file"
          accept=".csv,.txt,text/csv,text/plain"
          hint={
            beam.fileName
              ? `Loaded ${beam.fileName}.`
              : 'One energy_keV,fluence pair a line.'
          }
          onChange={(e) => void handleFile(e.target.files?.[0])}
          error={error?.fieldMessage('beam.spectrumCsv')}
        />
      )}
      {beam.kind !== 'energy' && (
        <SelectField
          label="Spectrum weighting"
          value={beam.weighting}
          onChange={(e) =>
            set({ weighting: e.target.value as BeamFormValues['weighting'] })
          }
        >
          <option value="energy">Energy (energy-integrating detector)</option>
          <option value="photons">Photons (counting detector)</option>
        </SelectField>
      )}
    </>
  );
}
