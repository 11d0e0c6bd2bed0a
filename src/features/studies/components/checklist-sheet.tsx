import type { ChecklistDto } from '../../../../shared/studies/study-dto.ts';
import { PHANTOM_MATERIAL_NAMES } from '../../../../shared/studies/condition-label.ts';
import { ExpectedAcquisitionsTable } from './expected-acquisitions-table.tsx';

// The app frame (header, navigation) and the page's own buttons are not
// part of the paper copy.
const PRINT_CSS = `@media print {
  header, nav, [data-print="hide"] { display: none !important; }
  main { max-width: none !important; padding: 0 !important; }
  body { background: white !important; }
  @page { margin: 12mm; }
}`;

/** The paper checklist the resident takes into the room. */
export function ChecklistSheet({ checklist }: { checklist: ChecklistDto }) {
  const { study, plan } = checklist;
  return (
    <article
      className="space-y-6 bg-white p-6 text-slate-900 shadow-sm print:p-0 print:shadow-none"
      data-testid="checklist"
    >
      <style>{PRINT_CSS}</style>
      <div className="space-y-1 border-b border-slate-300 pb-4">
        <p className="text-xs uppercase tracking-wide text-slate-500">
          Exposure checklist · revision {study.revision}
        </p>
        <h1 className="text-2xl font-semibold">{study.title}</h1>
        <p className="text-sm">
          {study.room.name} · {study.room.site}
          {study.detector && ` · detector ${study.detector.name}`}
        </p>
        <p className="text-sm">
          Phantom {PHANTOM_MATERIAL_NAMES[plan.phantom.material]} · SID{' '}
          {plan.geometry.sidCm} cm · field {plan.geometry.fieldWidthCm} ×{' '}
          {plan.geometry.fieldHeightCm} cm · {plan.replicates} replicate
          {plan.replicates === 1 ? '' : 's'} per arm · {checklist.steps.length}{' '}
          exposures
        </p>
      </div>
      <section
        aria-label="Cautions"
        className="rounded-lg border-2 border-caution-500 p-4 text-sm"
      >
        <h2 className="font-semibold">Before the first exposure</h2>
        <ul className="mt-1 list-disc space-y-1 pl-5">
          {checklist.cautions.map((c) => (
            <li key={c}>{c}</li>
          ))}
          <li>
            Centre the grid to the beam and check the SID lies inside its
            focusing range.
          </li>
          <li>
            Keep kV, field, SID and phantom position unchanged between the grid
            and no-grid exposures of a pair.
          </li>
        </ul>
      </section>
      <ExpectedAcquisitionsTable steps={checklist.steps} withTicks />
      <div className="grid grid-cols-2 gap-8 pt-8 text-sm">
        <p className="border-t border-slate-400 pt-1">
          Exposures made by, date
        </p>
        <p className="border-t border-slate-400 pt-1">Checked by</p>
      </div>
    </article>
  );
}
