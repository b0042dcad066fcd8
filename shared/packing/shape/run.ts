/**
 * One entry for version 2 instances: by boxes or by shapes, with the same
 * hooks (progress with the best layout so far, stop) as the box engine.
 */
import type { PackPhase } from '../engine';
import type { PackInstanceV2, PackResultV2 } from '../types';
import { createBoxFitPacking } from './boxfit';
import { createShapePacking, type ShapeOptions } from './engine';

export interface PackV2Hooks {
  onProgress?: (phase: PackPhase, shareDone: number, best: PackResultV2 | null) => void;
  shouldStop?: () => boolean;
}

export interface PackingV2 {
  run(hooks?: PackV2Hooks): Promise<PackResultV2>;
  runSync(hooks?: PackV2Hooks): PackResultV2;
}

export function createPackingV2(instance: PackInstanceV2, options: ShapeOptions = {}): PackingV2 {
  if (instance.fit === 'box') {
    const p = createBoxFitPacking(instance, { now: options.now, yieldMs: options.yieldMs });
    return { run: (h) => p.run(h), runSync: (h) => p.runSync(h) };
  }
  return createShapePacking(instance, options);
}

export function packV2Sync(instance: PackInstanceV2, options?: ShapeOptions): PackResultV2 {
  return createPackingV2(instance, options).runSync();
}

export function packV2(instance: PackInstanceV2, options?: ShapeOptions): Promise<PackResultV2> {
  return createPackingV2(instance, options).run();
}
