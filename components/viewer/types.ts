/**
 * Plain data the 3D views take. The mesh worker's answer is typed once, in
 * workers/mesh.protocol.ts (components/ start the worker by URL and import
 * only its protocol); it is still checked when it arrives.
 */
import type { StyleProp, ViewStyle } from 'react-native';
import type { MeshProblem, MeshWorkerApi, ParseMeshResult, ViewMesh as WorkerMesh } from '../../workers/mesh.protocol';
import type { FrameName, Vec3, ViewName } from './math';

export type { MeshProblem, MeshWorkerApi, ParseMeshResult };

/** A triangle mesh ready to draw: millimetres, z up (the build direction). The bounds are computed from the positions when left out. */
export type ViewMesh = Pick<WorkerMesh, 'positions' | 'indices'> & Partial<Omit<WorkerMesh, 'positions' | 'indices'>>;

/**
 * A layout as the chamber view draws it: typed arrays, one entry (or triple)
 * per placement. `partIndex` names the part (an index into the plan's parts),
 * `lineIndex` the request line it fills.
 */
export interface ChamberPlacements {
  /** Minimum corner x, y, z of each placed box, mm. */
  positions: Float32Array | Float64Array;
  /** Placed extent x, y, z, mm. */
  sizes: Float32Array | Float64Array;
  partIndex: Uint32Array;
  lineIndex: Uint32Array;
  /** Rotation of each placement, 0..23 (shared/geometry/rotations.ts; 0..5 = xyz, xzy, yxz, yzx, zxy, zyx); a mesh is drawn as placed. Boxes need none. */
  rotations?: Uint8Array;
}

/** A part's mesh for the chamber view, in the part's own axes. */
export interface PartMesh {
  positions: Float32Array;
  indices: Uint32Array;
  sizeMm: Vec3;
}

export interface ChamberViewHandle {
  /** Moves the camera to a named view of what is framed (the parts, or the whole chamber). */
  setView(view: ViewName): void;
  /** Frames the placed parts or the whole chamber, and fits the view to it. */
  setFrame(frame: FrameName): void;
  /** Switches between framing the parts and the whole chamber. */
  toggleFrame(): void;
  /** Moves the cut without a React render (for a slider being dragged); null removes it. */
  setCutHeight(heightMm: number | null): void;
}

export interface ChamberViewProps {
  /** Inner build volume x, y, z in mm. */
  chamberMm: Vec3;
  /** Keep-out from the walls, under the lowest part and over the highest, in mm. */
  margin: { xy: number; bottom: number; top: number };
  placements: ChamberPlacements;
  /** Meshes by part index, in the part's own axes; a part without one is drawn as its box. */
  meshesByPart?: ReadonlyMap<number, PartMesh>;
  /** Hex colour by line index; the Sinterstack line palette when left out. */
  lineColours?: readonly string[];
  /** Cut height in mm: what lies above is clipped and the layer under it is drawn in section. Null or absent: no cut. */
  cutHeightMm?: number | null;
  /** Placement under the pointer (null when it leaves the parts). */
  onHover?: (placementIndex: number | null) => void;
  /** Placement clicked or tapped (null for a click on empty space). */
  onPick?: (placementIndex: number | null) => void;
  /**
   * A press on a placement: return true to drag the parts the editor moves (the camera holds still until release).
   * Left out, or false, the press turns the view as usual.
   */
  onDragStart?: (placementIndex: number) => boolean;
  /**
   * The drag's travel across the plate since the press, in mm along x and y: while moving (at most once a frame),
   * once more on release ('end'), or 'cancel' when the pointer was taken away (nothing is to change then).
   */
  onDrag?: (dxMm: number, dyMm: number, phase: 'move' | 'end' | 'cancel') => void;
  /** Text for the label shown at the hovered placement, e.g. its line and part. */
  describePlacement?: (placementIndex: number) => string;
  /** Called once, on the first rendered frame, with performance.now(). */
  onFirstFrame?: (msSinceNavigation: number) => void;
  /** What the views frame at first: the placed parts unless 'chamber'. */
  initialFrame?: FrameName;
  /** The frame and fit / top / front / side buttons; shown unless false. */
  showToolbar?: boolean;
  /** Device pixel ratio range; [1, 1.5] by default, 1 on a software renderer. */
  dpr?: number | [number, number];
  /** Multisampled edges; on by default, off on a software renderer (see isSoftwareRenderer). */
  antialias?: boolean;
  style?: StyleProp<ViewStyle>;
}

