export { measureFile, meshPool, closeMeshPool, MeshPool } from './pool';
export type { MeshPoolOptions } from './pool';
export type { FileMeasureResult, ServerProblem } from './protocol';
