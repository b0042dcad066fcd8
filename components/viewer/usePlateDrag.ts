/**
 * Dragging parts across the build plate in the chamber view (web only: used
 * by ChamberView.web.tsx inside its canvas). A press on a part the editor
 * lets move holds the camera still (the orbit controls are switched off until
 * release), then every pointer move reports how far the plate point under
 * the pointer has travelled at the pressed part's base height (see drag.ts),
 * at most once a frame. Release reports the final distance once; a cancelled
 * pointer (a touch taken over by the browser) reports a cancel. Pointer
 * events carry mouse, pen and touch alike.
 */
import { useThree } from '@react-three/fiber';
import { useEffect, useMemo, useRef } from 'react';
import * as THREE from 'three';
import { deviceCoords, dragDelta, pastSlop, rayOnPlaneZ } from './drag';
import type { ChamberViewProps } from './types';

export type DragPhase = 'move' | 'end' | 'cancel';

interface Active {
  pointerId: number;
  zMm: number;
  start: [number, number];
  startPx: [number, number];
  moving: boolean;
  delta: [number, number];
  frame: number;
  detach: () => void;
}

export interface PlateDrag {
  /** A press on `placement` (whose base is at `zMm`): true when a drag began (the caller stops the event there). */
  press(e: PointerEvent, placement: number, zMm: number): boolean;
  /** True between a press that began a drag and its release. */
  active(): boolean;
}

export function usePlateDrag(callbacks: React.MutableRefObject<Pick<ChamberViewProps, 'onDragStart' | 'onDrag'>>): PlateDrag {
  const camera = useThree((s) => s.camera);
  const gl = useThree((s) => s.gl);
  const controls = useThree((s) => s.controls) as unknown as { enabled: boolean } | null;
  const raycaster = useMemo(() => new THREE.Raycaster(), []);
  const ndc = useMemo(() => new THREE.Vector2(), []);
  const state = useRef<Active | null>(null);

  const plateAt = (clientX: number, clientY: number, zMm: number) => {
    const [x, y] = deviceCoords(clientX, clientY, gl.domElement.getBoundingClientRect());
    raycaster.setFromCamera(ndc.set(x, y), camera);
    const { origin: o, direction: d } = raycaster.ray;
    return rayOnPlaneZ([o.x, o.y, o.z], [d.x, d.y, d.z], zMm);
  };

  const finish = (phase: 'end' | 'cancel') => {
    const s = state.current;
    if (!s) return;
    state.current = null;
    s.detach();
    cancelAnimationFrame(s.frame);
    if (controls) controls.enabled = true;
    if (s.moving) callbacks.current.onDrag?.(s.delta[0], s.delta[1], phase);
  };

  // A view taken away mid-drag (another layout, the tab closed) gives the camera back and ends the drag unchanged.
  useEffect(() => () => finish('cancel'), []); // eslint-disable-line react-hooks/exhaustive-deps

  return {
    active: () => state.current !== null,
    press(e, placement, zMm) {
      if (state.current || (e.pointerType === 'mouse' && e.button !== 0)) return false;
      if (!callbacks.current.onDragStart?.(placement)) return false;
      const start = plateAt(e.clientX, e.clientY, zMm);
      // Looking along the plate (front or side view): no drag, the press turns the view as before.
      if (!start) return false;
      const onMove = (ev: PointerEvent) => {
        const s = state.current;
        if (!s || ev.pointerId !== s.pointerId) return;
        if (!s.moving && !pastSlop(s.startPx, [ev.clientX, ev.clientY])) return;
        s.moving = true;
        const at = plateAt(ev.clientX, ev.clientY, s.zMm);
        if (!at) return;
        const delta = dragDelta(s.start, at);
        if (delta[0] === s.delta[0] && delta[1] === s.delta[1]) return;
        s.delta = delta;
        // One report a frame: the editor checks the whole layout for each.
        if (!s.frame) {
          s.frame = requestAnimationFrame(() => {
            s.frame = 0;
            if (state.current === s) callbacks.current.onDrag?.(s.delta[0], s.delta[1], 'move');
          });
        }
      };
      const onUp = (ev: PointerEvent) => {
        if (ev.pointerId === state.current?.pointerId) finish('end');
      };
      const onCancel = (ev: PointerEvent) => {
        if (ev.pointerId === state.current?.pointerId) finish('cancel');
      };
      window.addEventListener('pointermove', onMove);
      window.addEventListener('pointerup', onUp);
      window.addEventListener('pointercancel', onCancel);
      const detach = () => {
        window.removeEventListener('pointermove', onMove);
        window.removeEventListener('pointerup', onUp);
        window.removeEventListener('pointercancel', onCancel);
      };
      // The orbit controls saw the press first (they listen on the canvas); switched off, they ignore its moves.
      if (controls) controls.enabled = false;
      state.current = { pointerId: e.pointerId, zMm, start, startPx: [e.clientX, e.clientY], moving: false, delta: [0, 0], frame: 0, detach };
      return true;
    },
  };
}
