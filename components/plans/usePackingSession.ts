/**
 * The plan editor's packing session: the packing worker (through usePacker,
 * which also replaces a worker that stopped answering), the layout being made
 * and not kept yet, and the runs that make it (pack, re-pack above a locked
 * layout, fill the space left). The best layout so far is folded into the
 * working layout as the worker sends it (editorModel.foldBest).
 */
import { useCallback, useEffect, useEffectEvent, useState } from 'react';
import type { PackInstanceInput, PackResult, PackWarning, Placement } from '../../shared/packing';
import { usePacker, type UsePacker } from '../packing/usePacker';
import { editDraft, showLayout, type DraftLine, type DraftOptions, type PlanDraft } from '../stores/planEditor';
import { fillInstanceOf, foldBest, repackOf, WORKING, type FillCandidate, type Working } from './editorModel';
import type { MachineLike, MaterialLike } from './instance';
import type { ShapeFiles } from '../../workers/protocol';

/** A packing that has not answered this long after its time limit is taken as lost (crashed or out of memory). */
const WORKER_GRACE_MS = 20_000;
/** Packing by shape first downloads and reads the parts' files: more time before silence means a lost worker. */
const SHAPE_GRACE_MS = 60_000;

export interface PackingSessionInput {
  planId: string;
  editable: boolean;
  /** The plan's instance from its current lines and options. */
  fullInstance: PackInstanceInput;
  lines: DraftLine[];
  /** The plan's instance for other lines (a fill's). */
  instanceOf: (lines: DraftLine[]) => PackInstanceInput;
  /** A line's part volume (its mesh's): a layout by shape's density counts it. */
  volumeOf: (requestLineId: string) => number | undefined;
  /** The saved plan, for a draft begun by a fill. */
  startDraft: () => Omit<PlanDraft, 'changedAt'>;
  machine: MachineLike;
  material: MaterialLike;
  options: DraftOptions;
  /** Called as a run starts, so an old message does not stay beside a new run. */
  onRunStart: () => void;
  /** The parts' stored files for a packing by shape (options.fit); rejects naming what could not be had. */
  shapeFilesFor: (instance: PackInstanceInput) => Promise<ShapeFiles>;
}

export interface PackingSession {
  packer: Pick<UsePacker, 'status' | 'progress' | 'phase' | 'cancel' | 'checkByShape'>;
  running: boolean;
  working: Working | null;
  /** Shows a layout made by hand (placements removed) as the one not kept yet. */
  showWorking(w: Working): void;
  /** Drops the layout not kept (after it was kept, or the plan reloaded). */
  dropWorking(): void;
  /** Puts back a layout not kept as it was before a change by hand (or none), without showing it. */
  restoreWorking(w: Working | null): void;
  pack(): void;
  repack(locked: Pick<PackResult, 'placements'>): void;
  fill(shown: readonly Placement[], candidates: readonly FillCandidate[]): void;
  /** What went wrong with the last run, if anything. */
  error: string | null;
  /** What the engine said of the layout not kept yet (a mesh packed by its box, parts packed by boxes for want of time). */
  notes: PackWarning[];
  /** Runs the last run again, when there was one. */
  retry: (() => void) | null;
}

export function usePackingSession({ planId, editable, fullInstance, lines, instanceOf, volumeOf, startDraft, machine, material, options, onRunStart, shapeFilesFor }: PackingSessionInput): PackingSession {
  const packer = usePacker();
  const [working, setWorking] = useState<Working | null>(null);
  const [lastRun, setLastRun] = useState<(() => void) | null>(null);

  // Reads the latest working layout and plan; only the worker's answers make it run (below).
  const takeBest = useEffectEvent((best: PackResult, final: boolean) => {
    if (!working) return;
    const next = foldBest(working, best, final, instanceOf, volumeOf);
    setWorking(next);
    if (final && next.mode === 'fill' && !next.problem) {
      // The plan's lines follow the fill, so keeping the layout saves both.
      editDraft(planId, startDraft, (d) => ({ ...d, lines: next.lines }));
    }
  });
  useEffect(() => {
    // Only a new layout from the worker (or its end) moves the working layout.
    if (packer.best) takeBest(packer.best, packer.status === 'done' || packer.status === 'cancelled');
  }, [packer.best, packer.status]);

  const { start } = packer;
  const run = useCallback(
    (w: Working, engine: PackInstanceInput, byShape = false) => {
      const go = () => {
        setWorking(w);
        showLayout(planId, WORKING);
        const limit = (w.instance.timeLimitMs ?? options.timeLimitMs) + WORKER_GRACE_MS;
        if (!byShape) {
          start(engine, { lostAfterMs: limit });
          return;
        }
        shapeFilesFor(engine).then(
          (shapes) => start(engine, { lostAfterMs: limit + SHAPE_GRACE_MS, shapes }),
          (e: unknown) => setWorking({ ...w, problem: `Not packed by shape: ${e instanceof Error ? e.message : String(e)}` }),
        );
      };
      onRunStart();
      setLastRun(() => go);
      go();
    },
    [planId, start, options.timeLimitMs, onRunStart, shapeFilesFor],
  );

  const running = packer.status === 'running';
  const base = { result: null, lines, baseLines: lines, problem: null };
  return {
    packer,
    running,
    working,
    showWorking: (w) => {
      setWorking(w);
      showLayout(planId, WORKING);
    },
    dropWorking: () => setWorking(null),
    restoreWorking: (w) => setWorking(w),
    pack: () => {
      if (!editable || running || fullInstance.parts.length === 0) return;
      run({ mode: 'pack', instance: fullInstance, kept: [], ...base }, fullInstance, options.fit === 'shape');
    },
    // Re-packing above a locked layout and filling the space above the shown one pack the new parts in the
    // slab above the others, by box or by shape as the plan's options say, whichever way the others were packed.
    repack: (locked) => {
      const { kept, engine } = repackOf(locked, fullInstance);
      run({ mode: 'repack', instance: fullInstance, kept, ...base }, engine, options.fit === 'shape');
    },
    fill: (shown, candidates) => {
      const engine = fillInstanceOf(candidates, fullInstance, shown, machine, material, options);
      run({ mode: 'fill', instance: fullInstance, kept: [...shown], ...base }, engine, options.fit === 'shape');
    },
    error: packer.error ?? working?.problem ?? null,
    // Only about the layout its run made, while it is the one not kept yet.
    notes: working && !running && packer.status !== 'error' ? packer.warnings : [],
    retry: lastRun,
  };
}
