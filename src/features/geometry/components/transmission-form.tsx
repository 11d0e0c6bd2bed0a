import { useState, type FormEvent } from 'react';
import type { MaterialId } from '../../../../shared/physics/attenuation.ts';
import type {
  BeamRequest,
  TransmissionRequestInput,
} from '../../../../shared/schemas/geometry-api.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import type { ApiError } from '../../../lib/api-client.ts';
import {
  BeamFields,
  INITIAL_BEAM,
  type BeamFormValues,
} from './beam-fields.tsx';
import { parseNumberField } from './format.ts';
import { GridPicker, type GridChoice } from './grid-picker.tsx';
import { MaterialSelect } from './material-select.tsx';

const CONSTRUCTION = {
  ratio: 'Grid ratio r',
  stripFrequencyPerCm: 'Strip frequency N (lines/cm)',
  stripHeightUm: 'Strip height h (µm)',
  interspaceWidthUm: 'Interspace width D (µm)',
  stripThicknessUm: 'Strip thickness t (µm)',
} as const;
type ConstructionField = keyof typeof CONSTRUCTION;

function beamRequest(beam: BeamFormValues): BeamRequest {
  const n = parseNumberField;
  // Empty fields go out as undefined; the server names each one it needs.
  if (beam.kind === 'energy') {
    return { kind: 'energy', energyKeV: n(beam.energyKeV)! };
  }
  if (beam.kind === 'kramers') {
    return {
      kind: 'kramers',
      kvp: n(beam.kvp)!,
      totalFiltrationMmAl: n(beam.totalFiltrationMmAl)!,
      weighting: beam.weighting,
    };
  }
  return {
    kind: 'spectrum',
    spectrumCsv: beam.spectrumCsv,
    fileName: beam.fileName || undefined,
    weighting: beam.weighting,
  };
}

/** Construction (typed or from the register), materials, beam and SPR. */
export function TransmissionForm({
  onSubmit,
  isPending,
  error,
}: {
  onSubmit: (input: TransmissionRequestInput) => void;
  isPending: boolean;
  error: ApiError | null;
}) {
  const [grid, setGrid] = useState<GridChoice>('typed');
  const [construction, setConstruction] = useState<
    Record<ConstructionField, string>
  >({
    ratio: '12',
    stripFrequencyPerCm: '40',
    stripHeightUm: '',
    interspaceWidthUm: '',
    stripThicknessUm: '36',
  });
  const [stripMaterial, setStripMaterial] = useState<MaterialId | ''>('lead');
  const [interspace, setInterspace] = useState<MaterialId | ''>('aluminium');
  const [cover, setCover] = useState<MaterialId | ''>('');
  const [coverUm, setCoverUm] = useState('');
  const [beam, setBeam] = useState(INITIAL_BEAM);
  const [spr, setSpr] = useState('4');
  const isTyped = grid === 'typed';

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    const typed = Object.fromEntries(
      Object.keys(CONSTRUCTION).map((k) => [
        k,
        parseNumberField(construction[k as ConstructionField]),
      ]),
    );
    onSubmit({
      ...(isTyped
        ? {
            construction: typed,
            stripMaterial: stripMaterial || undefined,
            interspaceMaterial: interspace || undefined,
          }
        : { gridId: grid }),
      coverPlates: cover
        ? [{ material: cover, thicknessUm: parseNumberField(coverUm)! }]
        : [],
      beam: beamRequest(beam),
      scatterToPrimaryRatio: parseNumberField(spr)!,
    });
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label="Predicted transmission"
      className="grid gap-4 rounded-xl bg-white p-6 shadow-sm md:grid-cols-4"
    >
      <div className="md:col-span-2">
        <GridPicker
          value={grid}
          error={error?.fieldMessage('gridId')}
          onChange={(choice) => setGrid(choice)}
        />
      </div>
      {isTyped && (
        <p className="self-end pb-2 text-xs text-slate-500 md:col-span-2">
          Give any three of r, N, h, D and t; the rest are derived.
        </p>
      )}
      {isTyped &&
        (Object.keys(CONSTRUCTION) as ConstructionField[]).map((key) => (
          <TextField
            key={key}
            label={CONSTRUCTION[key]}
            inputMode="decimal"
            value={construction[key]}
            onChange={(e) =>
              setConstruction({ ...construction, [key]: e.target.value })
            }
            error={error?.fieldMessage(`construction.${key}`)}
          />
        ))}
      {isTyped && (
        <>
          <MaterialSelect
            label="Strip material"
            value={stripMaterial}
            onChange={setStripMaterial}
            error={error?.fieldMessage('stripMaterial')}
          />
          <MaterialSelect
            label="Interspace material"
            value={interspace}
            onChange={setInterspace}
            error={error?.fieldMessage('interspaceMaterial')}
          />
        </>
      )}
      <MaterialSelect
        label="Cover plates"
        value={cover}
        onChange={setCover}
        noneLabel="None"
      />
      <TextField
        label="Cover thickness, front + back (µm)"
        inputMode="decimal"
        value={coverUm}
        disabled={!cover}
        onChange={(e) => setCoverUm(e.target.value)}
        error={error?.fieldMessage('coverPlates.0.thicknessUm')}
      />
      <BeamFields beam={beam} onChange={setBeam} error={error} />
      <TextField
        label="Scatter-to-primary ratio (assumed)"
        inputMode="decimal"
        value={spr}
        hint="S/P without the grid; Tt, K, B and SIF depend on it."
        onChange={(e) => setSpr(e.target.value)}
        error={error?.fieldMessage('scatterToPrimaryRatio')}
      />
      <div className="flex items-end">
        <Button type="submit" disabled={isPending}>
          Predict
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
