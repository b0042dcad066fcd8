/** Every failure the client sees, in the API's one error shape. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly field?: string;

  constructor(status: number, code: string, message: string, field?: string) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.field = field;
  }
}

export function isApiError(e: unknown): e is ApiError {
  return e instanceof ApiError;
}

/**
 * The form field an error belongs to: "lines[2].quantity" -> "lines",
 * "chamberMm.1" -> "chamberMm". Forms show the message under that field.
 */
export function errorFieldRoot(field: string | undefined): string | undefined {
  if (!field) return undefined;
  const m = /^[^.[\]]+/.exec(field);
  return m ? m[0] : undefined;
}

/** Server messages about a field may start lower-case ("must be ..."): shown alone they read as a sentence. */
function sentence(message: string): string {
  return message ? message[0].toUpperCase() + message.slice(1) : message;
}

/** Errors keyed by form field, and the one that belongs to no field shown above the form. */
export function fieldErrorsOf(error: unknown, knownFields: readonly string[]): { fields: Record<string, string>; form?: string } {
  if (!error) return { fields: {} };
  if (isApiError(error)) {
    const root = errorFieldRoot(error.field);
    if (root && knownFields.includes(root)) return { fields: { [root]: sentence(error.message) } };
    return { fields: {}, form: error.message };
  }
  return { fields: {}, form: error instanceof Error ? error.message : String(error) };
}
