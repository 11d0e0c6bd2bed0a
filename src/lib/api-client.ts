import type { ErrorBody, ErrorCode, ErrorDetail } from '../../shared/errors.ts';

/** A non-2xx answer from the API, with the server's code and field details. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: ErrorCode | 'network_error';
  readonly details: ErrorDetail[];

  constructor(
    status: number,
    code: ApiError['code'],
    message: string,
    details: ErrorDetail[] = [],
  ) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }

  /** The message for one form field, if the server named it. */
  fieldMessage(path: string): string | undefined {
    return this.details.find((d) => d.path === path)?.message;
  }
}

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';

/** Calls the API and returns its `data` member; throws ApiError otherwise. */
export async function apiRequest<T>(
  method: Method,
  url: string,
  body?: unknown,
): Promise<T> {
  let response: Response;
  try {
    response = await fetch(url, {
      method,
      credentials: 'same-origin',
      headers: body === undefined ? {} : { 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch {
    throw new ApiError(
      0,
      'network_error',
      'The server cannot be reached. Check your connection.',
    );
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  const json: unknown = text ? JSON.parse(text) : {};
  if (!response.ok) {
    const error = (json as Partial<ErrorBody>).error;
    throw new ApiError(
      response.status,
      error?.code ?? 'internal_error',
      error?.message ?? `The server answered ${response.status}.`,
      error?.details ?? [],
    );
  }
  return (json as { data: T }).data;
}

export const api = {
  get: <T>(url: string) => apiRequest<T>('GET', url),
  post: <T>(url: string, body?: unknown) =>
    apiRequest<T>('POST', url, body ?? {}),
  patch: <T>(url: string, body: unknown) => apiRequest<T>('PATCH', url, body),
  put: <T>(url: string, body: unknown) => apiRequest<T>('PUT', url, body),
  delete: <T>(url: string) => apiRequest<T>('DELETE', url),
};
