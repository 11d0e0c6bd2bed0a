import type { ReactNode } from 'react';
import { PHANTOM_MATERIAL_NAMES } from '../../../../shared/studies/condition-label.ts';
import {
  describeFiltration,
  expectedAcquisitionCount,
} from '../../../../shared/studies/expected-acquisitions.ts';
import type { StudyDto } from '../../../../shared/studies/study-dto.ts';

function Row({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="grid gap-1 py-2 sm:grid-cols-3">
      <dt className="text-sm text-slate-500">{label}</dt>
      <dd className="text-sm text-slate-900 sm:col-span-2">{children}</dd>
    </div>
  );
}

/** The plan in words: equipment, phantom, beams, geometry, exposure. */
export function PlanSummary({ study }: { study: StudyDto }) {
  const { plan } = study;
  const e = plan.exposure;
  return (
    <dl className="divide-y divide-slate-100" aria-label="Plan">
      <Row label="Purpose">{study.purpose}</Row>
      <Row label="Room">
        {study.room.name} · {study.room.site}
      </Row>
      <Row label="Detector">{study.detector?.name ?? 'not named'}</Row>
      <Row label="Grids under test">
        <ul className="space-y-1">
          {study.grids.map((g) => (
            <li key={g.id}>
              <span className="font-semibold">{g.label}</span>
              {g.ratio !== null && ` · ratio ${g.ratio}:1`}
              {g.stripFrequencyPerCm !== null &&
                ` · ${g.stripFrequencyPerCm} lines/cm`}
              {g.focusDistanceCm !== null &&
                ` · focused at ${g.focusDistanceCm} cm`}
            </li>
          ))}
        </ul>
      </Row>
      <Row label="Phantom">
        {PHANTOM_MATERIAL_NAMES[plan.phantom.material]},{' '}
        {plan.phantom.thicknessesCm.join(', ')} cm
        {plan.phantom.contrastObjects.length > 0 && (
          <ul className="mt-1 list-disc pl-5 text-slate-700">
            {plan.phantom.contrastObjects.map((o) => (
              <li key={o.name}>
                {o.name}: {o.thicknessMm} mm {o.material}
                {o.diameterMm !== null && `, ⌀ ${o.diameterMm} mm`}
              </li>
            ))}
          </ul>
        )}
      </Row>
      <Row label="Beam qualities">
        <ul className="space-y-1">
          {plan.beamQualities.map((b) => (
            <li key={`${b.kvp}-${describeFiltration(b.addedFiltration)}`}>
              {b.kvp} kV, added filtration{' '}
              {describeFiltration(b.addedFiltration)}
              {b.hvlMmAl !== null && `, HVL ${b.hvlMmAl} mm Al`}
            </li>
          ))}
        </ul>
      </Row>
      <Row label="Geometry">
        SID {plan.geometry.sidCm} cm, field {plan.geometry.fieldWidthCm} ×{' '}
        {plan.geometry.fieldHeightCm} cm
      </Row>
      <Row label="Exposure">
        {e.mode === 'aec'
          ? `Automatic exposure control, ${e.chamber} chamber`
          : `${e.gridExposureMas} mAs with grid, ${e.noGridExposureMas} mAs without`}
      </Row>
      <Row label="Replicates">{plan.replicates} per arm</Row>
      <Row label="Expected exposures">
        {study.conditions.length} conditions × 2 arms × {plan.replicates} ={' '}
        <strong data-testid="expected-count">
          {expectedAcquisitionCount(plan, study.grids.length)}
        </strong>
      </Row>
    </dl>
  );
}
