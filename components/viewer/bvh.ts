/**
 * three-mesh-bvh's raycast in place of three's: a ray against a part with
 * tens of thousands of triangles tests a few bounding boxes instead of every
 * triangle. InstancedMesh raycasts each instance through Mesh.prototype, so
 * one patch covers the instanced parts as well.
 */
import * as THREE from 'three';
import { acceleratedRaycast, computeBoundsTree, disposeBoundsTree } from 'three-mesh-bvh';

let installed = false;

export function installBvh() {
  if (installed) return;
  installed = true;
  THREE.BufferGeometry.prototype.computeBoundsTree = computeBoundsTree;
  THREE.BufferGeometry.prototype.disposeBoundsTree = disposeBoundsTree;
  THREE.Mesh.prototype.raycast = acceleratedRaycast;
}

/**
 * Below this many triangles a plain raycast is as quick as building the tree
 * (common practice; the tree costs a pass over every triangle up front).
 */
export const BVH_MIN_TRIANGLES = 2000;
