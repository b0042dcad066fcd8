import type { PlanStatus } from '../plans/status';

/**
 * One thing the operator confirms or enters before the next stage. `field` is
 * the path of the value in the body of the run's advance route, so a form can
 * bind to it and show the server's field errors beside it.
 */
export type ChecklistItem =
  | { id: string; kind: 'confirm'; field: string; label: string }
  | { id: string; kind: 'kg'; field: string; label: string; minimumKg: number }
  | { id: string; kind: 'count'; field: string; label: string; requestLineId: string; plannedCount: number };

export interface ChecklistContext {
  /** Powder the build needs, from the chosen layout's estimate. */
  freshPowderKg?: number;
  reusedPowderKg?: number;
  /** The plan's lines, for the breakout counts. */
  lines?: ReadonlyArray<{ requestLineId: string; partName: string; requestTitle: string; plannedCount: number }>;
}

/** A need in kilograms as the floor shows it: rounded up to the tenth (roundUpKg). */
export const kgUpText = (kg: number) => `${roundUpKg(kg).toFixed(1)} kg`;

/**
 * What the stage asks before its button moves the run on: the pre-print checks
 * while queued, the part counts at breakout, the finishing checks. Printing and
 * cooling have none (their buttons wait on the print end and the timers).
 */
export function stageChecklist(status: PlanStatus, context: ChecklistContext = {}): ChecklistItem[] {
  switch (status) {
    case 'queued': {
      const fresh = context.freshPowderKg ?? 0;
      const reused = context.reusedPowderKg ?? 0;
      return [
        { id: 'chamberInPlace', kind: 'confirm', field: 'checklist.chamberInPlace', label: 'The build chamber is in place' },
        { id: 'opticalWindowClean', kind: 'confirm', field: 'checklist.opticalWindowClean', label: 'The optical window is clean' },
        { id: 'freshPowderKg', kind: 'kg', field: 'freshPowderKg', label: `Fresh powder loaded (needs at least ${kgUpText(fresh)})`, minimumKg: fresh },
        { id: 'reusedPowderKg', kind: 'kg', field: 'reusedPowderKg', label: `Reused powder loaded (needs at least ${kgUpText(reused)})`, minimumKg: reused },
      ];
    }
    case 'breakout':
      return (context.lines ?? []).flatMap((line, i) => [
        {
          id: `good-${line.requestLineId}`,
          kind: 'count' as const,
          field: `counts[${i}].good`,
          label: `Good: ${line.partName} (${line.requestTitle}), of ${line.plannedCount}`,
          requestLineId: line.requestLineId,
          plannedCount: line.plannedCount,
        },
        {
          id: `failed-${line.requestLineId}`,
          kind: 'count' as const,
          field: `counts[${i}].failed`,
          label: `Failed: ${line.partName} (${line.requestTitle})`,
          requestLineId: line.requestLineId,
          plannedCount: line.plannedCount,
        },
      ]);
    case 'finishing':
      return [
        { id: 'powderRemoved', kind: 'confirm', field: 'finishingChecklist.powderRemoved', label: 'Loose powder removed (brushed, sieved for reuse)' },
        { id: 'blasted', kind: 'confirm', field: 'finishingChecklist.blasted', label: 'Parts media blasted' },
        { id: 'inspected', kind: 'confirm', field: 'finishingChecklist.inspected', label: 'Parts inspected' },
      ];
    default:
      return [];
  }
}

/** Kilograms rounded up to the tenth the floor shows, so that loading what is shown always covers the need (0.3 stays 0.3). */
export function roundUpKg(kg: number): number {
  return Math.ceil(kg * 10 - 1e-6) / 10;
}

/** Whether the powder entered covers what the build needs (a small rounding allowance: scales show tenths). */
export const POWDER_TOLERANCE_KG = 0.05;
export function enoughPowder(loadedKg: number, neededKg: number): boolean {
  return loadedKg + POWDER_TOLERANCE_KG >= neededKg;
}
