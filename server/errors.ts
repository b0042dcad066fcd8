/** The one error type the HTTP layer maps to `{ error: { code, message, field? } }`. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly field?: string,
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export const badRequest = (message: string, field?: string) => new AppError(400, 'invalid_input', message, field);
export const notFound = (what = 'That') => new AppError(404, 'not_found', `${what} was not found.`);
export const forbidden = (message = 'Your roles in this lab do not allow that.') => new AppError(403, 'forbidden', message);
export const conflict = (code: string, message: string, field?: string, details?: Record<string, unknown>) =>
  new AppError(409, code, message, field, details);
export const unauthenticated = (message = 'Sign in first.') => new AppError(401, 'unauthenticated', message);
