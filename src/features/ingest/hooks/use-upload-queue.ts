import { useCallback, useRef, useState } from 'react';
import type {
  ImageDto,
  UploadResultDto,
} from '../../../../shared/schemas/image.schema.ts';
import { ApiError } from '../../../lib/api-client.ts';
import { useUploadImage } from '../api/upload-image.ts';

/** Requests in flight at once: enough to fill the line, few enough to show order. */
const CONCURRENT_UPLOADS = 3;

export type UploadStatus = 'queued' | 'uploading' | 'done' | 'failed';

/** One chosen file and what became of it. */
export interface UploadItem {
  key: string;
  file: File;
  status: UploadStatus;
  /** Fraction of the file's bytes sent, 0–1. */
  progress: number;
  /** The server's results: one for a file, one per member for a zip. */
  results: UploadResultDto[];
  /** Why the request itself failed (network, 413, 409 …). */
  error: ApiError | null;
}

/** True when sending the file again could give a better outcome. */
export const canRetry = (item: UploadItem): boolean =>
  item.status === 'failed' ||
  (item.status === 'done' &&
    item.results.some((r) => r.code === 'internal_error'));

let nextKey = 0;

/**
 * A queue of files sent one request each (a few at a time), with progress
 * per file and overall, and retry of one file without re-sending others.
 *
 * @param onUploaded called after each request with the images it stored.
 */
export function useUploadQueue(options: {
  studyId?: number;
  onUploaded?: (images: ImageDto[]) => void;
}) {
  const { studyId, onUploaded } = options;
  const upload = useUploadImage();
  const [items, setItems] = useState<UploadItem[]>([]);
  const waiting = useRef<UploadItem[]>([]);
  const active = useRef(0);

  const update = useCallback((key: string, change: Partial<UploadItem>) => {
    setItems((list) =>
      list.map((i) => (i.key === key ? { ...i, ...change } : i)),
    );
  }, []);

  const send = useCallback(
    async (item: UploadItem) => {
      update(item.key, {
        status: 'uploading',
        progress: 0,
        results: [],
        error: null,
      });
      try {
        const response = await upload.mutateAsync({
          file: item.file,
          studyId,
          onProgress: (progress) => update(item.key, { progress }),
        });
        update(item.key, {
          status: 'done',
          progress: 1,
          results: response.results,
        });
        const stored = response.results.flatMap((r) =>
          r.outcome === 'stored' && r.image ? [r.image] : [],
        );
        if (stored.length > 0) onUploaded?.(stored);
      } catch (error) {
        update(item.key, {
          status: 'failed',
          error:
            error instanceof ApiError
              ? error
              : new ApiError(
                  0,
                  'network_error',
                  'The upload stopped unexpectedly.',
                ),
        });
      }
    },
    [onUploaded, studyId, update, upload],
  );

  const pump = useCallback(() => {
    while (active.current < CONCURRENT_UPLOADS && waiting.current.length > 0) {
      const item = waiting.current.shift()!;
      active.current += 1;
      void send(item).finally(() => {
        active.current -= 1;
        pump();
      });
    }
  }, [send]);

  const addFiles = useCallback(
    (files: File[]) => {
      const added = files.map((file): UploadItem => ({
        key: `upload-${(nextKey += 1)}`,
        file,
        status: 'queued',
        progress: 0,
        results: [],
        error: null,
      }));
      setItems((list) => [...list, ...added]);
      waiting.current.push(...added);
      pump();
    },
    [pump],
  );

  const retry = useCallback(
    (key: string) => {
      const item = items.find((i) => i.key === key);
      if (!item || !canRetry(item)) return;
      update(key, { status: 'queued', progress: 0, error: null, results: [] });
      waiting.current.push(item);
      pump();
    },
    [items, pump, update],
  );

  const totalBytes = items.reduce((sum, i) => sum + i.file.size, 0);
  const sentBytes = items.reduce((sum, i) => sum + i.file.size * i.progress, 0);
  return {
    items,
    addFiles,
    retry,
    overallProgress: totalBytes > 0 ? sentBytes / totalBytes : 0,
    isBusy: items.some(
      (i) => i.status === 'queued' || i.status === 'uploading',
    ),
  };
}
