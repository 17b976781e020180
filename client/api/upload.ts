import type { z } from 'zod';
import { CSRF_HEADER, CSRF_VALUE, ErrorBody } from '@shared/common';
import { ApiError } from './http';

/**
 * Sends one file as multipart (field "file", as the server's multer expects) and parses the answer
 * with `schema`. XMLHttpRequest rather than fetch: it reports upload progress (0…1).
 */
export function uploadFile<S extends z.ZodType>(path: string, file: Blob, filename: string, schema: S, onProgress?: (fraction: number) => void): Promise<z.infer<S>> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', path);
    xhr.setRequestHeader(CSRF_HEADER, CSRF_VALUE);
    xhr.setRequestHeader('accept', 'application/json');
    xhr.withCredentials = true;
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress?.(e.loaded / e.total);
    };
    xhr.onerror = () => reject(new ApiError('network', 'The server could not be reached. Check the connection and try again.', 0));
    xhr.onload = () => {
      let json: unknown;
      try {
        json = xhr.responseText ? JSON.parse(xhr.responseText) : undefined;
      } catch {
        json = undefined;
      }
      if (xhr.status < 200 || xhr.status >= 300) {
        const body = ErrorBody.safeParse(json);
        reject(body.success ? new ApiError(body.data.error.code, body.data.error.message, xhr.status, body.data.error.details) : new ApiError('http_error', `The server answered ${xhr.status}`, xhr.status));
        return;
      }
      const parsed = schema.safeParse(json);
      if (parsed.success) resolve(parsed.data);
      else reject(new ApiError('bad_response', `Unexpected answer from POST ${path}.`, xhr.status, parsed.error.issues));
    };
    const form = new FormData();
    form.append('file', file, filename);
    xhr.send(form);
  });
}
