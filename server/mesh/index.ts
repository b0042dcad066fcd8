export { measureFile, meshPool, closeMeshPool, configureMeshPool, defaultMeshThreads, MeshPool, profileLayout } from './pool';
export type { MeshPoolOptions } from './pool';
export type { FileMeasureResult, ServerProblem } from './protocol';
