import { partUploadSchema, type Part, type RejectedFile } from '../queries/parts';
import { api, isApiError } from '../api/client';
import { jobAcceptedSchema, jobViewSchema, type JobView } from '../../shared/schemas/jobs';
import type { PickedFile } from './types';

/** Same origin by default, as the API client. */
const baseUrl = process.env.EXPO_PUBLIC_API_URL ?? '';

export type UploadOutcome =
  | { ok: true; parts: Part[]; rejected: RejectedFile[] }
  | { ok: false; message: string; code: string; rejected: RejectedFile[] };

export type UploadFields = { unit: 'mm' | 'cm' | 'inch'; split: boolean };

/** Where a file the server put on its measuring queue stands. */
export type JobProgress = { state: 'queued' | 'running'; finished: number; total: number };

/** How often a queued upload's job is asked about. */
const JOB_POLL_MS = 1000;

/**
 * Follows a job the server answered 202 with until it is done (its parts and
 * refused files) or failed (why). A lost connection is retried, not fatal:
 * the job goes on on the server either way.
 */
async function followJob(labId: string, jobId: string, onJob: (p: JobProgress) => void, signal: AbortSignal): Promise<UploadOutcome> {
  let misses = 0;
  for (;;) {
    await new Promise((r) => setTimeout(r, JOB_POLL_MS));
    if (signal.aborted) return { ok: false, code: 'aborted', message: 'Stopped following the upload; the server goes on measuring it and its parts will appear in the library.', rejected: [] };
    let view: JobView;
    try {
      view = await api(`/labs/${labId}/jobs/${jobId}`, { schema: jobViewSchema, signal });
      misses = 0;
    } catch (e) {
      if ((e as Error)?.name === 'AbortError') continue;
      if (isApiError(e) && e.code === 'network' && ++misses < 30) continue;
      return { ok: false, code: isApiError(e) ? e.code : 'http_error', message: (e as Error).message, rejected: [] };
    }
    const { state, files } = view.job;
    if (state === 'done') return { ok: true, parts: view.parts ?? [], rejected: view.rejected ?? [] };
    if (state === 'failed') return { ok: false, code: view.error?.code ?? 'invalid_file', message: view.error?.message ?? 'None of the files could be used.', rejected: view.rejected ?? [] };
    onJob({ state, finished: files.finished, total: files.total });
  }
}

/**
 * Sends one file as its own multipart request. XMLHttpRequest rather than
 * fetch because only it reports upload progress; one request a file so each
 * gets its own bar and one bad file cannot hide the others' results. When
 * the server queues the file (202: its measuring takes longer than the
 * server waits), the job is followed until it is done.
 */
export function uploadPartFile(
  labId: string,
  file: PickedFile,
  fields: UploadFields,
  onProgress: (fraction: number) => void,
  onJob: (progress: JobProgress) => void = () => {},
): { promise: Promise<UploadOutcome>; abort: () => void } {
  const xhr = new XMLHttpRequest();
  const following = new AbortController();
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
      if (xhr.status === 202) {
        const accepted = jobAcceptedSchema.safeParse(json);
        if (!accepted.success) return resolve({ ok: false, code: 'invalid_response', message: `The server's answer about ${file.name} did not have the expected shape.`, rejected: [] });
        const { id, state } = accepted.data.job;
        if (state === 'queued' || state === 'running') onJob({ state, finished: 0, total: 1 });
        return resolve(followJob(labId, id, onJob, following.signal));
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
  return {
    promise,
    abort: () => {
      xhr.abort();
      following.abort();
    },
  };
}
