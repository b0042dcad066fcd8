/**
 * React hook running the packing engine for a screen: in a web worker where
 * the platform has one, otherwise on the main thread (the engine yields often,
 * so the screen stays responsive either way).
 */
import * as Comlink from 'comlink';
import { useCallback, useEffect, useRef, useState } from 'react';
import {
  createPacking,
  decodeLayout,
  encodeLayout,
  parseInstance,
  type FieldProblem,
  type PackPhase,
  type PackResult,
  type PackWarning,
} from '../../shared/packing';
import type { PackerApi, PackerOutcome, PackerProgressCallback, ShapeEditOutcome, ShapeEditRequest, ShapeFiles } from '../../workers/protocol';

export type PackerStatus = 'idle' | 'running' | 'done' | 'cancelled' | 'error';

export interface UsePacker {
  status: PackerStatus;
  phase: PackPhase | null;
  /** 0 to 1: share of the time budget spent. */
  progress: number;
  /** Best layout so far while running; the final one when done or cancelled. */
  best: PackResult | null;
  /** A message for the screen when the run failed. */
  error: string | null;
  /** The fields that made the instance unusable, when that is why it failed. */
  problems: FieldProblem[];
  /** What the engine said of the final layout (a mesh packed by its box; parts packed by boxes for want of time). */
  warnings: PackWarning[];
  /**
   * Packs the instance; a run still going replaces the one before. A worker
   * silent for `lostAfterMs` (no progress, no answer) is taken as lost.
   */
  start(instance: unknown, options?: StartOptions): void;
  cancel(): void;
  /** Checks a layout packed by shape and changed by hand against the meshes, in the worker (see PackerApi.checkByShape). */
  checkByShape(request: ShapeEditRequest): Promise<ShapeEditOutcome>;
}

export interface StartOptions {
  /** How long the worker may go without a word before it is taken as lost (crashed or out of memory). */
  lostAfterMs?: number;
  /** Pack by the parts' shapes (their stored files and allowed rotations) instead of their boxes. */
  shapes?: ShapeFiles;
}

export const WORKER_LOST_MESSAGE = 'The packing worker stopped answering: it may have run out of memory or crashed.';

/** The one place the worker is created, so tests or other platforms can swap it. */
export function createPackerWorker(): Worker {
  return new Worker(new URL('../../workers/packer.worker.ts', window.location.href));
}

interface PackerClient {
  api: PackerApi;
  dispose(): void;
}

function createClient(onWorkerError: (message: string) => void): PackerClient {
  if (typeof Worker !== 'undefined' && typeof window !== 'undefined') {
    const worker = createPackerWorker();
    // A worker that fails to load or crashes never answers: report it instead of waiting for ever.
    worker.addEventListener('error', (e) => onWorkerError(e.message || 'The packing worker stopped.'));
    const remote = Comlink.wrap<PackerApi>(worker);
    return {
      api: {
        start: (runId, instance, onProgress, options) => remote.start(runId, instance, Comlink.proxy(onProgress), options),
        cancel: (runId) => void remote.cancel(runId),
        checkByShape: (request) => remote.checkByShape(request),
      },
      dispose: () => {
        remote[Comlink.releaseProxy]();
        worker.terminate();
      },
    };
  }
  return { api: createInlineApi(), dispose: () => undefined };
}

/** The same API on the main thread, for platforms without web workers. */
function createInlineApi(): PackerApi {
  const cancelled = new Set<number>();
  return {
    async start(runId, instance, onProgress, options) {
      const parsed = parseInstance(instance);
      if (!parsed.ok) return { ok: false, runId, problems: parsed.problems };
      // The meshes are downloaded and packed in the packing worker only; without one the boxes are packed.
      if (options?.shapes) return { ok: false, runId, problems: [{ field: 'fit', message: 'packing by shape needs a web worker, which this platform does not offer: pack by boxes here' }] };
      let sent: PackResult | null = null;
      const result = await createPacking(parsed.instance).run({
        shouldStop: () => cancelled.has(runId),
        onProgress(phase, shareDone, best) {
          const changed = best && best !== sent;
          if (changed) sent = best;
          onProgress({ phase, shareDone, best: changed && best ? encodeLayout(best) : undefined });
        },
      });
      const wasCancelled = cancelled.delete(runId);
      return { ok: true, runId, cancelled: wasCancelled, layout: encodeLayout(result) };
    },
    cancel(runId) {
      cancelled.add(runId);
    },
    async checkByShape() {
      return { ok: false, problems: [{ field: 'shapes', message: 'checking by shape needs a web worker, which this platform does not offer' }] };
    },
  };
}

