// Over 450 lines: one three.js scene (instancing, cut plane, picking) whose parts share the scene's refs.
/**
 * The build chamber in 3D: every placement drawn through instancing (one
 * InstancedMesh, so one draw call, per distinct part), coloured by request
 * line, with the chamber and its usable region outlined, a cut at a layer
 * height and that layer's cross-section, and picking.
 *
 * Thousands of placements stay interactive because nothing here sets React
 * state per frame: instance matrices are written into the instanced
 * buffers in a layout effect when the layout changes, the cut moves a
 * clipping plane and refills the section buffer through refs, and the canvas
 * only renders on demand (orbit, hover, a new cut).
 *
 * Parts the editor lets move are dragged across the plate with the pointer
 * (usePlateDrag): the view reports the travel and the editor redraws the
 * layout as it would be released, checked as it goes.
 *
 * Time to interactive: on the first rendered frame the view sets
 * `window.__chamberReady = performance.now()` (ms since navigation) and
 * `window.__chamberStats = { placements, parts, drawCalls, triangles }`, and
 * calls `onFirstFrame(ms)`, so a browser test can read the figure.
 *
 *        z (build direction)
 *        ^        cut plane at cutHeightMm: above it is clipped away,
 *        |  +------------------+  on it the boxes that span it are
 *        |  | . . . usable . . |  drawn as flat rectangles
 *        |  | .  [] []  [] . . |
 *        |  | .[]  [] []  [] . |
 *        +--+------------------+--> x   chamber outline, floor grid
 */
