import type { ZodError } from 'zod';
import {
  createStudySchema,
  type AEC_CHAMBERS,
  type CreateStudyInput,
  type PhantomMaterial,
} from '../../../../shared/schemas/study.schema.ts';
import type { StudyDto } from '../../../../shared/studies/study-dto.ts';
import { ApiError } from '../../../lib/api-client.ts';

export interface BeamRow {
  kvp: string;
  cuMm: string;
  alMm: string;
  hvlMmAl: string;
}

export interface ObjectRow {
  name: string;
  material: string;
  thicknessMm: string;
  diameterMm: string;
}

/** What the plan form holds: text as typed, converted on submit. */
export interface PlanFormState {
  title: string;
  purpose: string;
  roomId: string;
  detectorId: string;
  gridIds: number[];
  phantomMaterial: PhantomMaterial;
  thicknesses: string;
  objects: ObjectRow[];
  beams: BeamRow[];
  sidCm: string;
  fieldWidthCm: string;
  fieldHeightCm: string;
  exposureMode: 'manual' | 'aec';
  gridMas: string;
  noGridMas: string;
  chamber: (typeof AEC_CHAMBERS)[number];
  replicates: string;
}

export const emptyBeam = (): BeamRow => ({
  kvp: '',
  cuMm: '',
  alMm: '',
  hvlMmAl: '',
});

export const emptyObject = (): ObjectRow => ({
  name: '',
  material: '',
  thicknessMm: '',
  diameterMm: '',
});

/** A starting plan: common practice for a general room's grid check. */
export function newPlanForm(): PlanFormState {
  return {
    title: '',
    purpose: '',
    roomId: '',
    detectorId: '',
    gridIds: [],
    phantomMaterial: 'pmma',
    thicknesses: '10, 15, 20',
    objects: [
      {
        name: 'Al disc',
        material: 'aluminium',
        thicknessMm: '1',
        diameterMm: '10',
      },
    ],
    beams: [
      { kvp: '70', cuMm: '', alMm: '', hvlMmAl: '' },
      { kvp: '81', cuMm: '0.1', alMm: '', hvlMmAl: '' },
    ],
    sidCm: '115',
    fieldWidthCm: '30',
    fieldHeightCm: '30',
    exposureMode: 'aec',
    gridMas: '',
    noGridMas: '',
    chamber: 'centre',
    replicates: '3',
  };
}

const text = (n: number | null | undefined) =>
  n === null || n === undefined ? '' : String(n);

/** The form filled from a saved study, for editing. */
export function planFormFrom(study: StudyDto): PlanFormState {
  const { plan } = study;
  const layer = (
    layers: { material: string; thicknessMm: number }[],
    m: string,
  ) => text(layers.find((l) => l.material === m)?.thicknessMm);
  return {
    title: study.title,
    purpose: study.purpose,
    roomId: String(study.room.id),
    detectorId: study.detector ? String(study.detector.id) : '',
    gridIds: study.grids.map((g) => g.id),
    phantomMaterial: plan.phantom.material,
    thicknesses: plan.phantom.thicknessesCm.join(', '),
    objects: plan.phantom.contrastObjects.map((o) => ({
      name: o.name,
      material: o.material,
      thicknessMm: text(o.thicknessMm),
      diameterMm: text(o.diameterMm),
    })),
    beams: plan.beamQualities.map((b) => ({
      kvp: text(b.kvp),
      cuMm: layer(b.addedFiltration, 'Cu'),
      alMm: layer(b.addedFiltration, 'Al'),
      hvlMmAl: text(b.hvlMmAl),
    })),
    sidCm: text(plan.geometry.sidCm),
    fieldWidthCm: text(plan.geometry.fieldWidthCm),
    fieldHeightCm: text(plan.geometry.fieldHeightCm),
    exposureMode: plan.exposure.mode,
    gridMas:
      plan.exposure.mode === 'manual'
        ? text(plan.exposure.gridExposureMas)
        : '',
    noGridMas:
      plan.exposure.mode === 'manual'
        ? text(plan.exposure.noGridExposureMas)
        : '',
    chamber: plan.exposure.mode === 'aec' ? plan.exposure.chamber : 'centre',
    replicates: text(plan.replicates),
  };
}

/** A number from typed text; blank is "not given", anything else is checked by the schema. */
const num = (value: string): number | undefined =>
  value.trim() === '' ? undefined : Number(value.replace(',', '.'));
const optionalNum = (value: string): number | null =>
  value.trim() === '' ? null : Number(value.replace(',', '.'));

/** The form as the API's create body (not yet validated). */
export function planFormToInput(s: PlanFormState): unknown {
  return {
    title: s.title,
    purpose: s.purpose,
    roomId: num(s.roomId),
    detectorId: s.detectorId === '' ? null : Number(s.detectorId),
    gridIds: s.gridIds,
    plan: {
      phantom: {
        material: s.phantomMaterial,
        thicknessesCm: s.thicknesses
          .split(/[\s,;]+/)
          .filter((t) => t.trim() !== '')
          .map(Number),
        contrastObjects: s.objects.map((o) => ({
          name: o.name,
          material: o.material,
          thicknessMm: num(o.thicknessMm),
          diameterMm: optionalNum(o.diameterMm),
        })),
      },
      beamQualities: s.beams.map((b) => ({
        kvp: num(b.kvp),
        addedFiltration: [
          ...(b.cuMm.trim()
            ? [{ material: 'Cu', thicknessMm: num(b.cuMm) }]
            : []),
          ...(b.alMm.trim()
            ? [{ material: 'Al', thicknessMm: num(b.alMm) }]
            : []),
        ],
        hvlMmAl: optionalNum(b.hvlMmAl),
      })),
      geometry: {
        sidCm: num(s.sidCm),
        fieldWidthCm: num(s.fieldWidthCm),
        fieldHeightCm: num(s.fieldHeightCm),
      },
      exposure:
        s.exposureMode === 'manual'
          ? {
              mode: 'manual',
              gridExposureMas: num(s.gridMas),
              noGridExposureMas: num(s.noGridMas),
            }
          : { mode: 'aec', chamber: s.chamber },
      replicates: num(s.replicates),
    },
  };
}

/** Field problems keyed by path ("plan.geometry.sidCm"). */
export type FieldErrors = Record<string, string>;

const fromZod = (error: ZodError): FieldErrors =>
  Object.fromEntries(
    [...error.issues]
      .reverse()
      .map((i) => [i.path.join('.') || '(body)', i.message]),
  );

/** Checks the form with the API's own schema. */
export function checkPlanForm(
  s: PlanFormState,
):
  | { input: CreateStudyInput; errors: null }
  | { input: null; errors: FieldErrors } {
  const result = createStudySchema.safeParse(planFormToInput(s));
  return result.success
    ? { input: result.data, errors: null }
    : { input: null, errors: fromZod(result.error) };
}

/** The server's field details, in the same shape. */
export const errorsFromApi = (error: unknown): FieldErrors =>
  error instanceof ApiError
    ? Object.fromEntries(error.details.map((d) => [d.path, d.message]))
    : {};

/** The first problem at or under `path`. */
export function errorAt(errors: FieldErrors, path: string): string | undefined {
  if (errors[path]) return errors[path];
  const key = Object.keys(errors).find((k) => k.startsWith(`${path}.`));
  return key ? errors[key] : undefined;
}
