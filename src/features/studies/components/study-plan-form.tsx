import { useId, useState, type FormEvent } from 'react';
import {
  AEC_CHAMBERS,
  PHANTOM_MATERIALS,
  studyPlanSchema,
  type CreateStudyInput,
  type PhantomMaterial,
} from '../../../../shared/schemas/study.schema.ts';
import { PHANTOM_MATERIAL_NAMES } from '../../../../shared/studies/condition-label.ts';
import {
  expectedAcquisitionCount,
  MAX_EXPECTED_ACQUISITIONS,
} from '../../../../shared/studies/expected-acquisitions.ts';
import type { StudyOptionsDto } from '../../../../shared/studies/study-dto.ts';
import { Button } from '../../../components/ui/button.tsx';
import { SelectField, TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { BeamQualityRows } from './beam-quality-rows.tsx';
import { ContrastObjectRows } from './contrast-object-rows.tsx';
import { GridChooser } from './grid-chooser.tsx';
import {
  checkPlanForm,
  errorAt,
  errorsFromApi,
  planFormToInput,
  type FieldErrors,
  type PlanFormState,
} from './plan-form-state.ts';

interface StudyPlanFormProps {
  initial: PlanFormState;
  options: StudyOptionsDto;
  submitLabel: string;
  isPending: boolean;
  serverError: unknown;
  onSubmit: (input: CreateStudyInput) => void;
}

const section = 'space-y-4 rounded-xl bg-white p-6 shadow-sm';

/** The study plan: equipment, phantom, beams, geometry, exposure, replicates. */
export function StudyPlanForm({
  initial,
  options,
  submitLabel,
  isPending,
  serverError,
  onSubmit,
}: StudyPlanFormProps) {
  const purposeId = useId();
  const [form, setForm] = useState(initial);
  const [localErrors, setLocalErrors] = useState<FieldErrors>({});
  const errors = { ...errorsFromApi(serverError), ...localErrors };
  const set = (change: Partial<PlanFormState>) =>
    setForm((f) => ({ ...f, ...change }));
  const roomId = Number(form.roomId);
  const detectors = options.detectors.filter((d) => d.roomId === roomId);

  const parsedPlan = studyPlanSchema.safeParse(
    (planFormToInput(form) as { plan: unknown }).plan,
  );
  const count = parsedPlan.success
    ? expectedAcquisitionCount(parsedPlan.data, form.gridIds.length)
    : null;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    const checked = checkPlanForm(form);
    setLocalErrors(checked.errors ?? {});
    if (checked.input) onSubmit(checked.input);
  };

  const toggleGrid = (id: number) =>
    set({
      gridIds: form.gridIds.includes(id)
        ? form.gridIds.filter((g) => g !== id)
        : [...form.gridIds, id],
    });

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      className="space-y-6"
      aria-label="Study plan"
    >
      <section className={section}>
        <h2 className="text-lg font-semibold text-lamina-950">
          Purpose and equipment
        </h2>
        <TextField
          label="Title"
          value={form.title}
          onChange={(e) => set({ title: e.target.value })}
          error={errors.title}
        />
        <div>
          <label
            htmlFor={purposeId}
            className="block text-sm font-semibold text-slate-700"
          >
            Purpose
          </label>
          <textarea
            id={purposeId}
            rows={3}
            value={form.purpose}
            onChange={(e) => set({ purpose: e.target.value })}
            aria-invalid={errors.purpose ? true : undefined}
            className="mt-1 block w-full rounded-lg border border-slate-300 px-3 py-2 text-sm shadow-sm aria-[invalid=true]:border-red-600"
          />
          {errors.purpose && (
            <p role="alert" className="mt-1 text-xs text-red-700">
              {errors.purpose}
            </p>
          )}
        </div>
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField
            label="Room"
            value={form.roomId}
            onChange={(e) => set({ roomId: e.target.value, detectorId: '' })}
            error={errors.roomId}
          >
            <option value="">Choose a room…</option>
            {options.rooms.map((r) => (
              <option key={r.id} value={r.id}>
                {r.name} ({r.site})
              </option>
            ))}
          </SelectField>
          <SelectField
            label="Detector"
            value={form.detectorId}
            onChange={(e) => set({ detectorId: e.target.value })}
            error={errors.detectorId}
          >
            <option value="">
              {form.roomId ? 'Not named' : 'Choose the room first'}
            </option>
            {detectors.map((d) => (
              <option key={d.id} value={d.id}>
                {d.name}
              </option>
            ))}
          </SelectField>
        </div>
        <GridChooser
          grids={options.grids}
          roomId={form.roomId ? roomId : null}
          selected={form.gridIds}
          error={errors.gridIds}
          onToggle={toggleGrid}
        />
      </section>

      <section className={section}>
        <h2 className="text-lg font-semibold text-lamina-950">Phantom</h2>
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField
            label="Material"
            value={form.phantomMaterial}
            onChange={(e) =>
              set({ phantomMaterial: e.target.value as PhantomMaterial })
            }
          >
            {PHANTOM_MATERIALS.map((m) => (
              <option key={m} value={m}>
                {PHANTOM_MATERIAL_NAMES[m]}
              </option>
            ))}
          </SelectField>
          <TextField
            label="Thicknesses (cm)"
            hint="Separate with commas, e.g. 10, 15, 20, 25."
            value={form.thicknesses}
            onChange={(e) => set({ thicknesses: e.target.value })}
            error={errorAt(errors, 'plan.phantom.thicknessesCm')}
          />
        </div>
        <ContrastObjectRows
          rows={form.objects}
          errors={errors}
          onChange={(objects) => set({ objects })}
        />
      </section>

      <section className={section}>
        <h2 className="text-lg font-semibold text-lamina-950">
          Beam and geometry
        </h2>
        <BeamQualityRows
          rows={form.beams}
          errors={errors}
          onChange={(beams) => set({ beams })}
        />
        <div className="grid gap-4 sm:grid-cols-3">
          <TextField
            label="Source–image distance (cm)"
            inputMode="decimal"
            value={form.sidCm}
            onChange={(e) => set({ sidCm: e.target.value })}
            error={errors['plan.geometry.sidCm']}
          />
          <TextField
            label="Field width (cm)"
            inputMode="decimal"
            value={form.fieldWidthCm}
            onChange={(e) => set({ fieldWidthCm: e.target.value })}
            error={errors['plan.geometry.fieldWidthCm']}
          />
          <TextField
            label="Field height (cm)"
            inputMode="decimal"
            value={form.fieldHeightCm}
            onChange={(e) => set({ fieldHeightCm: e.target.value })}
            error={errors['plan.geometry.fieldHeightCm']}
          />
        </div>
      </section>

      <section className={section}>
        <h2 className="text-lg font-semibold text-lamina-950">Exposures</h2>
        <div
          className="flex gap-6 text-sm"
          role="radiogroup"
          aria-label="Exposure control"
        >
          {(['aec', 'manual'] as const).map((mode) => (
            <label key={mode} className="flex items-center gap-2">
              <input
                type="radio"
                name="exposure-mode"
                checked={form.exposureMode === mode}
                onChange={() => set({ exposureMode: mode })}
              />
              {mode === 'aec'
                ? 'Automatic exposure control'
                : 'Set mAs by hand'}
            </label>
          ))}
        </div>
        <div className="grid gap-4 sm:grid-cols-3">
          {form.exposureMode === 'manual' ? (
            <>
              <TextField
                label="With grid (mAs)"
                inputMode="decimal"
                value={form.gridMas}
                onChange={(e) => set({ gridMas: e.target.value })}
                error={errors['plan.exposure.gridExposureMas']}
              />
              <TextField
                label="Without grid (mAs)"
                inputMode="decimal"
                value={form.noGridMas}
                onChange={(e) => set({ noGridMas: e.target.value })}
                error={errors['plan.exposure.noGridExposureMas']}
                hint="Equal mAs compares at equal tube output; less mAs compares near equal detector dose."
              />
            </>
          ) : (
            <SelectField
              label="AEC chamber"
              value={form.chamber}
              onChange={(e) =>
                set({ chamber: e.target.value as PlanFormState['chamber'] })
              }
            >
              {AEC_CHAMBERS.map((c) => (
                <option key={c} value={c}>
                  {c}
                </option>
              ))}
            </SelectField>
          )}
          <TextField
            label="Replicates per arm"
            inputMode="numeric"
            value={form.replicates}
            onChange={(e) => set({ replicates: e.target.value })}
            error={errors['plan.replicates']}
          />
        </div>
        <p className="text-sm text-slate-700" data-testid="planned-count">
          {count === null
            ? 'Complete the plan to see how many exposures it needs.'
            : `${count} exposures: conditions × 2 arms (with and without grid) × replicates.`}
          {count !== null && count > MAX_EXPECTED_ACQUISITIONS && (
            <span className="ml-1 text-red-700">
              More than {MAX_EXPECTED_ACQUISITIONS} is too many for one study.
            </span>
          )}
        </p>
        {errors.plan && (
          <p role="alert" className="text-sm text-red-700">
            {errors.plan}
          </p>
        )}
      </section>

      {serverError instanceof ApiError && serverError.details.length === 0 && (
        <p role="alert" className="text-sm text-red-700">
          {serverError.message}
        </p>
      )}
      {Object.keys(errors).length > 0 && (
        <p role="alert" className="text-sm text-red-700">
          Some fields need attention; they are marked above.
        </p>
      )}
      <Button type="submit" disabled={isPending}>
        {isPending ? 'Saving…' : submitLabel}
      </Button>
    </form>
  );
}
