import type { PartMesh } from '../viewer';

/** Off the web the chamber is a summary without a 3D canvas: no meshes to load. */
export function useChamberMeshes(_labId: string, _partIds: readonly (string | undefined)[], _partIndex: ArrayLike<number>): { meshes: ReadonlyMap<number, PartMesh>; loaders: React.ReactNode } {
  return { meshes: EMPTY, loaders: null };
}

const EMPTY: ReadonlyMap<number, PartMesh> = new Map();
