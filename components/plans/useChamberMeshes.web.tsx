/**
 * The real meshes of a plan's parts for the chamber view, keyed by the
 * part's index in the view's order. Each part loads on its own (a small
 * component per part, so each can use the mesh hooks); until its mesh is
 * read, the view draws the part's box.
 */
import { useCallback, useEffect, useMemo, useState } from 'react';
import { rotatePositions, type Rotation } from '../parts/rotation';
import { partFileUrl, usePartQuery } from '../queries/parts';
import { useMeshFile, type PartMesh } from '../viewer';
import { isSoftwareRenderer } from '../viewer/scene';

/** Parts beyond this many are drawn as boxes: a plan of many designs stays light. */
const MESH_PART_LIMIT = 40;
/** Meshes above this many triangles are drawn as boxes too. */
const MESH_TRIANGLE_LIMIT = 60_000;
/**
 * Every copy of an instanced mesh is drawn in full, so the scene's triangles
 * are each mesh's triangles times its copies. Parts are given their mesh,
 * cheapest first, while the total stays under this; the rest stay boxes, so
 * a build of thousands of parts keeps orbiting smoothly.
 */
const SCENE_TRIANGLE_BUDGET = 1_500_000;
/** Fewer triangles than this are rarely a printable part's mesh (a box has 12). */
const MIN_MESH_TRIANGLES = 100;
/** A renderer on the CPU draws far fewer triangles a frame. */
const SOFTWARE_TRIANGLE_BUDGET = 150_000;

function PartMeshLoader({ labId, partId, index, onMesh }: { labId: string; partId: string; index: number; onMesh: (index: number, mesh: PartMesh | null) => void }) {
  const part = usePartQuery(labId, partId);
  const file = part.data?.file;
  const url = file ? partFileUrl(labId, partId) : null;
  const whole = useMeshFile(url, { unit: file?.unit, filename: file?.name });
  const names = whole.mesh?.partNames ?? [];
  const pickOne = file?.format === '3mf' && file.split && names.length > 1;
  const one = useMeshFile(pickOne ? url : null, { unit: file?.unit, filename: file?.name, partName: names[file?.partIndex ?? 0] });
  const state = pickOne ? one : whole;
  const rotation = part.data?.rotationDeg as Rotation | undefined;
  const sizeMm = part.data?.sizeMm;
  useEffect(() => {
    if (!state.mesh || !rotation || !sizeMm || state.mesh.indices.length / 3 > MESH_TRIANGLE_LIMIT) return;
    onMesh(index, { positions: rotatePositions(state.mesh.positions, rotation), indices: state.mesh.indices, sizeMm: [sizeMm[0], sizeMm[1], sizeMm[2]] });
    return () => onMesh(index, null);
  }, [state.mesh, rotation, sizeMm, index, onMesh]);
  return null;
}

export function useChamberMeshes(
  labId: string,
  partIdsInOrder: readonly (string | undefined)[],
  partIndex: ArrayLike<number>,
): { meshes: ReadonlyMap<number, PartMesh>; loaders: React.ReactNode } {
  const [loaded, setMeshes] = useState<ReadonlyMap<number, PartMesh>>(new Map());
  // Copies of each part in the view (placements of a part not in the list are not counted: they load no mesh).
  const copiesByIndex = useMemo(() => {
    const c = new Uint32Array(partIdsInOrder.length);
    for (let i = 0; i < partIndex.length; i++) if (partIndex[i] < c.length) c[partIndex[i]]++;
    return c;
  }, [partIndex, partIdsInOrder.length]);
  const meshes = useMemo(() => {
    const cost = (i: number, m: PartMesh) => (m.indices.length / 3) * (copiesByIndex[i] ?? 0);
    const order = [...loaded].sort((a, b) => cost(a[0], a[1]) - cost(b[0], b[1]));
    const out = new Map<number, PartMesh>();
    const budget = isSoftwareRenderer() ? SOFTWARE_TRIANGLE_BUDGET : SCENE_TRIANGLE_BUDGET;
    let total = 0;
    for (const [i, m] of order) {
      const c = cost(i, m);
      if (total + c > budget) continue;
      total += c;
      out.set(i, m);
    }
    return out;
  }, [loaded, copiesByIndex]);
  const onMesh = useCallback((index: number, mesh: PartMesh | null) => {
    setMeshes((m) => {
      const next = new Map(m);
      if (mesh) next.set(index, mesh);
      else next.delete(index);
      return next;
    });
  }, []);
  // A part with so many copies that even a plain mesh would break the budget is not fetched at all.
  const budget = isSoftwareRenderer() ? SOFTWARE_TRIANGLE_BUDGET : SCENE_TRIANGLE_BUDGET;
  // Keyed by a string (ids joined, '' for a part not worth fetching), so a new array of the same ids keeps the loaders.
  const key = partIdsInOrder.map((id, i) => (id && (copiesByIndex[i] ?? 0) * MIN_MESH_TRIANGLES <= budget ? id : '')).join(',');
  const loaders = useMemo(() => {
    const worth = key === '' ? [] : key.split(',');
    return worth.length > MESH_PART_LIMIT
      ? null
      : worth.map((id, i) => (id ? <PartMeshLoader key={`${i}:${id}`} labId={labId} partId={id} index={i} onMesh={onMesh} /> : null));
  }, [labId, key, onMesh]);
  return { meshes, loaders };
}
