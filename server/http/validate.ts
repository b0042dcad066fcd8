import type { Request, RequestHandler } from 'express';
import type { z } from 'zod';
import { parseOrThrow } from '../validation';

/** A middleware that checked one part of the request, and the typed result it kept. */
export type Validated<S extends z.ZodType> = RequestHandler & {
  /** The parsed input of this request; the middleware must have run on it. */
  input(req: Request): z.infer<S>;
};

/**
 * Checks the request's JSON body (or its query string) with a shared zod
 * schema before the handler runs: bad input is a 400 naming its field, and
 * the handler hands the typed result to a service with `v.input(req)`.
 *
 *   const body = validate(planCreateSchema);
 *   r.post(path, planner, body, async (req, res) => plans.create(labId, user, body.input(req)));
 *
 * It goes after the access check, so a stranger learns nothing from a 400.
 * An absent body is checked as `{}`, so the first missing field is named.
 */
export function validate<S extends z.ZodType>(schema: S, from: 'body' | 'query' = 'body'): Validated<S> {
  const parsed = new WeakMap<Request, z.infer<S>>();
  const middleware: RequestHandler = (req, _res, next) => {
    parsed.set(req, parseOrThrow(schema, from === 'body' ? (req.body ?? {}) : { ...req.query }));
    next();
  };
  return Object.assign(middleware, {
    input(req: Request): z.infer<S> {
      if (!parsed.has(req)) throw new Error('validate(): the input was read before the middleware checked it');
      return parsed.get(req) as z.infer<S>;
    },
  });
}
