/**
 * The part page's 3D preview: the mesh shaded, its bounding box with the
 * x, y and z extents in mm, the build direction and the floor, orbitable.
 *
 * The part is drawn in its own axes with z as the build direction, moved so
 * its box sits centred on the floor:
 *
 *            z  ^  build direction
 *               |   +-------+
 *               |  /|      /|  <- bounding box, labelled x, y, z
 *               | +-------+ |
 *               | | +-----|-+
 *               | |/      |/
 *   floor grid  ==+-------+====> x
 */
import { Html, OrbitControls } from '@react-three/drei';
import { Canvas } from '@react-three/fiber';
import { useEffect, useMemo } from 'react';
import { StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';
import * as THREE from 'three';
import { colors } from '../theme';
import { boundsOf, formatMm, separateLabels, sizeOf, type Bounds, type Vec3 } from './math';
import { BoxOutline, BuildArrow, FitOnLoad, FloorGrid, Lights, VIEW_FOV_DEG, labelStyle, sceneColours, useMounted } from './scene';

export interface PartPreviewProps {
  mesh: { positions: Float32Array; indices: Uint32Array };
  /** The measured bounding box extent (from the server); computed from the mesh when left out. */
  sizeMm?: Vec3;
  /** Only z up is supported: the file's z is the build direction. */
  upAxis?: 'z';
  style?: StyleProp<ViewStyle>;
  /** Accessible description of the preview. */
  accessibilityLabel?: string;
}

export function PartPreview({ mesh, sizeMm, style, accessibilityLabel }: PartPreviewProps) {
  const fileBounds = useMemo(() => boundsOf(mesh.positions), [mesh.positions]);
  const drawnSize = sizeOf(fileBounds);
  const labelSize = sizeMm ?? drawnSize;
  // Centre on the floor: x and y about 0, the lowest point on z = 0.
  const offset: Vec3 = [-(fileBounds.min[0] + fileBounds.max[0]) / 2, -(fileBounds.min[1] + fileBounds.max[1]) / 2, -fileBounds.min[2]];
  const half: Vec3 = [drawnSize[0] / 2, drawnSize[1] / 2, drawnSize[2]];
  const box: Bounds = { min: [-half[0], -half[1], 0], max: [half[0], half[1], half[2]] };
  const span = Math.max(drawnSize[0], drawnSize[1], drawnSize[2], 1);

  const geometry = useMemo(() => {
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.BufferAttribute(mesh.positions, 3));
    g.setIndex(new THREE.BufferAttribute(mesh.indices, 1));
    // Smooth normals blur the edges of a machined-looking part; flat shading needs none.
    g.computeBoundingSphere();
    return g;
  }, [mesh.positions, mesh.indices]);
  useEffect(() => () => geometry.dispose(), [geometry]);

  const gridStep = niceStep(span / 6);
  const arrowAt: [number, number, number] = [box.min[0] - span * 0.18, box.min[1] - span * 0.18, 0];
  const label = accessibilityLabel ?? `3D preview, ${formatMm(labelSize[0])} by ${formatMm(labelSize[1])} by ${formatMm(labelSize[2])}`;

  return (
    <View style={[styles.frame, style]} accessibilityLabel={label} accessibilityRole="image" testID="part-preview">
      <Canvas
        frameloop="demand"
        dpr={[1, 2]}
        camera={{ up: [0, 0, 1], fov: VIEW_FOV_DEG, position: [span, -span, span], near: 0.1, far: span * 50 }}
        style={{ width: '100%', height: '100%' }}
        onCreated={({ scene }) => {
          scene.background = new THREE.Color(sceneColours.background);
        }}
      >
        <Lights span={span} />
        <group position={offset}>
          <mesh geometry={geometry}>
            <meshStandardMaterial color={sceneColours.part} flatShading metalness={0.05} roughness={0.75} side={THREE.DoubleSide} />
          </mesh>
        </group>
        <BoxOutline min={box.min} max={box.max} colour={sceneColours.outline} opacity={0.8} />
        <DimensionLabels box={box} labelSize={labelSize} />
        <BuildArrow origin={arrowAt} lengthMm={Math.max(span * 0.45, 1)} />
        <ArrowLabel at={[arrowAt[0], arrowAt[1], span * 0.5]} />
        <FloorGrid sizeMm={span * 2} centre={[0, 0]} stepMm={gridStep} />
        <OrbitControls makeDefault enableDamping={false} />
        <FitOnLoad bounds={{ min: [box.min[0] - span * 0.2, box.min[1] - span * 0.2, 0], max: box.max }} />
      </Canvas>
    </View>
  );
}

/** The label's width on screen: 12 px Roboto Mono advances 0.6 em a character, with 6 px padding and a border a side. */
const labelWidth = (text: string) => text.length * 7.2 + 14;

/**
 * The x, y and z extents, each at the middle of a bottom or upright edge of the box. The y edge and the upright
 * edge meet at the corner nearest the camera, and on a flat or short part their middles come close on screen, so
 * the labels are pushed apart where they would cover each other (./math.ts separateLabels).
 */
function DimensionLabels({ box, labelSize }: { box: Bounds; labelSize: Vec3 }) {
  const texts = [`x ${formatMm(labelSize[0])}`, `y ${formatMm(labelSize[1])}`, `z ${formatMm(labelSize[2])}`];
  const anchors: Vec3[] = [
    [0, box.min[1], 0],
    [box.max[0], 0, 0],
    [box.max[0], box.min[1], box.max[2] / 2],
  ];
  const key = `${anchors.flat().join(',')}|${texts.join(',')}`;
  // Every label's place is worked out from all three anchors as the camera sees them.
  const placeOf = useMemo(() => {
    const points = anchors.map((a) => new THREE.Vector3(...a));
    const p = new THREE.Vector3();
    return (k: number) => (_el: THREE.Object3D, camera: THREE.Camera, size: { width: number; height: number }) => {
      const boxes = points.map((a, i) => {
        p.copy(a).project(camera);
        // The z label is on the upright edge: cleared upwards, it stays beside that edge.
        return { x: ((p.x + 1) * size.width) / 2, y: ((1 - p.y) * size.height) / 2, w: labelWidth(texts[i]), h: 18, up: i === 2 };
      });
      return separateLabels(boxes)[k];
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key]);
  if (!useMounted()) return null;
  return (
    <>
      {texts.map((text, k) => (
        <Html key={k} position={anchors[k]} center zIndexRange={[10, 0]} calculatePosition={placeOf(k)}>
          <div style={labelStyle}>{text}</div>
        </Html>
      ))}
    </>
  );
}

function ArrowLabel({ at }: { at: [number, number, number] }) {
  if (!useMounted()) return null;
  return (
    <Html position={at} center zIndexRange={[10, 0]}>
      <div style={{ ...labelStyle, color: colors.ember }}>build +z</div>
    </Html>
  );
}

/** 1, 2 or 5 times a power of ten, at least `raw`: grid steps a person reads at a glance. */
function niceStep(raw: number): number {
  if (!(raw > 0)) return 1;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const m of [1, 2, 5, 10]) if (m * p >= raw) return m * p;
  return 10 * p;
}

const styles = StyleSheet.create({
  frame: {
    width: '100%',
    minHeight: 280,
    aspectRatio: 4 / 3,
    borderRadius: 8,
    overflow: 'hidden',
    backgroundColor: colors.powderDeep,
  },
});
