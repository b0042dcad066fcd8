import type { z } from 'zod';
import { ApiError } from './errors';

export { ApiError, isApiError, fieldErrorsOf, errorFieldRoot } from './errors';

/** Same origin by default: the server serves the bundle and /api together. */
export const baseUrl = process.env.EXPO_PUBLIC_API_URL ?? '';

type Method = 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';

export type RequestOptions<S extends z.ZodType | undefined> = {
  method?: Method;
  body?: unknown;
  /** Parses the answer; without one the answer is not read (204). */
  schema?: S;
  signal?: AbortSignal;
};

function parseErrorBody(status: number, body: unknown): ApiError {
  const err = (body as { error?: { code?: unknown; message?: unknown; field?: unknown } } | null)?.error;
  if (err && typeof err.code === 'string') {
    return new ApiError(
      status,
      err.code,
      typeof err.message === 'string' ? err.message : err.code,
      typeof err.field === 'string' ? err.field : undefined,
    );
  }
  const fallback: Record<number, string> = {
    401: 'Please sign in.',
    403: 'You are not allowed to do this.',
    404: 'Not found.',
    429: 'Too many attempts. Wait a few minutes and try again.',
    503: 'The server cannot reach its database right now. Try again in a moment.',
  };
  return new ApiError(status, 'http_error', fallback[status] ?? `The server answered ${status}.`);
}

/** Calls the API with the session cookie and turns every failure into an ApiError. */
export async function api<S extends z.ZodType | undefined = undefined>(
  path: string,
  { method = 'GET', body, schema, signal }: RequestOptions<S> = {},
): Promise<S extends z.ZodType ? z.infer<S> : void> {
  let res: Response;
  try {
    res = await fetch(`${baseUrl}/api${path}`, {
      method,
      credentials: 'same-origin',
      headers: body === undefined ? { Accept: 'application/json' } : { Accept: 'application/json', 'Content-Type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
      signal,
    });
  } catch (e) {
    if ((e as Error)?.name === 'AbortError') throw e;
    throw new ApiError(0, 'network', 'The server could not be reached. Check the connection and try again.');
  }

  const text = res.status === 204 ? '' : await res.text();
  let json: unknown = null;
  if (text) {
    try {
      json = JSON.parse(text);
    } catch {
      if (!res.ok) throw parseErrorBody(res.status, null);
      throw new ApiError(res.status, 'invalid_response', 'The server sent an answer that is not JSON.');
    }
  }
  if (!res.ok) throw parseErrorBody(res.status, json);
  if (!schema) return undefined as never;

  const parsed = schema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new ApiError(
      res.status,
      'invalid_response',
      `The server's answer to ${method} ${path} did not have the expected shape (${issue?.path.join('.') || 'root'}: ${issue?.message}).`,
    );
  }
  return parsed.data as never;
}
