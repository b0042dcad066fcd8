import { isOrientation } from './geometry';
import {
  INSTANCE_FORMAT,
  OBJECTIVES,
  ORIENTATIONS,
  type FieldProblem,
  type Objective,
  type Orientation,
  type PackInstance,
  type PackPart,
  type Vec3,
} from './types';

/** Above this many boxes in total an instance is refused: the layout alone would not fit in memory comfortably. */
export const MAX_TOTAL_QUANTITY = 200_000;

export type ParseResult = { ok: true; instance: PackInstance } | { ok: false; problems: FieldProblem[] };

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

/**
 * Checks an instance from outside (command line, HTTP body, worker message),
 * applies the defaults and reports every problem with the field it concerns.
 */
export function parseInstance(input: unknown): ParseResult {
  const problems: FieldProblem[] = [];
  const bad = (field: string, message: string) => problems.push({ field, message });

  if (!isObject(input)) {
    return { ok: false, problems: [{ field: 'instance', message: 'must be a JSON object' }] };
  }

  if (input.format !== INSTANCE_FORMAT) bad('format', `must be "${INSTANCE_FORMAT}"`);

  const chamber = readVec3(input.chamber, 'chamber', bad);

  let margin = { xy: 0, bottom: 0, top: 0 };
  if (input.margin !== undefined) {
    if (!isObject(input.margin)) bad('margin', 'must be an object with xy, bottom and top');
    else {
      for (const key of ['xy', 'bottom', 'top'] as const) {
        const v = input.margin[key];
        if (v === undefined) continue;
        if (!isFiniteNumber(v) || v < 0) bad(`margin.${key}`, 'must be a number >= 0');
        else margin = { ...margin, [key]: v };
      }
    }
  }

  const spacing = readOptionalNumber(input.spacing, 'spacing', 0, (v) => v >= 0, 'must be a number >= 0', bad);
  const layerHeight = readOptionalNumber(input.layerHeight, 'layerHeight', 0.1, (v) => v > 0, 'must be a positive number', bad);
  const timeLimitMs = readOptionalNumber(input.timeLimitMs, 'timeLimitMs', 2000, (v) => v >= 0, 'must be a number >= 0', bad);
  const seed = readOptionalNumber(input.seed, 'seed', 1, (v) => Number.isInteger(v), 'must be an integer', bad);

  let objective: Objective = 'min-height';
  if (input.objective !== undefined) {
    if (typeof input.objective === 'string' && (OBJECTIVES as readonly string[]).includes(input.objective)) {
      objective = input.objective as Objective;
    } else bad('objective', `must be one of ${OBJECTIVES.map((o) => `"${o}"`).join(', ')}`);
  }

  if (chamber) {
    if (2 * margin.xy >= chamber[0] || 2 * margin.xy >= chamber[1]) {
      bad('margin.xy', 'must leave a usable width: twice it must be less than chamber[0] and chamber[1]');
    }
    if (margin.bottom + margin.top >= chamber[2]) {
      bad('margin.top', 'must leave a usable height: margin.bottom + margin.top must be less than chamber[2]');
    }
  }

  const parts: PackPart[] = [];
  if (!Array.isArray(input.parts)) bad('parts', 'must be an array (possibly empty)');
  else {
    const seen = new Map<string, number>();
    let total = 0;
    input.parts.forEach((raw, i) => {
      const at = `parts[${i}]`;
      if (!isObject(raw)) {
        bad(at, 'must be an object with id, size and quantity');
        return;
      }
      let id: string | undefined;
      if (typeof raw.id !== 'string' || raw.id.length === 0) bad(`${at}.id`, 'must be a non-empty string');
      else if (seen.has(raw.id)) bad(`${at}.id`, `must be unique: "${raw.id}" is also parts[${seen.get(raw.id)}].id`);
      else {
        id = raw.id;
        seen.set(raw.id, i);
      }
      const size = readVec3(raw.size, `${at}.size`, bad);
      let quantity: number | undefined;
      if (!isFiniteNumber(raw.quantity) || !Number.isInteger(raw.quantity) || raw.quantity < 0) {
        bad(`${at}.quantity`, 'must be an integer >= 0');
      } else quantity = raw.quantity;
      let orientations: Orientation[] = [...ORIENTATIONS];
      let orientationsOk = true;
      if (raw.orientations !== undefined) {
        if (!Array.isArray(raw.orientations) || raw.orientations.length === 0) {
          bad(`${at}.orientations`, `must be a non-empty array of ${ORIENTATIONS.join(', ')}`);
          orientationsOk = false;
        } else {
          const list: Orientation[] = [];
          raw.orientations.forEach((o, k) => {
            if (!isOrientation(o)) {
              bad(`${at}.orientations[${k}]`, `must be one of ${ORIENTATIONS.join(', ')}`);
              orientationsOk = false;
            } else if (!list.includes(o)) list.push(o);
          });
          orientations = list;
        }
      }
      if (quantity !== undefined) total += quantity;
      if (id !== undefined && size && quantity !== undefined && orientationsOk) {
        parts.push({ id, size, quantity, orientations });
      }
    });
    if (total > MAX_TOTAL_QUANTITY) bad('parts', `must hold at most ${MAX_TOTAL_QUANTITY} boxes in total (sum of quantity is ${total})`);
  }

  if (problems.length > 0 || !chamber) return { ok: false, problems };
  return {
    ok: true,
    instance: { format: INSTANCE_FORMAT, chamber, margin, spacing, layerHeight, objective, timeLimitMs, seed, parts },
  };
}

function readVec3(v: unknown, field: string, bad: (f: string, m: string) => void): Vec3 | undefined {
  if (!Array.isArray(v) || v.length !== 3) {
    bad(field, 'must be an array of 3 positive numbers');
    return undefined;
  }
  let ok = true;
  v.forEach((c, k) => {
    if (!isFiniteNumber(c) || c <= 0) {
      bad(`${field}[${k}]`, 'must be a positive number');
      ok = false;
    }
  });
  return ok ? [v[0], v[1], v[2]] : undefined;
}

function readOptionalNumber(
  v: unknown,
  field: string,
  fallback: number,
  accept: (n: number) => boolean,
  message: string,
  bad: (f: string, m: string) => void,
): number {
  if (v === undefined) return fallback;
  if (!isFiniteNumber(v) || !accept(v)) {
    bad(field, message);
    return fallback;
  }
  return v;
}
