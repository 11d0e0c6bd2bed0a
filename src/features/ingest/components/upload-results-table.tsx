import type {
  UploadOutcome,
  UploadResultDto,
} from '../../../../shared/schemas/image.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { canRetry, type UploadItem } from '../hooks/use-upload-queue.ts';
import { ProgressBar } from './progress-bar.tsx';

const OUTCOME_STYLES: Record<UploadOutcome, string> = {
  stored: 'bg-lamina-100 text-lamina-900',
  duplicate: 'bg-slate-100 text-slate-800',
  rejected: 'bg-red-100 text-red-900',
  skipped: 'bg-slate-100 text-slate-600',
};

const OUTCOME_WORDS: Record<UploadOutcome, string> = {
  stored: 'Stored',
  duplicate: 'Already stored',
  rejected: 'Rejected',
  skipped: 'Skipped',
};

function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 ** 2) return `${(bytes / 1024).toFixed(1)} kB`;
  return `${(bytes / 1024 ** 2).toFixed(1)} MB`;
}

function ResultLine({
  result,
  showName,
}: {
  result: UploadResultDto;
  showName: boolean;
}) {
  return (
    <li className="flex flex-wrap items-baseline gap-2">
      <span
        data-testid="upload-outcome"
        className={`rounded px-2 py-0.5 text-xs font-semibold ${OUTCOME_STYLES[result.outcome]}`}
      >
        {OUTCOME_WORDS[result.outcome]}
      </span>
      {showName && <span className="font-medium">{result.name}</span>}
      {result.imageId !== undefined && (
        <span className="text-slate-500">image {result.imageId}</span>
      )}
      {result.message && (
        <span className="text-slate-600">{result.message}</span>
      )}
      {result.code && (
        <code className="text-xs text-slate-400">{result.code}</code>
      )}
    </li>
  );
}

function StatusCell({ item }: { item: UploadItem }) {
  if (item.status === 'queued')
    return <span className="text-slate-500">Waiting…</span>;
  if (item.status === 'uploading') {
    return (
      <ProgressBar
        fraction={item.progress}
        label={`Upload of ${item.file.name}`}
      />
    );
  }
  if (item.status === 'failed') {
    return (
      <p role="alert" className="text-red-800">
        {item.error?.message ?? 'The upload failed.'}
      </p>
    );
  }
  return (
    <ul className="space-y-1">
      {item.results.map((r) => (
        <ResultLine
          key={r.name}
          result={r}
          showName={item.results.length > 1}
        />
      ))}
    </ul>
  );
}

/** One row per chosen file: size, progress, each outcome with its reason, retry. */
export function UploadResultsTable({
  items,
  onRetry,
}: {
  items: UploadItem[];
  onRetry: (key: string) => void;
}) {
  return (
    <table className="w-full overflow-hidden rounded-xl bg-white text-sm shadow-sm">
      <thead className="bg-lamina-50 text-left text-lamina-900">
        <tr>
          <th className="px-4 py-2">File</th>
          <th className="px-4 py-2">Size</th>
          <th className="w-1/2 px-4 py-2">Outcome</th>
          <th className="px-4 py-2">
            <span className="sr-only">Actions</span>
          </th>
        </tr>
      </thead>
      <tbody>
        {items.map((item) => (
          <tr
            key={item.key}
            className="border-t border-slate-100 align-top"
            data-testid={`upload-row-${item.file.name}`}
            data-status={item.status}
          >
            <td className="px-4 py-2 font-medium break-all">
              {item.file.name}
            </td>
            <td className="px-4 py-2 whitespace-nowrap text-slate-600">
              {formatBytes(item.file.size)}
            </td>
            <td className="px-4 py-2">
              <StatusCell item={item} />
            </td>
            <td className="px-4 py-2 text-right">
              {canRetry(item) && (
                <Button variant="secondary" onClick={() => onRetry(item.key)}>
                  Retry
                </Button>
              )}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
