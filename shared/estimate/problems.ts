import type { z } from 'zod';

/** One thing wrong with an input, named by its field path (e.g. `machine.laserPowerW`). */
export interface Problem {
  field: string;
  message: string;
}

/** Thrown at a public boundary when the input fails validation; carries every problem found, not just the first. */
export class InvalidInputError extends Error {
  readonly problems: Problem[];
  constructor(problems: Problem[]) {
    super(problems.map((p) => `${p.field}: ${p.message}`).join('; '));
    this.name = 'InvalidInputError';
    this.problems = problems;
  }
}

export function problemsFromZod(prefix: string, error: z.ZodError): Problem[] {
  return error.issues.map((issue) => ({
    field: [prefix, ...issue.path.map(String)].filter((s) => s.length > 0).join('.'),
    message: issue.message,
  }));
}

export function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

export function requireNonNegative(problems: Problem[], field: string, value: unknown): void {
  if (!isFiniteNumber(value) || value < 0) problems.push({ field, message: 'must be a non-negative number' });
}

export function requirePositive(problems: Problem[], field: string, value: unknown): void {
  if (!isFiniteNumber(value) || value <= 0) problems.push({ field, message: 'must be a positive number' });
}
