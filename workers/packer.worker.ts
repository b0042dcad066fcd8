/**
 * Web worker running the packing engine off the main thread. The engine hands
 * control back every few tens of milliseconds, so cancel messages get through.
 */
import * as Comlink from 'comlink';
import { createPacking, encodeLayout, layoutTransferables, parseInstance, type PackResult } from '../shared/packing';
import type { PackerApi, PackerOutcome, PackerProgress, PackerProgressCallback, PackerStartOptions } from './protocol';

export function createPackerApi(): PackerApi {
  const cancelled = new Set<number>();
  const running = new Set<number>();
  return {
    async start(runId: number, instance: unknown, onProgress: PackerProgressCallback, options: PackerStartOptions = {}): Promise<PackerOutcome> {
      const parsed = parseInstance(instance);
      if (!parsed.ok) return { ok: false, runId, problems: parsed.problems };
      running.add(runId);
      const every = options.progressEveryMs ?? 100;
      let lastSent = -Infinity;
      let sentBest: PackResult | null = null;
      const clock = () => globalThis.performance.now();
      try {
        const result = await createPacking(parsed.instance, { yieldMs: Math.min(50, every) }).run({
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
        const outcome: PackerOutcome = { ok: true, runId, cancelled: cancelled.has(runId), layout };
        return Comlink.transfer(outcome, layoutTransferables(layout));
      } finally {
        running.delete(runId);
        cancelled.delete(runId);
      }
    },
    cancel(runId: number) {
      if (running.has(runId)) cancelled.add(runId);
    },
  };
}

// Only inside a real worker: in tests the API is exposed over a channel instead.
const scope = globalThis as { WorkerGlobalScope?: unknown; postMessage?: unknown };
if (typeof scope.WorkerGlobalScope !== 'undefined' && typeof scope.postMessage === 'function') {
  Comlink.expose(createPackerApi());
}
