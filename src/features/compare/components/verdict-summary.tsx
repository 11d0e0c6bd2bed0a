import type { VerdictSummaryDto } from '../../../../shared/schemas/compare.schema.ts';

const TILES: Array<{
  key: keyof Omit<VerdictSummaryDto, 'sentence'>;
  label: string;
  tone: string;
}> = [
  {
    key: 'benefit',
    label: 'Grid improves CNR at equal dose',
    tone: 'bg-lamina-50 text-lamina-900',
  },
  {
    key: 'noMeasurableBenefit',
    label: 'No measurable benefit',
    tone: 'bg-slate-100 text-slate-800',
  },
  {
    key: 'cost',
    label: 'Grid costs SNR at equal dose',
    tone: 'bg-caution-50 text-caution-900',
  },
  {
    key: 'none',
    label: 'No verdict (no SIF)',
    tone: 'bg-white text-slate-600 ring-1 ring-slate-200',
  },
];

/** How many matching conditions had each verdict, and the sentence. */
export function VerdictSummary({ verdicts }: { verdicts: VerdictSummaryDto }) {
  return (
    <section aria-label="Verdicts" className="space-y-3">
      <p className="text-base text-lamina-950" data-testid="verdict-sentence">
        {verdicts.sentence}
      </p>
      <dl className="grid gap-3 sm:grid-cols-4">
        {TILES.map((tile) => (
          <div key={tile.key} className={`rounded-lg p-3 ${tile.tone}`}>
            <dt className="text-xs">{tile.label}</dt>
            <dd className="text-2xl font-semibold">{verdicts[tile.key]}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
