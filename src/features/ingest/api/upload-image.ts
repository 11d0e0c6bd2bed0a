import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ErrorBody } from '../../../../shared/errors.ts';
import type { UploadResponseDto } from '../../../../shared/schemas/image.schema.ts';
import { ApiError } from '../../../lib/api-client.ts';
import { imagesQueryKey } from './get-image.ts';

export interface UploadImageInput {
  file: File;
  studyId?: number;
  /** Called with the fraction (0–1) of the file's bytes sent so far. */
  onProgress?: (fraction: number) => void;
}

function errorOf(xhr: XMLHttpRequest): ApiError {
  let body: Partial<ErrorBody> = {};
  try {
    body = JSON.parse(xhr.responseText) as Partial<ErrorBody>;
  } catch {
    // A proxy's HTML error page: fall back to the status alone.
  }
  return new ApiError(
    xhr.status,
    body.error?.code ?? 'internal_error',
    body.error?.message ?? `The server answered ${xhr.status}.`,
    body.error?.details ?? [],
  );
}

/**
 * Sends one file (a DICOM file or a zip) to POST /api/images with
 * XMLHttpRequest, which unlike fetch reports upload progress.
 * @throws ApiError for a non-200 answer or a network failure.
 */
export function uploadImage({
  file,
  studyId,
  onProgress,
}: UploadImageInput): Promise<UploadResponseDto> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', '/api/images');
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) onProgress?.(event.loaded / event.total);
    };
    xhr.onload = () => {
      if (xhr.status !== 200) {
        reject(errorOf(xhr));
        return;
      }
      onProgress?.(1);
      resolve(
        (JSON.parse(xhr.responseText) as { data: UploadResponseDto }).data,
      );
    };
    xhr.onerror = () =>
      reject(
        new ApiError(
          0,
          'network_error',
          'The server cannot be reached. Check your connection.',
        ),
      );
    const form = new FormData();
    if (studyId !== undefined) form.append('studyId', String(studyId));
    form.append('files', file, file.name);
    xhr.send(form);
  });
}

/** One upload request per call, so each file has its own progress and retry. */
export function useUploadImage() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: uploadImage,
    onSuccess: () => client.invalidateQueries({ queryKey: imagesQueryKey }),
  });
}
