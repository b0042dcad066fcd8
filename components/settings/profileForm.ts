import type { z } from 'zod';
import { formatNumber } from '../ui/format';

/**
 * A profile form holds what the user typed as strings; these specs turn the
 * strings into the profile the shared schema validates, and back.
 */
export type FieldSpec = {
  key: string;
  label: string;
  unit?: string;
  hint?: string;
  /** number: one value; triple: x, y, z; list: comma-separated numbers; text: a string. */
  kind: 'text' | 'number' | 'triple' | 'list';
  /**
   * Stored units per shown unit, for a number kept in one unit and read in
   * another (preheat: stored in s, shown and typed in min, scale 60).
   */
  scale?: number;
};

export type FieldGroup = { title: string; fields: FieldSpec[] };

/** Typed values: a triple keeps one string per axis. */
export type FormValues = Record<string, string | [string, string, string]>;

export function emptyValues(groups: FieldGroup[]): FormValues {
  const out: FormValues = {};
  for (const f of groups.flatMap((g) => g.fields)) out[f.key] = f.kind === 'triple' ? ['', '', ''] : '';
  return out;
}

export function valuesFrom(groups: FieldGroup[], profile: Record<string, unknown>): FormValues {
  const out: FormValues = {};
  for (const f of groups.flatMap((g) => g.fields)) {
    const v = profile[f.key];
    if (f.kind === 'triple') {
      const a = Array.isArray(v) ? v : [];
      out[f.key] = [0, 1, 2].map((i) => (typeof a[i] === 'number' ? formatNumber(a[i], 4) : '')) as [string, string, string];
    } else if (f.kind === 'list') {
      out[f.key] = Array.isArray(v) ? v.map((n) => (typeof n === 'number' ? formatNumber(n, 4) : String(n))).join(', ') : '';
    } else if (f.kind === 'number') {
      out[f.key] = typeof v === 'number' ? formatNumber(v / (f.scale ?? 1), 6) : '';
    } else {
      out[f.key] = typeof v === 'string' ? v : '';
    }
  }
  return out;
}

/** "" stays missing so the schema reports it; "abc" stays a string so the schema reports the type. */
function toNumber(s: string): number | string | undefined {
  const t = s.trim().replace(',', '.');
  if (t === '') return undefined;
  const n = Number(t);
  return Number.isFinite(n) ? n : s;
}

export function profileFrom(groups: FieldGroup[], values: FormValues): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const f of groups.flatMap((g) => g.fields)) {
    const v = values[f.key];
    if (f.kind === 'triple') out[f.key] = (v as string[]).map(toNumber);
    else if (f.kind === 'list')
      out[f.key] = (v as string)
        .split(/[;\s]+|,\s*/)
        .filter((p) => p.trim() !== '')
        .map(toNumber);
    else if (f.kind === 'number') {
      const typed = toNumber(v as string);
      // Kept to a thousandth of the stored unit, so a shown figure rounded to six decimals goes back unchanged.
      out[f.key] = typeof typed === 'number' && f.scale ? Math.round(typed * f.scale * 1000) / 1000 : typed;
    }
    else out[f.key] = v as string;
  }
  return out;
}

const axes = ['X', 'Y', 'Z'];

/** One readable message per issue, in the words of a lab form rather than a type checker. */
export function describeIssue(issue: z.core.$ZodIssue, spec?: FieldSpec, input?: Record<string, unknown>): string {
  const i = issue as z.core.$ZodIssue & { minimum?: number | bigint; maximum?: number | bigint; inclusive?: boolean; origin?: string; expected?: string };
  // Zod leaves the offending input out of its issues; read it from what was parsed.
  let given: unknown = input;
  for (const key of issue.path) given = (given as Record<PropertyKey, unknown> | undefined)?.[key as PropertyKey];
  // Bounds are in the stored unit; the form shows its own.
  const shown = (b: number | bigint | undefined) => (spec?.scale && typeof b === 'number' ? formatNumber(b / spec.scale, 6) : b);
  let text: string;
  switch (i.code) {
    case 'invalid_type':
      text = given === undefined || given === '' ? 'Required.' : i.expected === 'int' ? 'Enter a whole number.' : i.expected === 'number' ? 'Enter a number.' : 'Not valid here.';
      break;
    case 'too_small':
      if (i.origin === 'array') text = `Give at least ${i.minimum} value${Number(i.minimum) === 1 ? '' : 's'}.`;
      else if (i.origin === 'string') text = 'Required.';
      else text = i.inclusive ? `At least ${shown(i.minimum)}.` : `More than ${shown(i.minimum)}.`;
      break;
    case 'too_big':
      if (i.origin === 'array') text = `At most ${i.maximum} values.`;
      else if (i.origin === 'string') text = `At most ${i.maximum} characters.`;
      else text = i.inclusive ? `At most ${shown(i.maximum)}.` : `Less than ${shown(i.maximum)}.`;
      break;
    default:
      text = i.message;
  }
  const sub = issue.path[1];
  if (typeof sub === 'number' && spec?.kind === 'triple') return `${axes[sub] ?? sub + 1}: ${text}`;
  if (typeof sub === 'number' && spec?.kind === 'list') return `Value ${sub + 1}: ${text}`;
  return text;
}

export function profileErrors(groups: FieldGroup[], error: z.ZodError, input?: Record<string, unknown>): Record<string, string> {
  const specs = new Map(groups.flatMap((g) => g.fields).map((f) => [f.key, f]));
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = String(issue.path[0] ?? '');
    if (!(key in out)) out[key] = describeIssue(issue, specs.get(key), input);
  }
  return out;
}

/** Stands for the lab's currency in a unit or a column title ("¤/h"); filled in where it is shown. */
export const CURRENCY_TOKEN = '¤';

export function withCurrency(text: string, currency: string | undefined): string {
  return text.split(CURRENCY_TOKEN).join(currency ?? 'money');
}
