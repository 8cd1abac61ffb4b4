/**
 * Uploads with progress: XMLHttpRequest reports the bytes sent, and an NDJSON answer reports the
 * server's phases (reading, checking, storing) line by line as they arrive. `useUpload` wraps it
 * as a TanStack mutation with its progress.
 */
import { useMutation } from '@tanstack/react-query';
import { useState } from 'react';
import { API, ApiError } from './api';
import { NdjsonReader } from './ndjson';

export interface UploadProgress {
  phase: 'uploading' | 'reading' | 'checking' | 'storing' | 'done';
  fraction: number | null;
  message?: string;
}

function errorOf(xhr: XMLHttpRequest): ApiError {
  try {
    const body = JSON.parse(xhr.responseText);
    return new ApiError(xhr.status, body.error?.code ?? 'http_error', body.error?.message ?? `The server answered ${xhr.status}.`, body.error?.details);
  } catch {
    return new ApiError(xhr.status, 'http_error', `The server answered ${xhr.status}.`);
  }
}

export function upload<T>(path: string, form: FormData, onProgress: (p: UploadProgress) => void, opts: { stream?: boolean } = {}): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', API + path);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', opts.stream ? 'application/x-ndjson' : 'application/json');
    const reader = new NdjsonReader<T>((ev) => onProgress({ phase: ev.phase as UploadProgress['phase'], fraction: ev.total ? ev.done / ev.total : null }));
    let seen = 0;
    const read = () => {
      reader.push(xhr.responseText.slice(seen));
      seen = xhr.responseText.length;
    };
    xhr.upload.onprogress = (e) => onProgress({ phase: 'uploading', fraction: e.lengthComputable ? e.loaded / e.total : null });
    xhr.upload.onload = () => onProgress({ phase: 'reading', fraction: null });
    xhr.onprogress = () => {
      if (opts.stream && xhr.status === 200) read();
    };
    xhr.onerror = () => reject(new ApiError(0, 'network_error', 'The upload failed: the server could not be reached.'));
    xhr.onload = () => {
      if (xhr.status < 200 || xhr.status >= 300) return reject(errorOf(xhr));
      try {
        const result = opts.stream ? (read(), reader.end()) : (JSON.parse(xhr.responseText) as T);
        onProgress({ phase: 'done', fraction: 1 });
        resolve(result);
      } catch (error) {
        reject(error instanceof ApiError ? error : new ApiError(xhr.status, 'bad_answer', 'The server answered with something that is not JSON.'));
      }
    };
    xhr.send(form);
  });
}

/** An upload as a mutation: `mutate({ path, form })`, with `progress` while it runs. */
export function useUpload<T>(opts: { stream?: boolean; onSuccess?: (result: T) => void } = {}) {
  const [progress, setProgress] = useState<UploadProgress | null>(null);
  const mutation = useMutation({
    mutationFn: ({ path, form }: { path: string; form: FormData }) => upload<T>(path, form, setProgress, { stream: opts.stream }).finally(() => setProgress(null)),
    onSuccess: opts.onSuccess,
  });
  return { ...mutation, progress };
}