import { Html, OrbitControls } from '@react-three/drei';
import { Canvas, useFrame, useThree, type ThreeEvent } from '@react-three/fiber';
import { forwardRef, memo, useEffect, useEffectEvent, useImperativeHandle, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import * as THREE from 'three';
import { colors } from '../theme';
import { BVH_MIN_TRIANGLES, installBvh } from './bvh';
import {
  LINE_PALETTE,
  UNIT_CUBE,
  boundsOf,
  framedBounds,
  groupByPart,
  instanceColours,
  instanceMatrices,
  sectionMatrices,
  spanningAt,
  type Bounds,
  type FrameName,
  type LocalBounds,
  type Vec3,
  type ViewName,
} from './math';
import { BoxOutline, FloorGrid, Lights, VIEW_FOV_DEG, applyView, isSoftwareRenderer, labelStyle, sceneColours } from './scene';
import { usePlateDrag, type PlateDrag } from './usePlateDrag';
import { ViewToolbar } from './ViewToolbar';
import type { ChamberPlacements, ChamberViewHandle, ChamberViewProps, PartMesh } from './types';

installBvh();

export type { ChamberViewHandle, ChamberViewProps };

declare global {
  interface Window {
    __chamberReady?: number;
    __chamberStats?: { placements: number; parts: number; drawCalls: number; triangles: number };
    __chamberProbe?: ChamberProbe;
  }
}

/**
 * What a browser test reads of the view as drawn: where a point of the chamber lands on the page, which placement
 * is under a page point (as a click would pick it), and a placement's box.
 */
interface ChamberProbe {
  screenOf(pointMm: Vec3): { x: number; y: number };
  placementAt(clientX: number, clientY: number): number | null;
  boxOf(index: number): { position: Vec3; size: Vec3 } | null;
  count: number;
  /** Placements drawn with their part's mesh (the rest as their boxes). */
  meshed: number;
}

const HIGHLIGHT = new THREE.Color(colors.ember);
const NO_CUT = 1e9;

interface Controller {
  setView: (view: ViewName) => void;
  applyCut: (heightMm: number | null) => void;
}

/** Shared hover state, mutated by events, never by frames. */
interface HoverState {
  mesh: THREE.InstancedMesh | null;
  instanceId: number;
  placement: number | null;
  saved: THREE.Color;
}

export const ChamberView = forwardRef<ChamberViewHandle, ChamberViewProps>(function ChamberView(props, ref) {
  const { chamberMm, margin, placements, meshesByPart, lineColours, cutHeightMm, onHover, onPick, onDragStart, onDrag, describePlacement, onFirstFrame, showToolbar = true, style } = props;
  const [frame, setFrame] = useState<FrameName>(props.initialFrame ?? 'parts');
  const [software] = useState(isSoftwareRenderer);
  const dpr = props.dpr ?? (software ? 1 : [1, 1.5]);
  const antialias = props.antialias ?? !software;
  const controller = useRef<Controller | null>(null);
  const cutRef = useRef<number | null>(cutHeightMm ?? null);

  useImperativeHandle(ref, () => ({
    setView: (view) => controller.current?.setView(view),
    setFrame,
    toggleFrame: () => setFrame((f) => (f === 'parts' ? 'chamber' : 'parts')),
    setCutHeight: (h) => {
      cutRef.current = h;
      controller.current?.applyCut(h);
    },
  }));

  // The latest callbacks, read by event handlers without re-rendering the scene when a parent passes new closures.
  const callbacks = useRef({ onHover, onPick, onDragStart, onDrag, describePlacement, onFirstFrame });
  callbacks.current = { onHover, onPick, onDragStart, onDrag, describePlacement, onFirstFrame };

  const span = Math.max(chamberMm[0], chamberMm[1], chamberMm[2]);
  return (
    <View style={[styles.frame, style]} testID="chamber-view">
      {/* Over the canvas, not on it: laid on the picture it hid the parts framed at its top edge (a phone wraps it). */}
      {showToolbar ? <ViewToolbar onView={(v) => controller.current?.setView(v)} frame={frame} onFrame={setFrame} style={styles.toolbar} /> : null}
      <View style={styles.canvasBox}>
        <Canvas
          frameloop="demand"
          dpr={dpr}
          camera={{ up: [0, 0, 1], fov: VIEW_FOV_DEG, position: [span, -span, span], near: 1, far: span * 20 }}
          gl={{ antialias, powerPreference: 'high-performance' }}
          style={{ width: '100%', height: '100%' }}
          onCreated={({ gl, scene }) => {
            gl.localClippingEnabled = true;
            scene.background = new THREE.Color(sceneColours.background);
          }}
          onPointerMissed={() => callbacks.current.onPick?.(null)}
        >
          <ChamberScene
            chamberMm={chamberMm}
            margin={margin}
            placements={placements}
            meshesByPart={meshesByPart}
            lineColours={lineColours}
            cutHeightMm={cutHeightMm ?? null}
            frame={frame}
            cutRef={cutRef}
            controller={controller}
            callbacks={callbacks}
          />
        </Canvas>
      </View>
    </View>
  );
});

interface SceneProps {
  chamberMm: Vec3;
  margin: { xy: number; bottom: number; top: number };
  placements: ChamberPlacements;
  meshesByPart?: ReadonlyMap<number, PartMesh>;
  lineColours?: readonly string[];
  cutHeightMm: number | null;
  frame: FrameName;
  cutRef: React.MutableRefObject<number | null>;
  controller: React.MutableRefObject<Controller | null>;
  callbacks: React.MutableRefObject<Pick<ChamberViewProps, 'onHover' | 'onPick' | 'onDragStart' | 'onDrag' | 'describePlacement' | 'onFirstFrame'>>;
}

function ChamberScene({ chamberMm, margin, placements, meshesByPart, lineColours, cutHeightMm, frame, cutRef, controller, callbacks }: SceneProps) {
  const camera = useThree((s) => s.camera);
  const controls = useThree((s) => s.controls) as unknown as { target: THREE.Vector3; update(): void } | null;
  const size = useThree((s) => s.size);
  const invalidate = useThree((s) => s.invalidate);
  const scene = useThree((s) => s.scene);
  const gl = useThree((s) => s.gl);
  const plateDrag = usePlateDrag(callbacks);
  // The view last asked for (fit, top, front, side): a refit for new bounds keeps looking the same way.
  const lastView = useRef<ViewName>('fit');
  const palette = lineColours && lineColours.length > 0 ? lineColours : LINE_PALETTE;

  const [cx, cy, cz] = chamberMm;
  const chamberBounds: Bounds = useMemo(() => ({ min: [0, 0, 0], max: [cx, cy, cz] }), [cx, cy, cz]);
  // What the views keep in sight; the camera is fitted again only when these bounds change by a whole millimetre.
  const framed = useMemo(() => framedBounds(placements, [cx, cy, cz], frame), [placements, cx, cy, cz, frame]);
  const framedKey = `${frame}|${framed.min.map(Math.round).join(',')}|${framed.max.map(Math.round).join(',')}`;
  const usable: Bounds = { min: [margin.xy, margin.xy, margin.bottom], max: [chamberMm[0] - margin.xy, chamberMm[1] - margin.xy, chamberMm[2] - margin.top] };
  const groups = useMemo(() => groupByPart(placements.partIndex), [placements.partIndex]);
  // Views made once per layout, so a new cut does not look like new instances to the memoised parts.
  const lists = useMemo(() => Array.from(groups.parts, (_, k) => groups.order.subarray(groups.offsets[k], groups.offsets[k + 1])), [groups]);

  // One clipping plane, one material for every part, one unit box, one section square: shared, never per placement.
  // Lambert rather than physically based shading: thousands of parts cover most pixels several times over, and
  // diffuse light reads a packed bed as well at a fraction of the fragment cost. Front faces only: a part cut
  // open by the layer plane shows the section rectangle over its hole, not its inside.
  const clipPlane = useMemo(() => new THREE.Plane(new THREE.Vector3(0, 0, -1), NO_CUT), []);
  const partMaterial = useMemo(
    () => new THREE.MeshLambertMaterial({ color: '#ffffff', flatShading: true, side: THREE.FrontSide, clippingPlanes: [clipPlane] }),
    [clipPlane],
  );
  const boxGeometry = useMemo(() => new THREE.BoxGeometry(1, 1, 1).translate(0.5, 0.5, 0.5), []);
  useEffect(
    () => () => {
      partMaterial.dispose();
      boxGeometry.dispose();
    },
    [partMaterial, boxGeometry],
  );

  const hover = useRef<HoverState>({ mesh: null, instanceId: -1, placement: null, saved: new THREE.Color() });
  const label = useRef<{ show(at: Vec3 | null, text: string): void } | null>(null);
  const section = useRef<SectionHandle | null>(null);
  const cutOutline = useRef<THREE.LineLoop>(null);

  const applyCut = (h: number | null) => {
    const active = h !== null && Number.isFinite(h);
    clipPlane.constant = active ? (h as number) : NO_CUT;
    section.current?.show(active ? (h as number) : null);
    if (cutOutline.current) {
      cutOutline.current.visible = active;
      if (active) cutOutline.current.position.z = h as number;
    }
    invalidate();
  };
  controller.current = {
    setView: (view) => {
      lastView.current = view;
      applyView(camera, controls, framed, view, size.width / Math.max(size.height, 1));
      invalidate();
    },
    applyCut,
  };

  // A new layout rewrites every instance colour: forget the highlighted one rather than restore a stale colour.
  useLayoutEffect(() => {
    hover.current = { mesh: null, instanceId: -1, placement: null, saved: new THREE.Color() };
    label.current?.show(null, '');
  }, [placements]);

  // The cut is reapplied for a new cut height or a new layout, with whatever the scene holds now.
  const reapplyCut = useEffectEvent((h: number | null) => applyCut(h));
  useLayoutEffect(() => {
    cutRef.current = cutHeightMm;
    reapplyCut(cutHeightMm);
  }, [cutHeightMm, placements, cutRef]);

  // Fit once the orbit controls exist, and again when what is framed changes: the other frame, a layout of another
  // extent, a different chamber (not on resize: the user may have orbited). Not while parts are dragged: the camera
  // holds still under the pointer, and the layout released has the extent last seen while dragging.
  const fit = useEffectEvent((target: NonNullable<typeof controls>) => {
    if (plateDrag.active()) return;
    applyView(camera, target, framed, lastView.current, size.width / Math.max(size.height, 1));
    invalidate();
  });
  useEffect(() => {
    if (!controls) return;
    fit(controls);
  }, [controls, framedKey]);

  const events = useMemo(() => makeEvents(hover, cutRef, callbacks, label, invalidate, placements, plateDrag), [callbacks, cutRef, invalidate, placements, plateDrag]);

  useEffect(() => {
    const v = new THREE.Vector3();
    const caster = new THREE.Raycaster();
    let meshed = 0;
    for (let k = 0; k < groups.parts.length; k++) if (meshesByPart?.has(groups.parts[k])) meshed += lists[k].length;
    window.__chamberProbe = {
      count: placements.partIndex.length,
      meshed,
      screenOf(point) {
        v.set(...point).project(camera);
        const r = gl.domElement.getBoundingClientRect();
        return { x: r.left + ((v.x + 1) / 2) * r.width, y: r.top + ((1 - v.y) / 2) * r.height };
      },
      placementAt(clientX, clientY) {
        const r = gl.domElement.getBoundingClientRect();
        caster.setFromCamera(new THREE.Vector2(((clientX - r.left) / r.width) * 2 - 1, 1 - ((clientY - r.top) / r.height) * 2), camera);
        for (const hit of caster.intersectObjects(scene.children, true)) {
          const list = (hit.object.userData as { list?: Uint32Array }).list;
          if (!list || hit.instanceId === undefined) continue;
          if (cutRef.current !== null && hit.point.z > cutRef.current + 1e-3) continue;
          return list[hit.instanceId];
        }
        return null;
      },
      boxOf(i) {
        if (i < 0 || i >= placements.partIndex.length) return null;
        const p = placements.positions;
        const s = placements.sizes;
        return { position: [p[3 * i], p[3 * i + 1], p[3 * i + 2]], size: [s[3 * i], s[3 * i + 1], s[3 * i + 2]] };
      },
    };
    return () => {
      delete window.__chamberProbe;
    };
  }, [camera, gl, scene, placements, cutRef, groups, lists, meshesByPart]);

  const parts: React.ReactNode[] = [];
  for (let k = 0; k < groups.parts.length; k++) {
    const part = groups.parts[k];
    const list = lists[k];
    const mesh = meshesByPart?.get(part);
    parts.push(
      <PartInstances
        key={`${part}:${list.length}:${mesh ? 'mesh' : 'box'}`}
        list={list}
        placements={placements}
        mesh={mesh}
        boxGeometry={boxGeometry}
        material={partMaterial}
        palette={palette}
        events={events}
      />,
    );
  }

  const gridStep = span10(Math.max(chamberMm[0], chamberMm[1]));
  return (
    <>
      <Lights span={Math.max(...chamberMm)} />
      {parts}
      <SectionRects placements={placements} palette={palette} handle={section} />
      <CutOutline ref={cutOutline} chamberMm={chamberMm} />
      <BoxOutline min={chamberBounds.min} max={chamberBounds.max} colour={sceneColours.outline} opacity={0.9} />
      <BoxOutline min={usable.min} max={usable.max} colour={sceneColours.usable} opacity={0.55} />
      <FloorGrid sizeMm={Math.max(chamberMm[0], chamberMm[1])} centre={[chamberMm[0] / 2, chamberMm[1] / 2]} stepMm={gridStep} />
      <HoverLabel handle={label} />
      <OrbitControls makeDefault enableDamping={false} />
      <FirstFrame callbacks={callbacks} placements={placements.partIndex.length} parts={groups.parts.length} />
    </>
  );
}

/** Grid step: 10 mm on a bench-top chamber, coarser on a big one so the lines stay apart. */
function span10(sizeMm: number): number {
  return sizeMm > 600 ? 50 : sizeMm > 300 ? 20 : 10;
}

interface PartEvents {
  onPointerDown(e: ThreeEvent<PointerEvent>): void;
  onPointerMove(e: ThreeEvent<PointerEvent>): void;
  onPointerOut(e: ThreeEvent<PointerEvent>): void;
  onClick(e: ThreeEvent<MouseEvent>): void;
}

function placementOf(e: ThreeEvent<PointerEvent | MouseEvent>): number | null {
  const list = (e.object.userData as { list?: Uint32Array }).list;
  return list && e.instanceId !== undefined ? list[e.instanceId] : null;
}

function makeEvents(
  hover: React.MutableRefObject<HoverState>,
  cutRef: React.MutableRefObject<number | null>,
  callbacks: SceneProps['callbacks'],
  label: React.MutableRefObject<{ show(at: Vec3 | null, text: string): void } | null>,
  invalidate: () => void,
  placements: ChamberPlacements,
  plateDrag: PlateDrag,
): PartEvents {
  // A ray ignores clipping: a hit above the cut lands on a part that is not drawn, so let the event pass to the next hit.
  const clipped = (e: ThreeEvent<PointerEvent | MouseEvent>) => cutRef.current !== null && e.point.z > cutRef.current + 1e-3;

  const restore = () => {
    const h = hover.current;
    if (h.mesh && h.instanceId >= 0 && h.mesh.instanceColor) {
      h.mesh.setColorAt(h.instanceId, h.saved);
      h.mesh.instanceColor.needsUpdate = true;
    }
    h.mesh = null;
    h.instanceId = -1;
  };

  const setHover = (mesh: THREE.InstancedMesh | null, instanceId: number, placement: number | null) => {
    const h = hover.current;
    if (h.placement === placement) return;
    restore();
    h.placement = placement;
    if (mesh && placement !== null && mesh.instanceColor) {
      mesh.getColorAt(instanceId, h.saved);
      mesh.setColorAt(instanceId, HIGHLIGHT);
      mesh.instanceColor.needsUpdate = true;
      h.mesh = mesh;
      h.instanceId = instanceId;
      const describe = callbacks.current.describePlacement;
      if (describe) {
        const p = placements.positions;
        const s = placements.sizes;
        const i = placement;
        label.current?.show([p[3 * i] + s[3 * i] / 2, p[3 * i + 1] + s[3 * i + 1] / 2, p[3 * i + 2] + s[3 * i + 2]], describe(i));
      }
    } else {
      label.current?.show(null, '');
    }
    callbacks.current.onHover?.(placement);
    invalidate();
  };

  return {
    onPointerDown(e) {
      if (clipped(e)) return;
      const i = placementOf(e);
      if (i === null || !plateDrag.press(e.nativeEvent, i, placements.positions[3 * i + 2])) return;
      e.stopPropagation();
      setHover(null, -1, null);
    },
    onPointerMove(e) {
      if (clipped(e) || plateDrag.active()) return;
      e.stopPropagation();
      setHover(e.object as THREE.InstancedMesh, e.instanceId ?? -1, placementOf(e));
    },
    onPointerOut() {
      setHover(null, -1, null);
    },
    onClick(e) {
      // A drag that turns the view and ends over a part is not a click on it (delta: px moved since the press).
      if (clipped(e) || e.delta > 4) return;
      e.stopPropagation();
      callbacks.current.onPick?.(placementOf(e));
    },
  };
}

interface PartInstancesProps {
  list: Uint32Array;
  placements: ChamberPlacements;
  mesh?: PartMesh;
  boxGeometry: THREE.BufferGeometry;
  material: THREE.Material;
  palette: readonly string[];
  events: PartEvents;
}

/** All placements of one part: one InstancedMesh, one draw call. */
const PartInstances = memo(function PartInstances({ list, placements, mesh, boxGeometry, material, palette, events }: PartInstancesProps) {
  const ref = useRef<THREE.InstancedMesh>(null);
  const invalidate = useThree((s) => s.invalidate);
  const { geometry, local } = useMemo(() => {
    if (!mesh) return { geometry: boxGeometry, local: UNIT_CUBE as LocalBounds };
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.BufferAttribute(mesh.positions, 3));
    g.setIndex(new THREE.BufferAttribute(mesh.indices, 1));
    g.computeBoundingBox();
    g.computeBoundingSphere();
    if (mesh.indices.length / 3 >= BVH_MIN_TRIANGLES) g.computeBoundsTree();
    return { geometry: g, local: boundsOf(mesh.positions) as LocalBounds };
  }, [mesh, boxGeometry]);
  useEffect(
    () => () => {
      if (geometry !== boxGeometry) {
        geometry.disposeBoundsTree?.();
        geometry.dispose();
      }
    },
    [geometry, boxGeometry],
  );

  useLayoutEffect(() => {
    const im = ref.current;
    if (!im) return;
    instanceMatrices(placements.positions, placements.sizes, list, local, mesh ? placements.rotations : undefined, im.instanceMatrix.array as Float32Array);
    im.instanceMatrix.needsUpdate = true;
    im.instanceColor = new THREE.InstancedBufferAttribute(instanceColours(placements.lineIndex, list, palette), 3);
    im.userData.list = list;
    // Bounds over every instance: frustum culling and the raycast's first test use them.
    im.computeBoundingBox();
    im.computeBoundingSphere();
    invalidate();
  }, [list, placements, local, mesh, palette, invalidate]);

  return (
    <instancedMesh
      ref={ref}
      args={[geometry, material, list.length]}
      onPointerDown={events.onPointerDown}
      onPointerMove={events.onPointerMove}
      onPointerOut={events.onPointerOut}
      onClick={events.onClick}
    />
  );
});

