/**
 * Scene pieces both 3D views share (web only: imported from .web.tsx files).
 * three.js's helpers assume y up; these lay them out for z up, the build
 * direction of a powder bed.
 */
import { useThree } from '@react-three/fiber';
import { useEffect, useEffectEvent, useMemo, useState } from 'react';
import * as THREE from 'three';
import { colors, fonts } from '../theme';
import { fitCamera, type Bounds, type ViewName } from './math';

export const VIEW_FOV_DEG = 40;

/** Scene colours drawn from the app's tokens so the canvas sits in the page. */
export const sceneColours = {
  background: colors.powderDeep,
  grid: colors.lineStrong,
  gridMajor: colors.inkFaint,
  outline: colors.graphite,
  usable: colors.teal,
  part: '#9AA3AD',
  arrow: colors.ember,
} as const;

/** Style of the DOM labels drawn over the canvas (drei Html): no font is fetched, the app's own mono face is used. */
export const labelStyle: React.CSSProperties = {
  fontFamily: `${fonts.mono}, ui-monospace, monospace`,
  fontSize: 12,
  lineHeight: '16px',
  color: colors.ink,
  background: 'rgba(255, 253, 249, 0.92)',
  border: `1px solid ${colors.line}`,
  borderRadius: 4,
  padding: '1px 6px',
  whiteSpace: 'nowrap',
  pointerEvents: 'none',
  userSelect: 'none',
};

interface OrbitLike {
  target: THREE.Vector3;
  update(): void;
}

/** Moves the camera (and the orbit target) to a named view of the given bounds. */
export function applyView(camera: THREE.Camera, controls: OrbitLike | null, bounds: Bounds, view: ViewName, aspect: number) {
  const pose = fitCamera(bounds, view, VIEW_FOV_DEG, aspect);
  camera.position.set(...pose.position);
  // Orbit controls are built around the up vector they started with; views change the position only.
  camera.up.set(0, 0, 1);
  if (camera instanceof THREE.PerspectiveCamera) {
    camera.near = Math.max(pose.distance / 1000, 0.01);
    camera.far = pose.distance * 20;
    camera.updateProjectionMatrix();
  }
  camera.lookAt(...pose.target);
  if (controls) {
    controls.target.set(...pose.target);
    controls.update();
  }
  // Picking casts rays from the camera's world matrix, which is otherwise brought up to date only when the next
  // frame draws: a click landing before that frame (a busy machine, a big layout) would pick by the old view.
  camera.updateMatrixWorld();
}

/** Fits the camera to `bounds` whenever they change (and on first mount). */
export function FitOnLoad({ bounds, view = 'fit' }: { bounds: Bounds; view?: ViewName }) {
  const camera = useThree((s) => s.camera);
  const controls = useThree((s) => s.controls) as unknown as OrbitLike | null;
  const size = useThree((s) => s.size);
  const invalidate = useThree((s) => s.invalidate);
  const key = `${bounds.min.join(',')}|${bounds.max.join(',')}|${controls ? 1 : 0}`;
  // Reads the latest camera, size and view without making them reasons to refit.
  const fit = useEffectEvent(() => {
    applyView(camera, controls, bounds, view, size.width / Math.max(size.height, 1));
    invalidate();
  });
  useEffect(() => {
    // Refit when the bounds or the controls change, not on every resize (the user may have orbited).
    fit();
  }, [key]);
  return null;
}

/** A floor grid in the z = 0 plane (GridHelper lies in x-z; turned a quarter about x). */
export function FloorGrid({ sizeMm, centre, stepMm }: { sizeMm: number; centre: [number, number]; stepMm: number }) {
  const grid = useMemo(() => {
    const divisions = Math.max(1, Math.min(200, Math.round(sizeMm / stepMm)));
    const g = new THREE.GridHelper(divisions * stepMm, divisions, sceneColours.gridMajor, sceneColours.grid);
    g.rotation.x = Math.PI / 2;
    (g.material as THREE.Material).transparent = true;
    (g.material as THREE.Material).opacity = 0.7;
    return g;
  }, [sizeMm, stepMm]);
  useEffect(() => () => grid.dispose(), [grid]);
  return <primitive object={grid} position={[centre[0], centre[1], 0]} />;
}

/** Edges of an axis-aligned box, as line segments. */
export function BoxOutline({ min, max, colour, opacity = 1 }: { min: readonly number[]; max: readonly number[]; colour: string; opacity?: number }) {
  const [x0, y0, z0] = min;
  const [x1, y1, z1] = max;
  // Keyed by the numbers, not the arrays, which callers often build afresh.
  const geometry = useMemo(() => {
    const box = new THREE.BoxGeometry(x1 - x0, y1 - y0, z1 - z0);
    const edges = new THREE.EdgesGeometry(box);
    box.dispose();
    return edges;
  }, [x0, y0, z0, x1, y1, z1]);
  useEffect(() => () => geometry.dispose(), [geometry]);
  return (
    <lineSegments geometry={geometry} position={[(min[0] + max[0]) / 2, (min[1] + max[1]) / 2, (min[2] + max[2]) / 2]}>
      <lineBasicMaterial color={colour} transparent={opacity < 1} opacity={opacity} />
    </lineSegments>
  );
}

/** An arrow along +z: the build direction. */
export function BuildArrow({ origin, lengthMm }: { origin: [number, number, number]; lengthMm: number }) {
  const [ox, oy, oz] = origin;
  const arrow = useMemo(
    () => new THREE.ArrowHelper(new THREE.Vector3(0, 0, 1), new THREE.Vector3(ox, oy, oz), lengthMm, sceneColours.arrow, lengthMm * 0.22, lengthMm * 0.12),
    [ox, oy, oz, lengthMm],
  );
  useEffect(() => () => arrow.dispose(), [arrow]);
  return <primitive object={arrow} />;
}

export function Lights({ span }: { span: number }) {
  return (
    <>
      <ambientLight intensity={0.9} />
      {/* key light from the front right, above; a weaker fill from behind so the back faces read */}
      <directionalLight position={[span * 0.8, -span * 1.2, span * 1.6]} intensity={1.6} />
      <directionalLight position={[-span, span * 0.8, span * 0.6]} intensity={0.5} />
    </>
  );
}

/**
 * True from the render after mount. drei's Html mounted in the canvas's very
 * first commit can lose its content when the canvas connects its event
 * target in that same commit (seen with three labels: the first stayed
 * empty), so labels wait one render.
 */
export function useMounted(): boolean {
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  return mounted;
}

let software: boolean | null = null;

/**
 * True when WebGL runs on a software rasteriser (a PC or virtual machine
 * without graphics acceleration, or a headless browser). Every pixel then
 * costs CPU time, so the views turn multisampling off and keep to one
 * device pixel. Probed once with a throwaway context.
 */
export function isSoftwareRenderer(): boolean {
  if (software !== null) return software;
  software = false;
  try {
    const canvas = document.createElement('canvas');
    const gl = (canvas.getContext('webgl2') ?? canvas.getContext('webgl')) as WebGLRenderingContext | null;
    if (gl) {
      const info = gl.getExtension('WEBGL_debug_renderer_info');
      const renderer = String(info ? gl.getParameter(info.UNMASKED_RENDERER_WEBGL) : gl.getParameter(gl.RENDERER));
      software = /swiftshader|llvmpipe|softpipe|software|basic render/i.test(renderer);
      gl.getExtension('WEBGL_lose_context')?.loseContext();
    }
  } catch {
    // no WebGL at all: the canvas will report its own error
  }
  return software;
}
