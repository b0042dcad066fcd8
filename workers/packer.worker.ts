/**
 * Web worker running the packing engine off the main thread. The engine hands
 * control back every few tens of milliseconds, so cancel messages get through.
 * Packing by shape, the worker first downloads the parts' stored files (once:
 * their resting meshes stay cached for the next run).
 */
import * as Comlink from 'comlink';
import { RestingMeshCache } from '../shared/geometry/layoutSlices';
import { createPacking, decodeLayout, encodeLayout, layoutTransferables, parseInstance, type PackPhase, type PackResult } from '../shared/packing';
import { createPackingV2, shapeParts, type ShapePart } from '../shared/packing/shape';
import { droppedByShape, shapeLayoutFaults } from '../shared/packing/shape/handEdit';
import { fetchSameOrigin, type FetchBytes } from './partMeshes';
import type { PackerApi, PackerOutcome, PackerProgress, PackerProgressCallback, PackerStartOptions, PackWarning, ShapeEditOutcome, ShapeEditRequest } from './protocol';
import { shapeInstanceOf } from './shapeInstance';

interface Run {
  run(hooks: { shouldStop: () => boolean; onProgress: (phase: PackPhase, shareDone: number, best: PackResult | null) => void }): Promise<PackResult>;
}

export function createPackerApi(fetchBytes: FetchBytes = fetchSameOrigin): PackerApi {
  const cancelled = new Set<number>();
  const running = new Set<number>();
  const meshes = new RestingMeshCache();
  // The parts of the last layout checked by hand, with their trees: the next edit of the same layout reuses them.
  let lastParts: { key: string; parts: ShapePart[] } | null = null;
  return {
    async start(runId: number, instance: unknown, onProgress: PackerProgressCallback, options: PackerStartOptions = {}): Promise<PackerOutcome> {
      const parsed = parseInstance(instance);
      if (!parsed.ok) return { ok: false, runId, problems: parsed.problems };
      running.add(runId);
      const every = options.progressEveryMs ?? 100;
      const yieldMs = Math.min(50, every);
      let lastSent = -Infinity;
      let sentBest: PackResult | null = null;
      const clock = () => globalThis.performance.now();
      try {
        let packing: Run;
        // Parts the worker sends to the engine as boxes (no closed mesh to be had): the outcome says so.
        let boxed: PackWarning[] = [];
        if (options.shapes) {
          void onProgress({ phase: 'greedy', shareDone: 0 });
          const shaped = await shapeInstanceOf(parsed.instance, options.shapes, meshes, fetchBytes);
          if (!shaped.ok) return { ok: false, runId, problems: shaped.problems };
          boxed = shaped.boxed;
          // A "pack-result/2" places parts as a "pack-result/1" does, each with its transform besides: the codec carries both.
          packing = createPackingV2(shaped.instance, { yieldMs }) as unknown as Run;
        } else {
          packing = createPacking(parsed.instance, { yieldMs });
        }
        const result = await packing.run({
          shouldStop: () => cancelled.has(runId),
          onProgress(phase, shareDone, best) {
            const t = clock();
            if (phase !== 'done' && t - lastSent < every) return;
            lastSent = t;
            const message: PackerProgress = { phase, shareDone };
            if (best && best !== sentBest) {
              sentBest = best;
              const encoded = encodeLayout(best);
              message.best = encoded;
              // Fire and forget: the engine does not wait for the main thread.
              void onProgress(Comlink.transfer(message, layoutTransferables(encoded)));
              return;
            }
            void onProgress(message);
          },
        });
        const layout = encodeLayout(result);
        const warnings = [...boxed, ...((result as { warnings?: PackWarning[] }).warnings ?? [])];
        const outcome: PackerOutcome = { ok: true, runId, cancelled: cancelled.has(runId), layout, ...(warnings.length > 0 ? { warnings } : {}) };
        return Comlink.transfer(outcome, layoutTransferables(layout));
      } finally {
        running.delete(runId);
        cancelled.delete(runId);
      }
    },
    cancel(runId: number) {
      if (running.has(runId)) cancelled.add(runId);
    },
    async checkByShape(request: ShapeEditRequest): Promise<ShapeEditOutcome> {
      const parsed = parseInstance(request?.instance);
      if (!parsed.ok) return { ok: false, problems: parsed.problems };
      const decoded = decodeLayout(request.layout);
      if (!decoded.ok) return { ok: false, problems: decoded.problems };
      const shaped = await shapeInstanceOf(parsed.instance, request.shapes, meshes, fetchBytes);
      if (!shaped.ok) return { ok: false, problems: shaped.problems };
      const key = JSON.stringify(shaped.instance.parts.map((p) => [p.id, p.quantity, p.rotations, request.shapes.parts.find((s) => s.id === p.id)?.file.key]));
      if (lastParts?.key !== key) lastParts = { key, parts: shapeParts(shaped.instance) };
      const parts = lastParts.parts;
      let result = decoded.result;
      const count = result.placements.length;
      const inRange = (v: unknown): number[] => (Array.isArray(v) ? v.filter((i) => Number.isInteger(i) && i >= 0 && i < count) : []);
      const drop = inRange(request.drop);
      let dropped: { layout: ReturnType<typeof encodeLayout>; indexOf: number[] } | undefined;
      if (drop.length > 0) {
        const out = droppedByShape(shaped.instance, result.placements, drop, parts);
        result = { ...result, placements: out.placements };
        dropped = { layout: encodeLayout(result), indexOf: out.indexOf };
      }
      const only = drop.length === 0 && Array.isArray(request.only) ? inRange(request.only) : undefined;
      const { faults, problems } = shapeLayoutFaults(shaped.instance, result, parts, only);
      return { ok: true, faults: [...faults].sort((a, b) => a - b), problems, ...(dropped ? { dropped } : {}) };
    },
  };
}

// Only inside a real worker: in tests the API is exposed over a channel instead.
const scope = globalThis as { WorkerGlobalScope?: unknown; postMessage?: unknown };
if (typeof scope.WorkerGlobalScope !== 'undefined' && typeof scope.postMessage === 'function') {
  Comlink.expose(createPackerApi());
}
