export { measureFile, meshPool, closeMeshPool, MeshPool, profileLayout } from './pool';
export type { MeshPoolOptions } from './pool';
export type { FileMeasureResult, ServerProblem } from './protocol';
