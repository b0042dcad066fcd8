import { MessageChannel } from 'node:worker_threads';
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/umd/node-adapter';
import { decodeLayout, parseInstance, validateLayout, type PackInstance } from '@/shared/packing';
import { createPackerApi } from '@/workers/packer.worker';
import type { PackerApi, PackerProgress } from '@/workers/protocol';

// Comlink opens a channel for every proxied callback; keep them to close after the tests so jest can exit.
const opened: Array<{ close(): void }> = [];
const NativeChannel = globalThis.MessageChannel;
beforeAll(() => {
  const Tracked = class extends NativeChannel {
    constructor() {
      super();
      opened.push(this.port1, this.port2);
    }
  };
  (globalThis as { MessageChannel: unknown }).MessageChannel = Tracked;
});
afterAll(() => {
  opened.forEach((p) => p.close());
  globalThis.MessageChannel = NativeChannel;
});

// The worker's API runs behind comlink over a real message channel, as it does in a browser worker.
function connect() {
  const { port1, port2 } = new MessageChannel();
  Comlink.expose(createPackerApi(), nodeEndpoint(port1 as never));
  const remote = Comlink.wrap<PackerApi>(nodeEndpoint(port2 as never));
  return {
    remote,
    close() {
      remote[Comlink.releaseProxy]();
      port1.close();
      port2.close();
    },
  };
}

const instance = {
  format: 'pack-instance/1',
  chamber: [200, 200, 300],
  margin: { xy: 8, bottom: 5, top: 5 },
  spacing: 3,
  objective: 'min-height',
  timeLimitMs: 400,
  parts: [
    { id: 'clip', size: [20, 12, 6], quantity: 120 },
    { id: 'housing', size: [70, 50, 30], quantity: 6, orientations: ['xyz', 'yxz'] },
  ],
};

describe('packing worker protocol', () => {
  test('a packing reports progress with typed-array layouts and ends with a valid layout', async () => {
    const { remote, close } = connect();
    const messages: PackerProgress[] = [];
    try {
      const outcome = await remote.start(1, instance, Comlink.proxy((m: PackerProgress) => void messages.push(m)), { progressEveryMs: 20 });
      expect(outcome.ok).toBe(true);
      if (!outcome.ok) return;
      expect(outcome.cancelled).toBe(false);
      expect(Object.prototype.toString.call(outcome.layout.positions)).toBe('[object Float64Array]');
      expect(Object.prototype.toString.call(outcome.layout.rotations)).toBe('[object Uint8Array]');
      expect(Object.prototype.toString.call(outcome.layout.partIndex)).toBe('[object Uint32Array]');
      const decoded = decodeLayout(outcome.layout);
      expect(decoded.ok).toBe(true);
      if (!decoded.ok) return;
      const parsed = parseInstance(instance);
      if (!parsed.ok) throw new Error('fixture must parse');
      expect(validateLayout(parsed.instance as PackInstance, decoded.result)).toEqual([]);
      expect(decoded.result.placements).toHaveLength(126);
      // Let the last proxied callbacks arrive.
      await new Promise((r) => setTimeout(r, 20));
      expect(messages.length).toBeGreaterThan(0);
      expect(messages.some((m) => m.best !== undefined)).toBe(true);
      expect(messages.every((m) => m.shareDone >= 0 && m.shareDone <= 1)).toBe(true);
    } finally {
      close();
    }
  });

  test('cancel ends a long packing early with its best valid layout so far', async () => {
    const { remote, close } = connect();
    try {
      // Far more parts than the chamber holds, so the search has work left when cancelled.
      const long = { ...instance, objective: 'max-volume', timeLimitMs: 20_000, parts: [...instance.parts, { id: 'bracket', size: [33, 21, 14], quantity: 4000 }] };
      const started = Date.now();
      const pending = remote.start(7, long, Comlink.proxy(() => undefined));
      await new Promise((r) => setTimeout(r, 150));
      await remote.cancel(7);
      const outcome = await pending;
      expect(Date.now() - started).toBeLessThan(5000);
      expect(outcome.ok && outcome.cancelled).toBe(true);
      if (!outcome.ok) return;
      const decoded = decodeLayout(outcome.layout);
      const parsed = parseInstance(long);
      if (!decoded.ok || !parsed.ok) throw new Error('layout and instance must decode');
      expect(validateLayout(parsed.instance, decoded.result)).toEqual([]);
      expect(decoded.result.placements.length).toBeGreaterThan(0);
    } finally {
      close();
    }
  });

  test('a bad instance comes back as problems naming the field, not as an exception', async () => {
    const { remote, close } = connect();
    try {
      const bad = { ...instance, parts: [{ id: 'clip', size: [20, -1, 6], quantity: 3 }] };
      const outcome = await remote.start(2, bad, Comlink.proxy(() => undefined));
      expect(outcome.ok).toBe(false);
      if (outcome.ok) return;
      expect(outcome.problems).toContainEqual({ field: 'parts[0].size[1]', message: 'must be a positive number' });
    } finally {
      close();
    }
  });
});
