import { SAFETY_CAUTIONS } from '../../../shared/cautions.ts';

export function SafetyNotice() {
  return (
    <aside
      aria-label="Radiation-safety cautions"
      className="rounded-lg border border-caution-500/40 bg-caution-50 p-4 text-sm text-caution-900"
    >
      <p className="font-semibold">Cautions</p>
      <ul className="mt-1 list-disc space-y-1 pl-5">
        {SAFETY_CAUTIONS.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
    </aside>
  );
}
