/**
 * The time limit heavy meshes need before a packing by shape can nest them, in seconds: 2.5 s per million
 * triangles of the distinct parts' meshes, rounded up, from a quarter of a million on (0 below: lighter meshes are
 * ready within the shortest limit the plan editor takes). Measured with the engine on a 2-CPU machine (the meshes
 * of `npm run bench:pack -- --heavy`, docs/benchmarks.md): two rings of a million triangles each and a housing
 * were packed by their boxes at 4 s and by shape from 5 s; one such ring by its box at 2.5 s and by shape at 3 s
 * (since a tree of the exact check is begun only when it is foreseen to end in time; before, 4 s and 2 s).
 * The engine's fallback warning (./engine.ts) and the editor's note before a run both say it.
 */
export function meshShapeSeconds(triangles: number): number {
  return triangles < 250_000 ? 0 : Math.ceil((2.5 * triangles) / 1e6);
}
