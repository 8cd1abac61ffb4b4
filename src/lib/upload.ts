/**
 * Uploads with progress: XMLHttpRequest reports the bytes sent, and an NDJSON answer reports the
 * server's phases (reading, checking, storing) line by line as they arrive.
 */
import { API, ApiError } from './api';

export interface UploadProgress {
  phase: 'uploading' | 'reading' | 'checking' | 'storing' | 'done';
  fraction: number | null;
  message?: string;
}

export function upload<T>(path: string, form: FormData, onProgress: (p: UploadProgress) => void, opts: { stream?: boolean } = {}): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', API + path);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', opts.stream ? 'application/x-ndjson' : 'application/json');
    let seen = 0;
    let result: T | undefined;
    let streamError: ApiError | undefined;
    const readLines = () => {
      const text = xhr.responseText;
      let nl: number;
      while ((nl = text.indexOf('\n', seen)) >= 0) {
        const line = text.slice(seen, nl).trim();
        seen = nl + 1;
        if (!line) continue;
        try {
          const ev = JSON.parse(line);
          if (ev.type === 'progress') onProgress({ phase: ev.phase, fraction: ev.total ? ev.done / ev.total : null });
          else if (ev.type === 'result') result = ev.result;
          else if (ev.type === 'error') streamError = new ApiError(ev.status ?? 500, ev.error.code, ev.error.message, ev.error.details);
        } catch {
          /* partial line */
        }
      }
    };
    xhr.upload.onprogress = (e) => onProgress({ phase: 'uploading', fraction: e.lengthComputable ? e.loaded / e.total : null });
    xhr.upload.onload = () => onProgress({ phase: 'reading', fraction: null });
    xhr.onprogress = () => {
      if (opts.stream && xhr.status === 200) readLines();
    };
    xhr.onerror = () => reject(new ApiError(0, 'network_error', 'The upload failed: the server could not be reached.'));
    xhr.onload = () => {
      if (xhr.status >= 200 && xhr.status < 300) {
        if (opts.stream) {
          readLines();
          if (streamError) return reject(streamError);
          if (result === undefined) return reject(new ApiError(500, 'stream_ended', 'The server ended the answer early; try again.'));
          onProgress({ phase: 'done', fraction: 1 });
          return resolve(result);
        }
        onProgress({ phase: 'done', fraction: 1 });
        try {
          resolve(JSON.parse(xhr.responseText));
        } catch {
          reject(new ApiError(xhr.status, 'bad_answer', 'The server answered with something that is not JSON.'));
        }
        return;
      }
      try {
        const body = JSON.parse(xhr.responseText);
        reject(new ApiError(xhr.status, body.error?.code ?? 'http_error', body.error?.message ?? `The server answered ${xhr.status}.`, body.error?.details));
      } catch {
        reject(new ApiError(xhr.status, 'http_error', `The server answered ${xhr.status}.`));
      }
    };
    xhr.send(form);
  });
}
