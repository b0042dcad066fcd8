import { partUploadSchema, type Part, type RejectedFile } from '../queries/parts';
import type { PickedFile } from './types';

/** Same origin by default, as the API client. */
const baseUrl = process.env.EXPO_PUBLIC_API_URL ?? '';

export type UploadOutcome =
  | { ok: true; parts: Part[]; rejected: RejectedFile[] }
  | { ok: false; message: string; code: string; rejected: RejectedFile[] };

export type UploadFields = { unit: 'mm' | 'cm' | 'inch'; split: boolean };

/**
 * Sends one file as its own multipart request. XMLHttpRequest rather than
 * fetch because only it reports upload progress; one request a file so each
 * gets its own bar and one bad file cannot hide the others' results.
 */
export function uploadPartFile(
  labId: string,
  file: PickedFile,
  fields: UploadFields,
  onProgress: (fraction: number) => void,
): { promise: Promise<UploadOutcome>; abort: () => void } {
  const xhr = new XMLHttpRequest();
  const promise = new Promise<UploadOutcome>((resolve) => {
    const form = new FormData();
    // The text fields go first: the server reads them before it streams the file.
    form.append('unit', fields.unit);
    form.append('split', String(fields.split));
    // React Native's FormData takes { uri, name, type }; the DOM's takes a Blob and a name.
    if (typeof Blob !== 'undefined' && file.body instanceof Blob) form.append('file', file.body, file.name);
    else form.append('file', file.body as unknown as Blob);

    xhr.open('POST', `${baseUrl}/api/labs/${labId}/parts`);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) onProgress(e.loaded / e.total);
    };
    xhr.onerror = () =>
      resolve({ ok: false, code: 'network', message: `${file.name} could not be sent: the server could not be reached. Check the connection and try again.`, rejected: [] });
    xhr.onabort = () => resolve({ ok: false, code: 'aborted', message: `${file.name}: upload cancelled.`, rejected: [] });
    xhr.onload = () => {
      let json: unknown = null;
      try {
        json = xhr.responseText ? JSON.parse(xhr.responseText) : null;
      } catch {
        json = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        const parsed = partUploadSchema.safeParse(json);
        if (parsed.success) return resolve({ ok: true, ...parsed.data });
        return resolve({ ok: false, code: 'invalid_response', message: `The server's answer about ${file.name} did not have the expected shape.`, rejected: [] });
      }
      const err = (json as { error?: { code?: string; message?: string; rejected?: RejectedFile[] } } | null)?.error;
      const fallback =
        xhr.status === 403
          ? 'Your roles in this lab do not allow uploading parts.'
          : xhr.status === 413
            ? `${file.name} is larger than the upload limit.`
            : `The server answered ${xhr.status} for ${file.name}.`;
      resolve({
        ok: false,
        code: err?.code ?? 'http_error',
        message: err?.message ?? fallback,
        rejected: Array.isArray(err?.rejected) ? err.rejected : [],
      });
    };
    xhr.send(form);
  });
  return { promise, abort: () => xhr.abort() };
}
