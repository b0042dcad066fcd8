/**
 * The floor under a layout: the height no layout of the same parts can stand
 * under, and what sets it (the part that stands tallest at its lowest, or the
 * parts' room spread over the bed). It tells the planner when more packing
 * time cannot bring a build down any further, and which part to look at if
 * it should be lower.
 */
import { lowerBound, orientedSize, packingFloor, parseInstance, type PackInstanceInput, type PackResult } from '../../shared/packing';

export interface LayoutFloor {
  /** From the chamber floor, the floor margin included (mm). */
  heightMm: number;
  bottomMm: number;
  /** The part (request line id) standing tallest at its lowest allowed turn, and that height (mm). */
  tallest: { id: string; heightMm: number } | null;
  /** The parts' room spread over the usable bed (mm over the floor margin). */
  byVolumeMm: number;
  /** The floor is the parts' room over the bed rather than one part's height. */
  byVolume: boolean;
}

/**
 * The floor of an instance's parts. By shape the room is each part's own volume (`volumeOf`; a part with no
 * known volume is packed as its box, so its box's); by box it is the boxes grown by the spacing (the box
 * packing's own bound, ../../shared/packing/bounds.ts). Null when the instance does not read or holds nothing.
 */
export function layoutFloor(input: PackInstanceInput, byShape: boolean, volumeOf?: (id: string) => number | undefined): LayoutFloor | null {
  const parsed = parseInstance(input);
  if (!parsed.ok) return null;
  const inst = parsed.instance;
  const parts = inst.parts
    .filter((p) => p.quantity > 0 && p.orientations.length > 0)
    .map((p) => ({
      id: p.id,
      quantity: p.quantity,
      lowestMm: Math.min(...p.orientations.map((o) => orientedSize(p.size, o)[2])),
      volumeMm3: (byShape ? volumeOf?.(p.id) : undefined) ?? p.size[0] * p.size[1] * p.size[2],
    }));
  if (parts.length === 0) return null;
  const floor = packingFloor(inst, parts);
  const bottomMm = inst.margin.bottom;
  if (byShape) return { heightMm: floor.height, bottomMm, tallest: floor.tallest, byVolumeMm: floor.byVolumeMm, byVolume: floor.byVolumeMm > (floor.tallest?.heightMm ?? 0) };
  const heightMm = lowerBound(inst);
  const byVolumeMm = heightMm - bottomMm;
  return { heightMm, bottomMm, tallest: floor.tallest, byVolumeMm, byVolume: byVolumeMm > (floor.tallest?.heightMm ?? 0) + 1e-9 };
}

/**
 * One line for the numbers: the floor, what sets it, and how far the shown layout stands over it (null with parts
 * left out). By box it says so: by shape the same parts may nest lower than their boxes' floor.
 */
export function floorNote(floor: LayoutFloor | null, result: Pick<PackResult, 'height' | 'unplaced'>, nameOf: (id: string) => string | undefined, byShape: boolean): string | null {
  if (!floor || result.unplaced.some((u) => u.count > 0)) return null;
  const f = (v: number) => `${v.toFixed(1)} mm`;
  const why = floor.byVolume
    ? byShape
      ? `the parts' own volume alone, spread over the bed, fills ${f(floor.byVolumeMm)}`
      : `the parts' boxes with the spacing, spread over the bed, fill ${f(floor.byVolumeMm)}`
    : `${nameOf(floor.tallest!.id) ?? floor.tallest!.id} stands ${f(floor.tallest!.heightMm)} at its lowest that its orientation rule allows`;
  const over = result.height - floor.heightMm;
  const where = over < 0.05 ? `This layout is as low as any${byShape ? '' : ' by boxes'} can be.` : `This layout stands ${f(over)} over it.`;
  // By box the floor is the boxes' (a layout by shape of the same parts may nest under it).
  const which = byShape ? 'No layout of these parts' : 'No layout of these parts by their boxes';
  return `${which} can be lower than ${f(floor.heightMm)}: ${why}, over the ${f(floor.bottomMm)} floor margin. ${where}`;
}
