import { buildCountLowerBound, inflatedPartVolume } from './bounds';
import { packSync, summariseLayout, type PackOptions } from './engine';
import { usableRegion } from './geometry';
import { parseInstance } from './parse';
import type { FieldProblem, Orientation, PackInstance, PackMargin, PackPart, PackResult, Unplaced, Vec3 } from './types';
import { validateLayout } from './validate';

/** One request line: parts of one design wanted by a date. */
export interface BuildLine {
  id: string;
  size: Vec3;
  quantity: number;
  orientations?: Orientation[];
  /** 1 is the most urgent; lines are filled in increasing priority, then by due date. */
  priority: number;
  /** ISO 8601 date or date-time; lines without one come after dated lines of the same priority. */
  dueDate?: string;
}

export interface BuildSettings {
  chamber: Vec3;
  margin?: Partial<PackMargin>;
  spacing?: number;
  layerHeight?: number;
  /** Time for each build's packing. */
  timeLimitMs?: number;
  seed?: number;
}

export interface PlannedBuild {
  /** A min-height instance holding exactly the parts placed in this build. */
  instance: PackInstance;
  result: PackResult;
}

export type SplitOutcome =
  | {
      ok: true;
      builds: PlannedBuild[];
      /** Parts that fit the chamber in no allowed orientation. */
      unplaceable: Unplaced[];
      /** The continuous lower bound on the number of builds (Martello, Pisinger & Vigo 2000). */
      buildsLowerBound: number;
    }
  | { ok: false; problems: FieldProblem[] };

interface Run {
  line: number;
  count: number;
}

/**
 * Spreads request lines over as many builds as needed. Each build takes the
 * most urgent remaining parts up to the chamber's (spacing-inflated) volume,
 * packs them as low as possible, then tops the leftover space up with the next
 * parts in line; what did not fit goes back to the front of the queue.
 */
