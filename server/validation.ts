/**
 * A failed zod parse as the app's one error shape: a 400 that names the
 * field. Outside the http folder, so that any layer may use it.
 */
import type { z } from 'zod';
import { AppError } from './errors';

/** `lines[2].quantity` from a zod path. */
export function fieldPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const p of path) out += typeof p === 'number' ? `[${p}]` : out ? `.${String(p)}` : String(p);
  return out;
}

/** The first problem of a failed parse as a 400 naming its field. */
export function toAppError(error: z.ZodError, root?: string): AppError {
  const issue = error.issues[0];
  let path = fieldPath(issue.path);
  let message = issue.message;
  if (issue.code === 'unrecognized_keys') {
    const key = issue.keys[0];
    path = path ? `${path}.${key}` : key;
    message = 'is not a known field';
  }
  if (root) path = path ? `${root}.${path}` : root;
  const text = !path ? message : /^[a-z]/.test(message) ? `${path} ${message}` : `${path}: ${message}`;
  return new AppError(400, 'invalid_input', text, path || undefined);
}

export function parseOrThrow<S extends z.ZodType>(schema: S, value: unknown, root?: string): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) throw toAppError(result.error, root);
  return result.data;
}