export function usePacker(): UsePacker {
  const clientRef = useRef<PackerClient | null>(null);
  const runRef = useRef(0);
  const [status, setStatus] = useState<PackerStatus>('idle');
  const [phase, setPhase] = useState<PackPhase | null>(null);
  const [progress, setProgress] = useState(0);
  const [best, setBest] = useState<PackResult | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [problems, setProblems] = useState<FieldProblem[]>([]);
  const [warnings, setWarnings] = useState<PackWarning[]>([]);
  const [lostAfterMs, setLostAfterMs] = useState<number | null>(null);

  // A worker that never answers is replaced: this one is stopped, and the next start makes a new one.
  useEffect(() => {
    if (status !== 'running' || lostAfterMs === null) return;
    const timer = setTimeout(() => {
      runRef.current++;
      clientRef.current?.dispose();
      clientRef.current = null;
      setError(WORKER_LOST_MESSAGE);
      setStatus('error');
    }, lostAfterMs);
    return () => clearTimeout(timer);
    // Every word from the worker (its progress moving) starts the wait again.
  }, [status, progress, lostAfterMs]);

  useEffect(
    () => () => {
      clientRef.current?.dispose();
      clientRef.current = null;
    },
    [],
  );

  const clientOf = useCallback((): PackerClient => {
    if (!clientRef.current) {
      clientRef.current = createClient((message) => {
        setError(message);
        setStatus('error');
        clientRef.current?.dispose();
        clientRef.current = null;
      });
    }
    return clientRef.current;
  }, []);

  const start = useCallback((instance: unknown, options: StartOptions = {}) => {
    const client = clientOf();
    if (status === 'running') client.api.cancel(runRef.current);
    const runId = ++runRef.current;
    setStatus('running');
    setPhase(null);
    setProgress(0);
    setBest(null);
    setError(null);
    setProblems([]);
    setWarnings([]);
    setLostAfterMs(options.lostAfterMs ?? null);
    const onProgress: PackerProgressCallback = (message) => {
      if (runRef.current !== runId) return;
      setPhase(message.phase);
      setProgress(message.shareDone);
      if (message.best) {
        const decoded = decodeLayout(message.best);
        if (decoded.ok) setBest(decoded.result);
      }
    };
    client.api
      .start(runId, instance, onProgress, options.shapes ? { shapes: options.shapes } : undefined)
      .then((outcome: PackerOutcome) => {
        if (runRef.current !== runId) return;
        if (!outcome.ok) {
          setProblems(outcome.problems);
          setError(outcome.problems.map((p) => `${p.field} ${p.message}`).join('; '));
          setStatus('error');
          return;
        }
        const decoded = decodeLayout(outcome.layout);
        if (!decoded.ok) {
          setError('The packing worker sent a layout that could not be read.');
          setStatus('error');
          return;
        }
        setBest(decoded.result);
        setWarnings(outcome.warnings ?? []);
        setProgress(1);
        setPhase('done');
        setStatus(outcome.cancelled ? 'cancelled' : 'done');
      })
      .catch((e: unknown) => {
        if (runRef.current !== runId) return;
        setError(e instanceof Error ? e.message : String(e));
        setStatus('error');
      });
  }, [status, clientOf]);

  const cancel = useCallback(() => {
    clientRef.current?.api.cancel(runRef.current);
  }, []);

  const checkByShape = useCallback((request: ShapeEditRequest) => clientOf().api.checkByShape(request), [clientOf]);

  return { status, phase, progress, best, error, problems, warnings, start, cancel, checkByShape };
}