export function splitIntoBuilds(lines: BuildLine[], settings: BuildSettings, options: PackOptions = {}): SplitOutcome {
  const problems: FieldProblem[] = [];
  const parsed = parseInstance({
    format: 'pack-instance/1',
    chamber: settings.chamber,
    margin: settings.margin,
    spacing: settings.spacing,
    layerHeight: settings.layerHeight,
    timeLimitMs: settings.timeLimitMs,
    seed: settings.seed,
    objective: 'min-height',
    parts: lines.map((l) => ({ id: l.id, size: l.size, quantity: l.quantity, orientations: l.orientations })),
  });
  if (!parsed.ok) problems.push(...parsed.problems.map((p) => ({ ...p, field: p.field.replace(/^parts\[/, 'lines[') })));
  lines.forEach((l, i) => {
    if (typeof l.priority !== 'number' || !Number.isFinite(l.priority)) problems.push({ field: `lines[${i}].priority`, message: 'must be a number' });
    if (l.dueDate !== undefined && (typeof l.dueDate !== 'string' || Number.isNaN(Date.parse(l.dueDate)))) {
      problems.push({ field: `lines[${i}].dueDate`, message: 'must be an ISO 8601 date' });
    }
  });
  if (!parsed.ok || problems.length > 0) return { ok: false, problems };
  const base = parsed.instance;
  const parts = base.parts;
  const g = base.spacing;
  const { extent } = usableRegion(base);
  const capacity = (extent[0] + g) * (extent[1] + g) * (extent[2] + g);

  const due = (l: BuildLine) => (l.dueDate === undefined ? Infinity : Date.parse(l.dueDate));
  const order = lines.map((_, i) => i).sort((a, b) => lines[a].priority - lines[b].priority || due(lines[a]) - due(lines[b]) || a - b);

  const unplaceable: Unplaced[] = [];
  let queue: Run[] = [];
  for (const i of order) {
    if (parts[i].quantity === 0) continue;
    if (!fitsSomehow(parts[i], extent)) unplaceable.push({ id: parts[i].id, count: parts[i].quantity });
    else queue.push({ line: i, count: parts[i].quantity });
  }

  const builds: PlannedBuild[] = [];
  const instanceOf = (runs: Run[], objective: PackInstance['objective'], timeLimitMs: number): PackInstance => {
    const byLine = new Map<number, number>();
    for (const r of runs) byLine.set(r.line, (byLine.get(r.line) ?? 0) + r.count);
    const chosen: PackPart[] = [...byLine].map(([line, count]) => ({ ...parts[line], quantity: count }));
    return { ...base, objective, timeLimitMs, seed: base.seed + builds.length, parts: chosen };
  };
  const placedPerId = (r: PackResult) => {
    const m = new Map<string, number>();
    for (const p of r.placements) m.set(p.id, (m.get(p.id) ?? 0) + 1);
    return m;
  };
  const lineOfId = new Map(parts.map((p, i) => [p.id, i] as const));
  /** Takes placed counts off the runs, in order; returns what is left. */
  const consume = (runs: Run[], placed: Map<string, number>): Run[] => {
    const left: Run[] = [];
    for (const r of runs) {
      const id = parts[r.line].id;
      const take = Math.min(r.count, placed.get(id) ?? 0);
      if (take > 0) placed.set(id, (placed.get(id) ?? 0) - take);
      if (r.count - take > 0) left.push({ line: r.line, count: r.count - take });
    }
    return left;
  };

  const carried = new Set<string>();
  while (queue.length > 0) {
    const [prefix, rest] = takeVolume(queue, capacity, (line) => inflatedPartVolume(parts[line], g));
    const firstTime = Math.round(base.timeLimitMs * (rest.length > 0 ? 0.7 : 1));
    const firstInstance = instanceOf(prefix, 'min-height', firstTime);
    // Lines begun in an earlier build are the most overdue: they weigh most.
    const weights = urgencyWeights(firstInstance.parts.length).map((w, i) => (carried.has(firstInstance.parts[i].id) ? 10 * w : w));
    const first = packSync(firstInstance, { ...options, partWeights: weights });
    let placements = first.placements;
    const leftover = consume(prefix, placedPerId(first));
    let pending = rest;
    if (placements.length === 0) {
      // Cannot happen for parts that fit an empty chamber; guard against looping for ever anyway.
      for (const r of prefix) unplaceable.push({ id: parts[r.line].id, count: r.count });
      queue = rest;
      continue;
    }
    if (leftover.length === 0 && rest.length > 0) {
      const topUp = instanceOf(rest, 'max-volume', base.timeLimitMs - firstTime);
      const more = packSync(topUp, { ...options, obstacles: placements, partWeights: urgencyWeights(topUp.parts.length) });
      const merged = [...placements, ...more.placements];
      const check = instanceOf([...prefix, ...rest], 'min-height', 0);
      const mergedResult = summariseLayout(check, merged);
      if (validateLayout(check, mergedResult).length === 0) {
        placements = merged;
        pending = consume(rest, placedPerId(more));
      }
    }
    const placedRuns = countsOf(placements, lineOfId);
    const buildInstance = instanceOf(placedRuns, 'min-height', base.timeLimitMs);
    builds.push({ instance: buildInstance, result: { ...summariseLayout(buildInstance, placements), elapsedMs: first.elapsedMs } });
    // Lines already started (partly placed, or offered first and left over) finish first.
    for (const r of leftover) carried.add(parts[r.line].id);
    for (const p of placements) carried.add(p.id);
    queue = [...leftover, ...pending];
  }
  return { ok: true, builds, unplaceable: mergeUnplaced(unplaceable), buildsLowerBound: buildCountLowerBound({ ...base, parts: parts.map((p, i) => ({ ...p, quantity: unplaceable.some((u) => u.id === p.id) ? 0 : lines[i].quantity })) }) };
}

/**
 * Parts come in queue order; when not all fit, the earlier (more urgent) ones
 * are worth up to four times as much per unit of volume as the last.
 */
function urgencyWeights(n: number): number[] {
  return Array.from({ length: n }, (_, i) => 1 + 3 * (1 - i / Math.max(1, n - 1)));
}

function fitsSomehow(part: PackPart, extent: Vec3): boolean {
  return part.orientations.some((o) => {
    const s = [0, 1, 2].map((k) => part.size['xyz'.indexOf(o[k])]);
    return s[0] <= extent[0] + 1e-9 && s[1] <= extent[1] + 1e-9 && s[2] <= extent[2] + 1e-9;
  });
}

/** The longest prefix of the queue whose inflated volume stays within the capacity (at least one part). */
function takeVolume(queue: Run[], capacity: number, unitVolume: (line: number) => number): [Run[], Run[]] {
  const prefix: Run[] = [];
  let used = 0;
  let i = 0;
  for (; i < queue.length; i++) {
    const r = queue[i];
    const v = unitVolume(r.line);
    const room = Math.floor((capacity - used) / v + 1e-9);
    if (room >= r.count) {
      prefix.push(r);
      used += r.count * v;
      continue;
    }
    const take = prefix.length === 0 ? Math.max(1, room) : room;
    if (take > 0) prefix.push({ line: r.line, count: take });
    const rest = take < r.count ? [{ line: r.line, count: r.count - take }, ...queue.slice(i + 1)] : queue.slice(i + 1);
    return [prefix, rest];
  }
  return [prefix, []];
}

function countsOf(placements: PackResult['placements'], lineOfId: Map<string, number>): Run[] {
  const m = new Map<number, number>();
  for (const p of placements) {
    const line = lineOfId.get(p.id)!;
    m.set(line, (m.get(line) ?? 0) + 1);
  }
  return [...m].map(([line, count]) => ({ line, count }));
}

function mergeUnplaced(list: Unplaced[]): Unplaced[] {
  const m = new Map<string, number>();
  for (const u of list) m.set(u.id, (m.get(u.id) ?? 0) + u.count);
  return [...m].map(([id, count]) => ({ id, count }));
}
