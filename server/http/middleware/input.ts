/**
 * What a request body may be before any route sees it: its size by route and
 * by whether the caller has signed in (refused from the Content-Length,
 * before a byte is read or parsed), and, once parsed, its depth and the
 * characters of its text (no NUL or other control characters).
 */
import express, { type RequestHandler } from 'express';
import { AppError } from '../../errors';
import { fieldPath } from '../../validation';
import { ctx } from '../context';

/** Sign-in, sign-up, invites, reset: a few short fields. */
export const ANONYMOUS_JSON_LIMIT = 16 * 1024;
/** Most routes of a signed-in member: names, lists of ids, profiles. */
export const JSON_LIMIT = 256 * 1024;
/** A plan with its editor draft (at most 1,000,000 bytes as JSON). */
export const PLAN_JSON_LIMIT = 2 * 1024 * 1024;
/** A layout with every placement (up to 200,000 parts in one plan). */
export const LAYOUT_JSON_LIMIT = 20 * 1024 * 1024;
/** Nesting of any JSON body: the deepest real body (a layout, a draft) is a handful of levels. */
export const MAX_JSON_DEPTH = 64;

const LIMITS: { method: string; path: RegExp; limit: number }[] = [
  { method: 'PUT', path: /^\/labs\/[^/]+\/plans\/[^/]+$/, limit: PLAN_JSON_LIMIT },
  { method: 'POST', path: /^\/labs\/[^/]+\/plans\/[^/]+\/layouts$/, limit: LAYOUT_JSON_LIMIT },
  { method: 'PATCH', path: /^\/labs\/[^/]+\/plans\/[^/]+\/layouts\/[^/]+$/, limit: LAYOUT_JSON_LIMIT },
];

const kb = (n: number) => (n >= 1024 * 1024 ? `${n / (1024 * 1024)} MB` : `${n / 1024} kB`);

/** The JSON limit of a request: small until the caller has signed in, larger only where a route needs it. */
export function jsonLimitFor(method: string, path: string, signedIn: boolean): number {
  if (!signedIn) return ANONYMOUS_JSON_LIMIT;
  return LIMITS.find((l) => l.method === method && l.path.test(path))?.limit ?? JSON_LIMIT;
}

/** JSON bodies parsed with the limit of their route; runs after the session is known. */
export function jsonBodies(): RequestHandler {
  const parsers = new Map<number, RequestHandler>();
  const parser = (limit: number) => {
    let p = parsers.get(limit);
    if (!p) parsers.set(limit, (p = express.json({ limit, strict: true })));
    return p;
  };
  return (req, res, next) => {
    // File uploads stream to disk under their own limits (see the parts route).
    if (req.is('multipart/form-data')) return next();
    const signedIn = !!ctx(req).user;
    const limit = jsonLimitFor(req.method, req.path, signedIn);
    const tooLarge = () =>
      new AppError(413, 'too_large', `The request body is larger than this route's limit of ${kb(limit)}${signedIn ? '' : ' before signing in'}; nothing was read.`);
    // Refused from the declared length alone: the body is neither read nor
    // drained (the parser would drain it), and the connection is closed after the answer.
    const declared = Number(req.headers['content-length']);
    if (Number.isFinite(declared) && declared > limit) {
      res.setHeader('Connection', 'close');
      return next(tooLarge());
    }
    parser(limit)(req, res, (err?: unknown) => {
      if (err && (err as { type?: string }).type === 'entity.too.large') return next(tooLarge());
      next(err);
    });
  };
}

// C0 controls other than tab, line feed and carriage return, and DEL (Unicode "Cc" category less the three whitespace ones).
const CONTROL = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/;

type Finding = { kind: 'control'; path: (string | number)[] } | { kind: 'depth'; path: (string | number)[] };

/** Walks a parsed value without recursion (a deep value must not exhaust the stack). */
export function inspectValue(value: unknown, maxDepth = MAX_JSON_DEPTH): Finding | null {
  const stack: { v: unknown; path: (string | number)[] }[] = [{ v: value, path: [] }];
  while (stack.length > 0) {
    const { v, path } = stack.pop()!;
    if (typeof v === 'string') {
      if (CONTROL.test(v)) return { kind: 'control', path };
      continue;
    }
    if (v === null || typeof v !== 'object') continue;
    if (path.length >= maxDepth) return { kind: 'depth', path: path.slice(0, 3) };
    if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push({ v: v[i], path: [...path, i] });
    } else {
      const keys = Object.keys(v);
      for (let i = keys.length - 1; i >= 0; i--) {
        const k = keys[i];
        if (CONTROL.test(k)) return { kind: 'control', path: [...path, k.replace(/[\u0000-\u001F\u007F]/g, '?')] };
        stack.push({ v: (v as Record<string, unknown>)[k], path: [...path, k] });
      }
    }
  }
  return null;
}

function refusal(found: Finding, where: 'body' | 'query'): AppError {
  const field = fieldPath(found.path) || undefined;
  const name = field ?? (where === 'body' ? 'The request body' : 'The query');
  if (found.kind === 'depth') {
    return new AppError(400, 'too_deep', `${name} is nested more than ${MAX_JSON_DEPTH} levels deep.`, field);
  }
  return new AppError(
    400,
    'invalid_input',
    `${name} contains a control character (such as NUL); only printable text, tabs and line breaks are allowed.`,
    field,
  );
}

/** Refuses bodies and query strings that are too deep or carry control characters, naming the field. */
export const checkInput: RequestHandler = (req, _res, next) => {
  let path = req.path;
  try {
    path = decodeURIComponent(req.path);
  } catch {
    return next(new AppError(400, 'invalid_input', 'The address is not valid percent-encoded UTF-8.'));
  }
  if (CONTROL.test(path)) return next(new AppError(400, 'invalid_input', 'The address contains a control character (such as NUL).'));
  const query = inspectValue(req.query);
  if (query) return next(refusal(query, 'query'));
  if (req.body !== undefined && typeof req.body === 'object') {
    const body = inspectValue(req.body);
    if (body) return next(refusal(body, 'body'));
  }
  next();
};
