import { useId, useState, type DragEvent } from 'react';
import type { ImageDto } from '../../../../shared/schemas/image.schema.ts';
import { Empty } from '../../../components/ui/page-state.tsx';
import { useUploadQueue, type UploadItem } from '../hooks/use-upload-queue.ts';
import { ProgressBar } from './progress-bar.tsx';
import { UploadResultsTable } from './upload-results-table.tsx';

function statusLine(isBusy: boolean, items: UploadItem[]): string {
  if (isBusy) return 'Uploading…';
  const failed = items.filter((i) => i.status === 'failed').length;
  if (failed === 0) return 'All files sent.';
  return failed === 1
    ? 'One file did not arrive; retry it below.'
    : `${failed} files did not arrive; retry them below.`;
}

export interface UploadDropzoneProps {
  /** The study the images join; it must be a draft or returned. */
  studyId?: number;
  /** Called after each file's request with the images it stored. */
  onUploaded?: (images: ImageDto[]) => void;
}

/**
 * Drop or choose DICOM files (.dcm or without extension) or zips of an
 * exported folder. Each file is its own request with its own progress,
 * outcome and retry.
 */
export function UploadDropzone({ studyId, onUploaded }: UploadDropzoneProps) {
  const inputId = useId();
  const [isOver, setIsOver] = useState(false);
  const queue = useUploadQueue({ studyId, onUploaded });

  const [folderNotice, setFolderNotice] = useState(false);

  const handleDrop = (event: DragEvent<HTMLLabelElement>) => {
    event.preventDefault();
    setIsOver(false);
    const items = [...event.dataTransfer.items].filter(
      (i) => i.kind === 'file',
    );
    // A dropped folder arrives as an empty pseudo-file the server cannot read.
    const isFolder = (item: DataTransferItem) =>
      item.webkitGetAsEntry()?.isDirectory === true;
    setFolderNotice(items.some(isFolder));
    const files = items.flatMap((item) => {
      const file = isFolder(item) ? null : item.getAsFile();
      return file ? [file] : [];
    });
    if (files.length > 0) queue.addFiles(files);
  };

  const counts = queue.items
    .flatMap((i) => i.results)
    .reduce<Record<string, number>>(
      (acc, r) => ({ ...acc, [r.outcome]: (acc[r.outcome] ?? 0) + 1 }),
      {},
    );

  return (
    <section aria-label="Upload DICOM images" className="space-y-4">
      <label
        htmlFor={inputId}
        onDragOver={(event) => {
          event.preventDefault();
          setIsOver(true);
        }}
        onDragLeave={() => setIsOver(false)}
        onDrop={handleDrop}
        data-testid="upload-dropzone"
        className={`flex cursor-pointer flex-col items-center gap-2 rounded-xl border-2 border-dashed p-8 text-center transition-colors ${
          isOver
            ? 'border-lamina-500 bg-lamina-50'
            : 'border-slate-300 bg-white hover:border-lamina-400'
        }`}
      >
        <span className="text-base font-semibold text-lamina-900">
          Drop DICOM files or a zip of an exported folder here
        </span>
        <span className="text-sm text-slate-600">
          or click to choose them. Raw (FOR PROCESSING) images measure best.
        </span>
        <input
          id={inputId}
          type="file"
          multiple
          className="sr-only"
          aria-label="Choose DICOM files or zips"
          onChange={(event) => {
            const files = [...(event.target.files ?? [])];
            event.target.value = '';
            if (files.length > 0) queue.addFiles(files);
          }}
        />
      </label>

      {folderNotice && (
        <p
          role="status"
          className="rounded-lg bg-caution-50 p-3 text-sm text-caution-900"
        >
          Folders cannot be dropped as they are: zip the exported folder and
          drop the zip.
        </p>
      )}
      {queue.items.length === 0 ? (
        <Empty>No files chosen yet.</Empty>
      ) : (
        <>
          <div className="space-y-1">
            <div className="flex justify-between text-sm text-slate-700">
              <span>{statusLine(queue.isBusy, queue.items)}</span>
              <span data-testid="upload-counts">
                {['stored', 'duplicate', 'rejected', 'skipped']
                  .filter((o) => counts[o])
                  .map((o) => `${counts[o]} ${o}`)
                  .join(' · ')}
              </span>
            </div>
            <ProgressBar
              fraction={queue.overallProgress}
              label="Overall upload progress"
            />
          </div>
          <UploadResultsTable items={queue.items} onRetry={queue.retry} />
        </>
      )}
    </section>
  );
}
