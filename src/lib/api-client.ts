/** An error answered by the API, in its one shape {error: {code, message, details?}}. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details: unknown;

  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  signal?: AbortSignal;
}

/** Calls the API with the session cookie and JSON, and throws an ApiError on any non-2xx answer. */
export async function api<T>(path: string, options: RequestOptions = {}): Promise<T> {
  const isForm = options.body instanceof FormData;
  let response: Response;
  try {
    response = await fetch(`/api${path}`, {
      method: options.method ?? 'GET',
      credentials: 'same-origin',
      headers:
        options.body === undefined || isForm
          ? { accept: 'application/json' }
          : { 'content-type': 'application/json', accept: 'application/json' },
      body: options.body === undefined ? undefined : isForm ? (options.body as FormData) : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (error) {
    if (options.signal?.aborted) throw error;
    throw new ApiError(0, 'network', 'Panelwise could not be reached. Check the connection and try again.');
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text().catch(() => '');
  let data: unknown;
  try {
    data = text ? JSON.parse(text) : undefined;
  } catch {
    // Not our JSON (a proxy's error page, say): the status still tells what happened.
    if (response.ok) throw new ApiError(response.status, 'bad_response', 'The server sent an answer Panelwise could not read. Try again.');
    data = undefined;
  }
  if (!response.ok) {
    const error = (data as { error?: { code?: string; message?: string; details?: unknown } } | undefined)?.error;
    const fallback =
      response.status >= 500
        ? 'The server could not answer just now. Try again in a moment.'
        : response.statusText || `The request was refused (${response.status})`;
    throw new ApiError(response.status, error?.code ?? 'unknown', error?.message ?? fallback, error?.details);
  }
  return data as T;
}
