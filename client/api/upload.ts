import type { z } from 'zod';
import { CSRF_HEADER, CSRF_VALUE } from '@shared/common';
import { badResponse, errorFromAnswer, networkError, parseJsonText } from './http';

/**
 * Sends one file as multipart (field "file", as the server's multer expects) and parses the answer
 * with `schema`. XMLHttpRequest rather than fetch: it reports upload progress (0…1).
 */
export function uploadFile<S extends z.ZodType>(
  path: string,
  file: Blob,
  filename: string,
  schema: S,
  onProgress?: (fraction: number) => void,
): Promise<z.infer<S>> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', path);
    xhr.setRequestHeader(CSRF_HEADER, CSRF_VALUE);
    xhr.setRequestHeader('accept', 'application/json');
    xhr.withCredentials = true;
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress?.(e.loaded / e.total);
    };
    xhr.onerror = () => reject(networkError());
    xhr.onload = () => {
      const json = parseJsonText(xhr.responseText);
      if (xhr.status < 200 || xhr.status >= 300) {
        reject(errorFromAnswer(xhr.status, xhr.statusText, json));
        return;
      }
      const parsed = schema.safeParse(json);
      if (parsed.success) resolve(parsed.data);
      else reject(badResponse('POST', path, xhr.status, parsed.error.issues));
    };
    const form = new FormData();
    form.append('file', file, filename);
    xhr.send(form);
  });
}
