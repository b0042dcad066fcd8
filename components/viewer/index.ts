/**
 * The 3D views and their helpers. PartPreview and ChamberView resolve to
 * their .web.tsx files on the web and to a WebGL-free summary elsewhere.
 */
export { PartPreview, type PartPreviewProps } from './PartPreview';
export { ChamberView, type ChamberViewHandle, type ChamberViewProps } from './ChamberView';
export { LayerSlider, type LayerSliderProps } from './LayerSlider';
export { ViewToolbar } from './ViewToolbar';
export { useMeshFile, type MeshFileOptions, type MeshFileState, type MeshFileError, type MeshUnit } from './useMeshFile';
export { fetchMeshFile, MeshFileLoadError, profileLayoutInWorker } from './meshFileLoader';
export type { ViewMesh, PartMesh, ChamberPlacements, MeshProblem, ParseMeshResult, MeshWorkerApi } from './types';
export {
  LINE_PALETTE,
  lineColour,
  layerAtHeight,
  spanningAt,
  footprintAreaMm2,
  groupByPart,
  formatMm,
  fitCamera,
  type ViewName,
  type Vec3,
  type Bounds,
} from './math';
