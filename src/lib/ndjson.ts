/**
 * The one NDJSON reader of the client: long work answers {"type":"progress",…} lines, then one
 * {"type":"result"} or {"type":"error"} line (server/lib/stream.ts). `apiStream` reads it from
 * fetch; uploads (upload.ts) read it from XMLHttpRequest, whose text grows as it arrives.
 */
import { API, ApiError, toError } from './api';

export interface ProgressEvent {
  phase: string;
  done: number;
  total: number;
  message?: string;
}

/** Feed it text as it arrives; it calls `onProgress` per progress line and keeps the result or the error. */
export class NdjsonReader<T> {
  private buffer = '';
  private result: T | undefined;
  private error: ApiError | undefined;
  constructor(private readonly onProgress: (event: ProgressEvent) => void) {}

  push(text: string) {
    this.buffer += text;
    let nl: number;
    while ((nl = this.buffer.indexOf('\n')) >= 0) {
      const line = this.buffer.slice(0, nl).trim();
      this.buffer = this.buffer.slice(nl + 1);
      if (!line) continue;
      const event = JSON.parse(line);
      if (event.type === 'progress') this.onProgress(event);
      else if (event.type === 'error') this.error = new ApiError(event.status ?? 500, event.error.code, event.error.message, event.error.details);
      else if (event.type === 'result') this.result = event.result as T;
    }
  }

  /** The answer once the stream has ended: its result, or the error it carried. */
  end(): T {
    this.push('\n');
    if (this.error) throw this.error;
    if (this.result === undefined) throw new ApiError(500, 'stream_ended', 'The server ended the answer before it was complete; try again.');
    return this.result;
  }
}

/** A request answered as NDJSON with progress (Accept: application/x-ndjson). */
export async function apiStream<T>(path: string, init: RequestInit, onProgress: (event: ProgressEvent) => void): Promise<T> {
  const res = await fetch(API + path, {
    credentials: 'same-origin',
    ...init,
    headers: { Accept: 'application/x-ndjson', ...(init.headers ?? {}) },
  });
  if (!res.ok) throw await toError(res);
  const reader = new NdjsonReader<T>(onProgress);
  const body = res.body!.getReader();
  const decoder = new TextDecoder();
  for (;;) {
    const { value, done } = await body.read();
    if (value) reader.push(decoder.decode(value, { stream: true }));
    if (done) break;
  }
  return reader.end();
}