/** The cut plane's edge around the chamber walls, so the cut reads at any camera angle. */
const CutOutline = forwardRef<THREE.LineLoop, { chamberMm: Vec3 }>(function CutOutline({ chamberMm }, ref) {
  const [x, y] = chamberMm;
  const geometry = useMemo(
    () => new THREE.BufferGeometry().setAttribute('position', new THREE.BufferAttribute(Float32Array.from([0, 0, 0, x, 0, 0, x, y, 0, 0, y, 0]), 3)),
    [x, y],
  );
  useEffect(() => () => geometry.dispose(), [geometry]);
  return (
    <lineLoop ref={ref} geometry={geometry} visible={false}>
      <lineBasicMaterial color={sceneColours.arrow} />
    </lineLoop>
  );
});

interface SectionHandle {
  show(heightMm: number | null): void;
}

/**
 * The cross-section at the cut: a flat rectangle over each box that spans
 * the layer, in its line's colour. One instanced mesh sized for every
 * placement; a new cut only rewrites the buffers and the count.
 */
function SectionRects({ placements, palette, handle }: { placements: ChamberPlacements; palette: readonly string[]; handle: React.MutableRefObject<SectionHandle | null> }) {
  const ref = useRef<THREE.InstancedMesh>(null);
  const n = placements.partIndex.length;
  const geometry = useMemo(() => new THREE.PlaneGeometry(1, 1).translate(0.5, 0.5, 0), []);
  const material = useMemo(
    () =>
      new THREE.MeshBasicMaterial({
        color: '#ffffff',
        side: THREE.DoubleSide,
        // drawn on the cut, where the clipped parts' faces end: pull it forward so it wins the depth test
        polygonOffset: true,
        polygonOffsetFactor: -2,
        polygonOffsetUnits: -2,
      }),
    [],
  );
  useEffect(
    () => () => {
      geometry.dispose();
      material.dispose();
    },
    [geometry, material],
  );

  useLayoutEffect(() => {
    // Colours exist from the start so the material is built for per-instance colour once.
    if (ref.current && !ref.current.instanceColor) ref.current.instanceColor = new THREE.InstancedBufferAttribute(new Float32Array(Math.max(n, 1) * 3), 3);
    handle.current = {
      show(h) {
        const im = ref.current;
        if (!im) return;
        if (h === null) {
          im.count = 0;
          im.visible = false;
          return;
        }
        const list = spanningAt(placements.positions, placements.sizes, h);
        sectionMatrices(placements.positions, placements.sizes, list, h, im.instanceMatrix.array as Float32Array);
        if (!im.instanceColor) im.instanceColor = new THREE.InstancedBufferAttribute(new Float32Array(Math.max(n, 1) * 3), 3);
        instanceColours(placements.lineIndex, list, palette, im.instanceColor.array as Float32Array);
        im.count = list.length;
        im.visible = list.length > 0;
        im.instanceMatrix.needsUpdate = true;
        im.instanceColor.needsUpdate = true;
        im.computeBoundingSphere();
      },
    };
    return () => {
      handle.current = null;
    };
  }, [handle, placements, palette, n]);

  return <instancedMesh ref={ref} key={n} args={[geometry, material, Math.max(n, 1)]} visible={false} renderOrder={2} />;
}

