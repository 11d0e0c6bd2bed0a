import {
  boardCsvUrl,
  boardPdfUrl,
  type BoardFilters,
} from '../api/compare-query.ts';

const LINK =
  'inline-flex items-center rounded-lg px-3 py-2 text-sm font-semibold text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50';

/** The board as CSV (every figure shown) and as a PDF for a committee. */
export function BoardDownloads({ filters }: { filters: BoardFilters }) {
  return (
    <div className="flex flex-wrap gap-2">
      <a className={LINK} href={boardCsvUrl(filters)} download>
        Download CSV
      </a>
      <a className={LINK} href={boardPdfUrl(filters)} download>
        Download PDF report
      </a>
    </div>
  );
}
