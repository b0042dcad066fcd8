import { MessageChannel } from 'node:worker_threads';
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/umd/node-adapter';
import { decodeLayout, encodeLayout, INSTANCE_FORMAT_V2, parseInstance, RESULT_FORMAT_V2, validateLayout, type PackInstance, type PackResult, type PackResultV2 } from '@/shared/packing';
import { summariseShapeLayout, validateShapeLayout } from '@/shared/packing/shape';
import { prism, prismWithHoles, writeBinaryStl } from '@/shared/geometry';
import { UPRIGHT_ROTATIONS } from '@/shared/geometry/rotations';
import { createPackerApi } from '@/workers/packer.worker';
import type { FetchBytes } from '@/workers/partMeshes';
import type { PackerApi, PackerProgress, ShapeFiles } from '@/workers/protocol';

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
function connect(fetchBytes?: FetchBytes) {
  const { port1, port2 } = new MessageChannel();
  Comlink.expose(createPackerApi(fetchBytes), nodeEndpoint(port1 as never));
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

// Packing by shape: a 60 x 60 x 20 mm frame with a 30 x 30 mm hole through it, and a 16 x 16 x 10 mm peg.
const frame = prismWithHoles([[0, 0], [60, 0], [60, 60], [0, 60]], [[[15, 15], [15, 45], [45, 45], [45, 15]]], 0, 20);
const peg = prism([[0, 0], [16, 0], [16, 16], [0, 16]], 0, 10);
const files: Record<string, Uint8Array> = { '/files/frame': writeBinaryStl(frame, 'frame'), '/files/peg': writeBinaryStl(peg, 'peg') };
const file = (name: 'frame' | 'peg') => ({ key: `${name}|all|0,0,0`, url: `/files/${name}`, filename: `${name}.stl`, unit: 'mm' as const, split: false, partIndex: 0, rotationDeg: [0, 0, 0] as [number, number, number], watertight: true });
/** Two frames fill the plate (136 x 66 mm usable): beside them there is no room for a peg, only in their holes or above. */
const nestInstance = {
  format: 'pack-instance/1',
  chamber: [152, 82, 200],
  margin: { xy: 8, bottom: 5, top: 5 },
  spacing: 3,
  layerHeight: 0.1,
  objective: 'min-height',
  timeLimitMs: 1500,
  seed: 1,
  parts: [
    { id: 'frame', size: [60, 60, 20], quantity: 2, orientations: ['xyz', 'yxz'] },
    { id: 'peg', size: [16, 16, 10], quantity: 2, orientations: ['xyz', 'yxz'] },
  ],
};
const shapes: ShapeFiles = {
  parts: [
    { id: 'frame', file: file('frame'), rotations: [...UPRIGHT_ROTATIONS] },
    { id: 'peg', file: file('peg'), rotations: [...UPRIGHT_ROTATIONS] },
  ],
};

/** The frames-and-pegs build as a "pack-instance/2" of the meshes themselves, for the independent check. */
const nestV2 = () => ({
  ...(parseInstance(nestInstance) as { ok: true; instance: PackInstance }).instance,
  format: INSTANCE_FORMAT_V2,
  fit: 'shape' as const,
  parts: [
    { id: 'frame', size: null, quantity: 2, rotations: [...UPRIGHT_ROTATIONS], meshPath: null, mesh: frame },
    { id: 'peg', size: null, quantity: 2, rotations: [...UPRIGHT_ROTATIONS], meshPath: null, mesh: peg },
  ],
});

describe('packing by shape in the worker', () => {
  test('downloads each file once, stands the pegs in the frames\' holes, and every layout it sends passes the check against the meshes', async () => {
    const fetched: string[] = [];
    const { remote, close } = connect(async (url) => {
      fetched.push(url);
      return files[url] ?? null;
    });
    const sent: PackResultV2[] = [];
    try {
      const onProgress = (m: PackerProgress) => {
        if (!m.best) return;
        const d = decodeLayout(m.best);
        if (d.ok) sent.push(d.result as unknown as PackResultV2);
      };
      const outcome = await remote.start(7, nestInstance, Comlink.proxy(onProgress), { progressEveryMs: 20, shapes });
      expect(outcome.ok).toBe(true);
      if (!outcome.ok) return;
      const decoded = decodeLayout(outcome.layout);
      expect(decoded.ok).toBe(true);
      if (!decoded.ok) return;
      const result = decoded.result as unknown as PackResultV2;
      expect(result.format).toBe(RESULT_FORMAT_V2);
      expect(result.unplaced).toEqual([]);
      expect(result.placements.every((p) => p.transform?.length === 12)).toBe(true);
      // Nested, the build is as tall as the frames (bottom margin 5 + 20 mm); by boxes the pegs would lie on them: 5 + 20 + 3 + 10.
      expect(result.height).toBeCloseTo(25, 6);
      expect(fetched.sort()).toEqual(['/files/frame', '/files/peg']);

      // The independent check, against the meshes themselves (surface gaps, containment, lift-out order).
      const v2 = nestV2();
      // Let the last proxied callbacks arrive.
      await new Promise((r) => setTimeout(r, 20));
      expect(sent.length).toBeGreaterThan(0);
      for (const layout of [...sent, result]) expect(validateShapeLayout(v2, layout)).toEqual([]);

      // A second run reads the meshes kept from the first: nothing is downloaded again.
      const again = await remote.start(8, { ...nestInstance, timeLimitMs: 300 }, Comlink.proxy(() => undefined), { shapes });
      expect(again.ok).toBe(true);
      expect(fetched).toHaveLength(2);
    } finally {
      close();
    }
  });

  test('what the engine says of its layout comes back with it: parts packed by their boxes for want of time', async () => {
    const { remote, close } = connect(async (url) => files[url] ?? null);
    const real = performance.now.bind(performance);
    try {
      const outcome = await remote.start(9, nestInstance, Comlink.proxy(() => undefined), { shapes });
      expect(outcome.ok && outcome.warnings).toBeUndefined();
      // A clock 10,000 times fast: drawing the meshes' profiles reads as seconds, past half the 1.5 s limit.
      jest.spyOn(performance, 'now').mockImplementation(() => 10_000 * real());
      const again = await remote.start(10, nestInstance, Comlink.proxy(() => undefined), { shapes });
      expect(again.ok).toBe(true);
      if (!again.ok) return;
      expect(again.warnings).toEqual([expect.objectContaining({ code: 'packed-by-box', message: expect.stringMatching(/^Packed by the parts' boxes/) })]);
    } finally {
      jest.restoreAllMocks();
      close();
    }
  });

  test('a part whose file gives no closed mesh is packed by its box, and the outcome names it with the reason', async () => {
    // The peg's file cannot be downloaded; the frame's is stored as not closed.
    const { remote, close } = connect(async (url) => (url === '/files/peg' ? null : files[url] ?? null));
    try {
      const open = { parts: [{ ...shapes.parts[0], file: { ...file('frame'), key: 'open-frame', watertight: false } }, shapes.parts[1]] };
      const outcome = await remote.start(11, { ...nestInstance, timeLimitMs: 300 }, Comlink.proxy(() => undefined), { shapes: open });
      expect(outcome.ok).toBe(true);
      if (!outcome.ok) return;
      expect(outcome.warnings).toEqual([
        { id: 'frame', code: 'no-mesh', message: '"frame" was packed by its bounding box: its mesh "frame.stl" is not closed and consistently oriented, so it has no inside to nest by' },
        { id: 'peg', code: 'no-mesh', message: '"peg" was packed by its bounding box: the stored file "peg.stl" could not be read' },
      ]);
      const decoded = decodeLayout(outcome.layout);
      if (!decoded.ok) throw new Error('layout must decode');
      // By their boxes the pegs cannot stand in the frames' holes: they lie beside or on the frames, and no placement carries a transform.
      expect(decoded.result.placements).toHaveLength(4);
      expect(decoded.result.height).toBeGreaterThan(25 + 1);
    } finally {
      close();
    }
  });

  test('cancel gets through while the shape packing searches its box layout, and ends it with its best layout so far', async () => {
    const { remote, close } = connect(async (url) => files[url] ?? null);
    try {
      // Far more frames and pegs than the plate holds, and a long limit: the box search alone would take 16 s.
      const long = { ...nestInstance, chamber: [400, 400, 600], timeLimitMs: 20_000, parts: nestInstance.parts.map((p) => ({ ...p, quantity: 200 })) };
      const started = Date.now();
      const pending = remote.start(10, long, Comlink.proxy(() => undefined), { shapes });
      await new Promise((r) => setTimeout(r, 1500));
      await remote.cancel(10);
      const outcome = await pending;
      expect(Date.now() - started).toBeLessThan(10_000);
      expect(outcome.ok && outcome.cancelled).toBe(true);
      if (!outcome.ok) return;
      const decoded = decodeLayout(outcome.layout);
      expect(decoded.ok && decoded.result.placements.length).toBeGreaterThan(0);
    } finally {
      close();
    }
  });

  test('a part without a file entry comes back as a problem naming it, before anything is downloaded', async () => {
    const fetched: string[] = [];
    const { remote, close } = connect(async (url) => {
      fetched.push(url);
      return files[url] ?? null;
    });
    try {
      const outcome = await remote.start(9, nestInstance, Comlink.proxy(() => undefined), { shapes: { parts: [shapes.parts[0]] } });
      expect(outcome.ok).toBe(false);
      if (outcome.ok) return;
      expect(outcome.problems).toContainEqual({ field: 'parts[1]', message: '"peg" has no stored file to pack by shape' });
      expect(fetched).toEqual([]);
    } finally {
      close();
    }
  });
});

describe('a hand edit of a layout by shape, checked in the worker', () => {
  // The usable plate starts at (8, 8, 5): a frame in the corner has its hole over x and y 23 to 53.
  const layoutOf = (items: Array<{ id: 'frame' | 'peg'; at: [number, number, number] }>) =>
    encodeLayout(summariseShapeLayout(nestV2(), items.map((it) => ({ id: it.id, rotation: 0, position: it.at }))) as unknown as PackResult);

  test("a peg dropped by hand over a frame's hole goes down through it to the floor, and the layout passes the check", async () => {
    const { remote, close } = connect(async (url) => files[url] ?? null);
    try {
      // Held on the frame's box (5 + 20 + 3 mm), as a drop by boxes leaves it; 7 mm from the hole's walls each side.
      const layout = layoutOf([
        { id: 'peg', at: [30, 30, 28] },
        { id: 'frame', at: [8, 8, 5] },
      ]);
      const outcome = await remote.checkByShape({ instance: nestInstance, layout, shapes, drop: [0] });
      expect(outcome.ok).toBe(true);
      if (!outcome.ok || !outcome.dropped) throw new Error('expected a dropped layout');
      const decoded = decodeLayout(outcome.dropped.layout);
      if (!decoded.ok) throw new Error('the dropped layout must decode');
      expect(decoded.result.placements[outcome.dropped.indexOf[0]].position[2]).toBeCloseTo(5, 5);
      expect(outcome.faults).toEqual([]);
    } finally {
      close();
    }
  });

  test("a peg moved into the frame's wall is at fault with the frame; moved into the hole, nothing is", async () => {
    const { remote, close } = connect(async (url) => files[url] ?? null);
    try {
      const into = await remote.checkByShape({ instance: nestInstance, layout: layoutOf([{ id: 'frame', at: [8, 8, 5] }, { id: 'peg', at: [30, 30, 5] }]), shapes });
      expect(into).toEqual({ ok: true, faults: [], problems: [] });
      const wall = await remote.checkByShape({ instance: nestInstance, layout: layoutOf([{ id: 'frame', at: [8, 8, 5] }, { id: 'peg', at: [20, 30, 5] }]), shapes });
      expect(wall.ok && wall.faults).toEqual([0, 1]);
      // Checked for the moved part only (while dragging): the same pair is found from the peg's side; a peg whose
      // pairs are all clear answers nothing, though the other peg sits in the frame's wall.
      const two = layoutOf([{ id: 'frame', at: [8, 8, 5] }, { id: 'peg', at: [20, 30, 5] }, { id: 'peg', at: [100, 30, 5] }]);
      expect(await remote.checkByShape({ instance: nestInstance, layout: two, shapes, only: [1] })).toMatchObject({ ok: true, faults: [0, 1] });
      expect(await remote.checkByShape({ instance: nestInstance, layout: two, shapes, only: [2] })).toEqual({ ok: true, faults: [], problems: [] });
      // Bad input is named, not thrown.
      const bad = await remote.checkByShape({ instance: { ...nestInstance, spacing: -1 }, layout: layoutOf([]), shapes });
      expect(bad.ok).toBe(false);
      if (!bad.ok) expect(bad.problems[0].field).toBe('spacing');
    } finally {
      close();
    }
  });
});