/** The hovered placement's label: its own small state, set by pointer events, never per frame. */
function HoverLabel({ handle }: { handle: React.MutableRefObject<{ show(at: Vec3 | null, text: string): void } | null> }) {
  const [shown, setShown] = useState<{ at: Vec3; text: string } | null>(null);
  useLayoutEffect(() => {
    handle.current = { show: (at, text) => setShown(at ? { at, text } : null) };
    return () => {
      handle.current = null;
    };
  }, [handle]);
  if (!shown) return null;
  return (
    <Html position={shown.at} center zIndexRange={[20, 0]} style={{ transform: 'translateY(-18px)' }}>
      <div style={labelStyle}>{shown.text}</div>
    </Html>
  );
}

/** Reports the first rendered frame (see the file comment). */
function FirstFrame({ callbacks, placements, parts }: { callbacks: SceneProps['callbacks']; placements: number; parts: number }) {
  const done = useRef(false);
  const gl = useThree((s) => s.gl);
  useFrame(() => {
    if (done.current) return;
    done.current = true;
    // useFrame runs just before the render of this frame; the next animation frame comes after it.
    requestAnimationFrame(() => {
      const t = performance.now();
      if (typeof window !== 'undefined') {
        window.__chamberReady = t;
        window.__chamberStats = { placements, parts, drawCalls: gl.info.render.calls, triangles: gl.info.render.triangles };
      }
      callbacks.current.onFirstFrame?.(t);
    });
  });
  return null;
}

const styles = StyleSheet.create({
  frame: { width: '100%', height: '100%', minHeight: 320, borderRadius: 8, overflow: 'hidden', backgroundColor: colors.powderDeep },
  toolbar: { alignSelf: 'flex-end', maxWidth: '100%', margin: 6 },
  canvasBox: { flex: 1, minHeight: 0 },
});
