/** The client's HTTP helper: JSON in and out, errors in the API.md shape turned into ApiError. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

export const API = '/api/v1';

async function toError(res: Response): Promise<ApiError> {
  try {
    const body = await res.json();
    if (body?.error?.message) return new ApiError(res.status, body.error.code, body.error.message, body.error.details);
  } catch {
    /* not JSON */
  }
  return new ApiError(res.status, 'http_error', `The server answered ${res.status} ${res.statusText}.`);
}

export async function api<T>(path: string, init: RequestInit & { json?: unknown } = {}): Promise<T> {
  const { json, headers, ...rest } = init;
  const res = await fetch(API + path, {
    credentials: 'same-origin',
    ...rest,
    headers: {
      Accept: 'application/json',
      ...(json !== undefined ? { 'Content-Type': 'application/json' } : {}),
      ...headers,
    },
    body: json !== undefined ? JSON.stringify(json) : rest.body,
  });
  if (!res.ok) throw await toError(res);
  if (res.status === 204) return undefined as T;
  return (await res.json()) as T;
}

/** Reads an NDJSON stream of {type:"progress"|"result"|"error"} events. */
export async function apiStream<T>(
  path: string,
  init: RequestInit,
  onProgress: (event: { phase: string; done: number; total: number; message?: string }) => void,
): Promise<T> {
  const res = await fetch(API + path, {
    credentials: 'same-origin',
    ...init,
    headers: { Accept: 'application/x-ndjson', ...(init.headers ?? {}) },
  });
  if (!res.ok) throw await toError(res);
  const reader = res.body!.getReader();
  const decoder = new TextDecoder();
  let buffer = '';
  let result: T | undefined;
  for (;;) {
    const { value, done } = await reader.read();
    if (value) buffer += decoder.decode(value, { stream: true });
    let nl: number;
    while ((nl = buffer.indexOf('\n')) >= 0) {
      const line = buffer.slice(0, nl).trim();
      buffer = buffer.slice(nl + 1);
      if (!line) continue;
      const event = JSON.parse(line);
      if (event.type === 'progress') onProgress(event);
      else if (event.type === 'error') throw new ApiError(event.status ?? 500, event.error.code, event.error.message, event.error.details);
      else if (event.type === 'result') result = event.result as T;
    }
    if (done) break;
  }
  if (result === undefined) throw new ApiError(500, 'stream_ended', 'The server ended the answer before it was complete; try again.');
  return result;
}

/** Downloads a URL (same origin) as a file. */
export function downloadUrl(url: string, filename?: string) {
  const a = document.createElement('a');
  a.href = url;
  if (filename) a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
}

export function downloadBlob(blob: Blob, filename: string) {
  const url = URL.createObjectURL(blob);
  downloadUrl(url, filename);
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
