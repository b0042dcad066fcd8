import { parseInstanceV2, type PackInstanceV2, type PartMesh } from '@/shared/packing';

/** A checked "pack-instance/2" of meshes in a 200 mm cube chamber (no margins, unless `more` says otherwise), packed by shape. */
export function shapeInstance(
  parts: Array<{ id: string; mesh: PartMesh; quantity: number; orientations?: string[] }>,
  spacing: number,
  more: { chamber?: [number, number, number]; timeLimitMs?: number; margin?: { xy: number; bottom: number; top: number } } = {},
): PackInstanceV2 {
  const parsed = parseInstanceV2({
    format: 'pack-instance/2',
    chamber: [200, 200, 200],
    spacing,
    layerHeight: 0.1,
    fit: 'shape',
    ...more,
    parts: parts.map((p) => ({ id: p.id, mesh: { positions: p.mesh.positions, indices: p.mesh.indices }, quantity: p.quantity, orientations: p.orientations })),
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  return parsed.instance;
}
