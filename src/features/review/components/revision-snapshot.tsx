import { ARM_NAMES } from '../../../../shared/studies/condition-label.ts';
import type { StudyRevisionDto } from '../../../../shared/studies/study-dto.ts';
import { formatDateTime } from './format-date.ts';

/** A signed revision exactly as it was signed. */
export function RevisionSnapshot({ revision }: { revision: StudyRevisionDto }) {
  const { snapshot } = revision;
  const conditionLabel = (id: number) =>
    snapshot.conditions.find((c) => c.id === id)?.label ?? `condition ${id}`;
  return (
    <article className="space-y-6" data-testid="revision-snapshot">
      <section className="rounded-xl bg-white p-6 shadow-sm">
        <p className="text-sm text-slate-600">
          Signed by <strong>{revision.signedBy.displayName}</strong> on{' '}
          {formatDateTime(revision.signedAt)}
          {snapshot.selfSigned && ' (its own author)'}. Prepared by{' '}
          {snapshot.study.createdBy.displayName}.
        </p>
        <dl className="mt-4 grid gap-2 text-sm sm:grid-cols-2">
          <div>
            <dt className="text-slate-500">Purpose</dt>
            <dd>{snapshot.study.purpose}</dd>
          </div>
          <div>
            <dt className="text-slate-500">Room</dt>
            <dd>
              {snapshot.study.room.name}
              {snapshot.study.detector &&
                ` · detector ${snapshot.study.detector.name}`}
            </dd>
          </div>
          <div>
            <dt className="text-slate-500">Grids under test</dt>
            <dd>
              {snapshot.grids
                .map(
                  (g) =>
                    `${g.label}${g.ratio !== null ? ` (${g.ratio}:1)` : ''}`,
                )
                .join(', ')}
            </dd>
          </div>
          <div>
            <dt className="text-slate-500">Replicates and geometry</dt>
            <dd>
              {snapshot.plan.replicates} per arm · SID{' '}
              {snapshot.plan.geometry.sidCm} cm · field{' '}
              {snapshot.plan.geometry.fieldWidthCm} ×{' '}
              {snapshot.plan.geometry.fieldHeightCm} cm
            </dd>
          </div>
        </dl>
      </section>
      <section className="rounded-xl bg-white p-6 shadow-sm">
        <h2 className="text-lg font-semibold text-lamina-950">
          Conditions ({snapshot.conditions.length})
        </h2>
        <ul className="mt-2 list-disc pl-5 text-sm">
          {snapshot.conditions.map((c) => (
            <li key={c.id}>{c.label}</li>
          ))}
        </ul>
      </section>
      <section className="rounded-xl bg-white p-6 shadow-sm">
        <h2 className="text-lg font-semibold text-lamina-950">
          Images as paired ({snapshot.assignments.length})
        </h2>
        {snapshot.assignments.length === 0 ? (
          <p className="mt-2 text-sm text-slate-500">
            No image was paired in this revision.
          </p>
        ) : (
          <table className="mt-2 min-w-full text-left text-sm">
            <thead className="text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th className="py-1 pr-3">File</th>
                <th className="py-1 pr-3">SHA-256</th>
                <th className="py-1 pr-3">Condition</th>
                <th className="py-1 pr-3">Arm</th>
                <th className="py-1 pr-3">Replicate</th>
              </tr>
            </thead>
            <tbody>
              {snapshot.assignments.map((a) => (
                <tr key={a.imageId} className="border-t border-slate-100">
                  <td className="py-1 pr-3">{a.originalName}</td>
                  <td className="py-1 pr-3 font-mono text-xs">
                    {a.sha256.slice(0, 12)}…
                  </td>
                  <td className="py-1 pr-3">{conditionLabel(a.conditionId)}</td>
                  <td className="py-1 pr-3">{ARM_NAMES[a.arm]}</td>
                  <td className="py-1 pr-3 tabular-nums">{a.replicate}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </article>
  );
}
