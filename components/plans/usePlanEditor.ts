/**
 * The plan editor's state, composed: the plan as the planner is editing it
 * (the draft over the stored plan), the packing session, the layout shown in
 * the chamber with its cut and marks, and the actions on the server. It hands
 * each pane its props; PlanEditor only lays the panes out.
 */
import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { decodeLayout, encodeLayout, type PackInstanceInput, type PackResult, type Vec3 } from '../../shared/packing';
import type { PlanOrientationRule, PlanView } from '../../shared/schemas/plans';
import { useLab } from '../lab/useCurrentLab';
import { useLayoutQuery, useOpenLinesQuery } from '../queries/plans';
import {
  clearMarked,
  editDraft,
  setHelpOpen,
  setMarked,
  showLayout,
  toggleMarked,
  useHelpOpen,
  useMarked,
  usePlanDraft,
  useShownLayout,
  type DraftLine,
  type DraftOptions,
} from '../stores/planEditor';
import { colors } from '../theme';
import { lineColour, type ChamberViewHandle } from '../viewer';
import type { BuildPaneProps } from './BuildPane';
import {
  colourOrderOf,
  countById,
  editorLinesOf,
  fillCandidatesOf,
  fillReasonOf,
  instanceLinesOf,
  isDirty,
  isStale,
  densityVolumeOf,
  lineInfoOf,
  meshTrianglesOf,
  placedTrianglesOf,
  openMeshPartsOf,
  buildStackOf,
  dragPreview,
  type DragPreview,
  droppedByShapeResult,
  editFaults,
  handEdited,
  isByShape,
  movedAfterRemoval,
  type HandEdit,
  type Working,
  movedCutMm,
  stackNote,
  PACKING_WHAT,
  repackAvailability,
  savedLinesOf,
  shownLabelOf,
  shownLayoutId,
  storedLayoutId,
  withoutLine,
  withQuantity,
  withRule,
  withRuleForAll,
  workingRow,
  WORKING,
} from './editorModel';
import { estimateWorking, numbersFromEstimate, type ShownNumbers } from './estimate';
import { buildInstance, defaultOptions, EMPTY_PLACEMENTS, toChamberPlacements, withoutPlacements, withPartVolumes } from './instance';
import { rowsOf, type LayoutRow } from './LayoutsTable';
import type { LinesPaneProps } from './LinesPane';
import { useChamberMeshes } from './useChamberMeshes';
import { useEditorShortcuts } from './useEditorShortcuts';
import { useLayoutActions, type EditorMessage } from './useLayoutActions';
import { usePackingSession } from './usePackingSession';
import { useWorkingProfile } from './useWorkingProfile';
import { useCalibrationQuery } from '../queries/runs';
import { partQueryOptions } from '../queries/parts';
import { shapeFilesOf } from './byShape';
import { floorNote, layoutFloor } from './floor';
import { layoutCalibration } from '../../shared/estimate/calibration';

/** One arrow key press moves the marked parts this far (with Shift, 1 mm). */
const MOVE_STEP_MM = 5;
/** Changes by hand that can be taken back. */
const UNDO_STEPS = 50;
/** No part marked at fault (one set, so a memo that returns it changes nothing). */
const NO_FAULTS: ReadonlySet<number> = new Set();

interface UndoStep {
  working: Working | null;
  shownId: string | null;
  marked: number[];
}

type Machine = PlanView['machine'] & { chamberMm: Vec3; layerHeightsMm: number[] };
type Material = PlanView['material'] & { spacingMm: number; marginXyMm: number; marginBottomMm: number; marginTopMm: number; defaultLayerHeightMm: number };

export function usePlanEditor(plan: PlanView, refetch: () => Promise<PlanView | undefined>) {
  const lab = useLab();
  const planId = plan.id;
  const canPlan = lab.has('planner') || lab.has('lead');
  const editable = plan.editable && canPlan;
  const machine = plan.machine as Machine;
  const material = plan.material as Material;

  // ---- the plan as edited ------------------------------------------------------
  const draft = usePlanDraft(planId);
  const savedLines = useMemo(() => savedLinesOf(plan), [plan]);
  const savedOptions = (plan.draft as { options?: DraftOptions } | null)?.options ?? null;
  const lines = draft?.lines ?? savedLines;
  const name = draft?.name ?? plan.name;
  const draftOptions = draft?.options;
  const options: DraftOptions = useMemo(() => draftOptions ?? savedOptions ?? defaultOptions(machine, material), [draftOptions, savedOptions, machine, material]);
  const dirty = isDirty(draft, plan.name, savedLines);

  const openLines = useOpenLinesQuery(editable ? lab.id : undefined, plan.material.id, planId);
  const lineInfo = useMemo(() => lineInfoOf(plan.lines, openLines.data ?? []), [plan.lines, openLines.data]);
  const instanceOf = useCallback((list: DraftLine[]) => buildInstance(instanceLinesOf(list, lineInfo), machine, material, options), [lineInfo, machine, material, options]);
  const fullInstance = useMemo(() => instanceOf(lines), [instanceOf, lines]);
  const lineOrder = useMemo(() => lines.map((l) => l.requestLineId), [lines]);
  const colours = useMemo(() => lineOrder.map((_, i) => lineColour(i)), [lineOrder]);

  const startDraft = useCallback(() => ({ baseVersion: plan.version, name: plan.name, lines: savedLines, options: savedOptions }), [plan.version, plan.name, savedLines, savedOptions]);
  const changeLines = (change: (ls: DraftLine[]) => DraftLine[]) => editDraft(planId, startDraft, (d) => ({ ...d, lines: change(d.lines) }));
  const onOptions = (patch: Partial<DraftOptions>) => editDraft(planId, startDraft, (d) => ({ ...d, options: { ...options, ...(d.options ?? {}), ...patch } }));
  const onName = (next: string) => editDraft(planId, startDraft, (d) => ({ ...d, name: next }));

  // ---- packing -------------------------------------------------------------------
  const [message, say] = useState<EditorMessage | null>(null);
  const clearMessage = useCallback(() => say(null), []);
  // Packing by shape: the worker downloads each line's stored file; the records say where it is and how the part is turned.
  const queryClient = useQueryClient();
  const shapeFilesFor = useCallback(
    async (instance: PackInstanceInput) => {
      const partIdOf = (lineId: string) => lineInfo.get(lineId)?.partId;
      const ids = [...new Set(instance.parts.map((p) => partIdOf(p.id)).filter((id): id is string => !!id))];
      const records = await Promise.all(ids.map((id) => queryClient.ensureQueryData(partQueryOptions(lab.id, id))));
      const byId = new Map(records.map((r) => [r.id, r] as const));
      const files = shapeFilesOf(lab.id, instance, (lineId) => byId.get(partIdOf(lineId) ?? ''));
      if (!files) throw new Error("a line's part is not in the library any more");
      return files;
    },
    [queryClient, lab.id, lineInfo],
  );
  const volumeOf = useMemo(() => densityVolumeOf(lineInfo), [lineInfo]);
  const session = usePackingSession({ planId, editable, fullInstance, lines, instanceOf, volumeOf, startDraft, machine, material, options, onRunStart: clearMessage, shapeFilesFor });
  const { working, packer, running } = session;
  const stale = isStale(working, fullInstance);

  // ---- the layout shown --------------------------------------------------------------
  const shownId = shownLayoutId(useShownLayout(planId), !!working, plan);
  const storedId = storedLayoutId(shownId, plan.layouts);
  const stored = useLayoutQuery(lab.id, planId, storedId);
  const showingWorking = shownId === WORKING && !!working;
  const shownResult: PackResult | null = showingWorking ? working.result : (stored.data?.result ?? null);
  const shownInstance: PackInstanceInput | null = showingWorking ? working.instance : (stored.data?.instance ?? null);
  const shownSummary = storedId ? (plan.layouts.find((l) => l.id === storedId) ?? null) : null;
  // Parts packed by shape may share box space: the checks by hand (boxes) do not apply, so such a layout changes only by packing.
  const shownByShape = isByShape(shownResult);

  const partNames = useMemo(() => new Map([...lineInfo].map(([id, i]) => [id, i.partName] as const)), [lineInfo]);
  const volumeByLine = useMemo(() => new Map([...lineInfo].map(([id, i]) => [id, i.volumeMm3] as const)), [lineInfo]);
  const workingResult = working?.result;
  const workingInstance = working?.instance;
  // The layout not kept yet, sliced from the parts' meshes once the packing stops (the box estimate until then).
  const partIdOfLine = useCallback((requestLineId: string) => lineInfo.get(requestLineId)?.partId, [lineInfo]);
  const workingProfile = useWorkingProfile(lab.id, workingInstance, workingResult, partIdOfLine, running);
  // The machine's calibration from its recorded runs, as the server applies it to a layout it keeps.
  const calibrationView = useCalibrationQuery(lab.id, machine.id).data;
  const calibration = useMemo(() => (calibrationView ? layoutCalibration(calibrationView) : undefined), [calibrationView]);
  const workingNumbers = useMemo(
    () => (workingResult && workingInstance ? estimateWorking(workingInstance, workingResult, machine, material, volumeByLine, workingProfile, calibration) : null),
    [workingResult, workingInstance, machine, material, volumeByLine, workingProfile, calibration],
  );
  const shownNumbers: ShownNumbers | null = showingWorking ? workingNumbers : stored.data ? numbersFromEstimate(stored.data.estimate, stored.data.result) : null;

  const colourOrder = useMemo(() => colourOrderOf(lineOrder, shownInstance), [lineOrder, shownInstance]);
  const partIdsInOrder = useMemo(() => colourOrder.map((id) => lineInfo.get(id)?.partId), [colourOrder, lineInfo]);
  const marked = useMarked();
  // Marked parts being dragged across the plate: the layout as it would be released, shown and checked live.
  const [dragMm, setDragMm] = useState<[number, number] | null>(null);
  // A layout changed by hand is checked as it changes: the parts it leaves at fault are drawn in the warning colour.
  // Packed by shape, only the parts changed by hand are checked (by their boxes); the meshes on the server.
  const handMoved = useMemo(() => (showingWorking && working.mode === 'edit' ? (working.handMoved ?? []) : []), [showingWorking, working]);
  // Checked as the release will check it (by shape, in lift-out order), shown in the order the marks read.
  const drag = useMemo(() => {
    if (!dragMm || !shownInstance || !shownResult || marked.length === 0) return null;
    return dragPreview(shownInstance, shownResult, new Set(marked), dragMm[0], dragMm[1], handMoved);
  }, [dragMm, shownInstance, shownResult, marked, handMoved]);
  const dragged = drag?.result ?? null;
  const viewResult = dragged ?? shownResult;
  // Packed by shape, a layout changed by hand is then checked against the parts' meshes in the packing worker: the
  // boxes' quick check of the moved parts stands until the worker answers, and its answer (every pair that holds a
  // moved part, by the shapes: a part in a hollow is clear, one the boxes missed is not) replaces it.
  const checkByShape = packer.checkByShape;
  /** A layout checked against the parts' meshes in the packing worker (its files fetched first), with the drop or focus given. */
  const checkShapes = useCallback(
    (instance: PackInstanceInput, result: PackResult, how: { only?: number[]; drop?: number[] } = {}) =>
      shapeFilesFor(instance).then((shapes) => checkByShape({ instance, layout: encodeLayout(result), shapes, ...how })),
    [shapeFilesFor, checkByShape],
  );
  const exactFaults = useRef(new WeakMap<PackResult, Set<number>>());
  const [shapeCheck, setShapeCheck] = useState<{ result: PackResult; state: 'checking' | 'checked' | 'failed'; message?: string } | null>(null);
  const checkResult = showingWorking && working.mode === 'edit' && shownByShape && editable ? (working.result ?? null) : null;
  const checkInstance = checkResult ? working?.instance : null;
  // The layout came checked (from the packing, or kept by the server): only pairs with a part changed by hand can be
  // at fault, as the moved parts alone are listed again and a removal brings no two parts closer. On 2,000 parts
  // this takes tens of milliseconds instead of most of a second.
  const checkMoved = checkResult ? handMoved : undefined;
  useEffect(() => {
    if (!checkResult || !checkInstance || running) return;
    if (exactFaults.current.has(checkResult)) {
      setShapeCheck({ result: checkResult, state: 'checked' });
      return;
    }
    let live = true;
    setShapeCheck({ result: checkResult, state: 'checking' });
    // A burst of arrow keys is checked once, when it pauses.
    const timer = setTimeout(() => {
      checkShapes(checkInstance, checkResult, { only: checkMoved })
        .then((outcome) => {
          if (!live) return;
          if (!outcome.ok) {
            setShapeCheck({ result: checkResult, state: 'failed', message: outcome.problems.map((p) => `${p.field} ${p.message}`).join('; ') });
            return;
          }
          exactFaults.current.set(checkResult, new Set(outcome.faults));
          setShapeCheck({ result: checkResult, state: 'checked' });
        })
        .catch((e: unknown) => {
          if (live) setShapeCheck({ result: checkResult, state: 'failed', message: e instanceof Error ? e.message : String(e) });
        });
    }, 250);
    return () => {
      live = false;
      clearTimeout(timer);
    };
  }, [checkResult, checkInstance, checkMoved, running, checkShapes]);
  const shapeCheckState = checkResult && shapeCheck?.result === checkResult ? shapeCheck : null;
  // While a drag of a layout by shape moves, the moved parts' pairs are checked against the meshes too, one check at
  // a time: when an answer comes, the latest position is sent. The last answer stands (a few millimetres behind the
  // pointer at most) until the next. Before the first, no part is marked: the boxes' check would mark a part held
  // over a hollow that the shapes clear, a flash of red the answer then takes back. If the check fails, the boxes'.
  const dragCheckable = shownByShape && editable && !running && !!shownInstance;
  /** The last answer for the drag: the moved parts' faults, and whether the meshes' check found them (not the boxes'). */
  const [dragExact, setDragExact] = useState<{ dxMm: number; dyMm: number; faults: Set<number>; byShape: boolean } | null>(null);
  const dragSent = useRef<DragPreview | null>(null);
  const dragLatest = useRef<{ preview: DragPreview; at: [number, number] } | null>(null);
  dragLatest.current = drag && dragMm && dragCheckable ? { preview: drag, at: dragMm } : null;
  useEffect(() => {
    if (!drag) setDragExact(null);
    if (!drag || !dragMm || !dragCheckable || !shownInstance || dragSent.current) return;
    const instance = shownInstance;
    const send = (preview: DragPreview, [dxMm, dyMm]: [number, number]) => {
      dragSent.current = preview;
      checkShapes(instance, preview.lifted, { only: preview.liftedMoved })
        .then((outcome) => {
          if (outcome.ok && dragLatest.current) setDragExact({ dxMm, dyMm, faults: new Set(outcome.faults.map(preview.shownIndex)), byShape: true });
        })
        // The boxes' check stands in for it; the released layout is checked again.
        .catch(() => {
          if (dragLatest.current) setDragExact({ dxMm, dyMm, faults: preview.faults, byShape: false });
        })
        .finally(() => {
          dragSent.current = null;
          const next = dragLatest.current;
          if (next && next.preview !== preview) send(next.preview, next.at);
        });
    };
    send(drag, dragMm);
  }, [drag, dragMm, dragCheckable, shownInstance, checkShapes]);
  // Released where it was last checked: those faults stand until the check of the released layout answers.
  const releasedFaults = useRef(new WeakMap<PackResult, Set<number>>());
  const faults = useMemo(() => {
    if (drag) return dragExact?.faults ?? (dragCheckable ? NO_FAULTS : drag.faults);
    if (!(showingWorking && working.mode === 'edit' && working.result)) return new Set<number>();
    const exact = shapeCheckState?.state === 'checked' ? exactFaults.current.get(working.result) : undefined;
    return exact ?? releasedFaults.current.get(working.result) ?? editFaults(working.instance, working.result, handMoved);
  }, [drag, dragExact, dragCheckable, showingWorking, working, handMoved, shapeCheckState]);
  const placements = useMemo(() => {
    if (!viewResult) return EMPTY_PLACEMENTS;
    const p = toChamberPlacements(viewResult, colourOrder);
    if (faults.size === 0 && marked.length === 0) return p;
    // Two colours after the lines': the marked parts (graphite), then those at fault (red, which wins).
    const lineIndex = p.lineIndex.slice();
    for (const i of marked) if (i < lineIndex.length) lineIndex[i] = colourOrder.length;
    for (const i of faults) if (i < lineIndex.length) lineIndex[i] = colourOrder.length + 1;
    return { ...p, lineIndex };
  }, [viewResult, colourOrder, faults, marked]);
  const chamberMeshes = useChamberMeshes(lab.id, partIdsInOrder, placements.partIndex);
  const partIds = useMemo(() => shownResult?.placements.map((p) => p.id) ?? [], [shownResult]);
  const describe = useCallback(
    (i: number) => {
      const info = lineInfo.get(partIds[i]);
      return info ? `${info.partName} · ${info.requestTitle} (due ${info.dueDate})` : `Part ${i + 1}`;
    },
    [lineInfo, partIds],
  );
  const placedByLine = useMemo(() => (shownResult ? countById(shownResult.placements) : null), [shownResult]);
  const savedLineIds = useMemo(() => new Set(plan.lines.map((l) => l.requestLineId)), [plan.lines]);
  const editorLines = editorLinesOf(lines, lineInfo, placedByLine, colours, savedLineIds);

  const mx = fullInstance.margin?.xy ?? 0;
  const mb = fullInstance.margin?.bottom ?? 0;
  const mt = fullInstance.margin?.top ?? 0;
  // Stable props, so that the 3D view does not redo its buffers when the editor draws again.
  const viewMargin = useMemo(() => ({ xy: mx, bottom: mb, top: mt }), [mx, mb, mt]);
  const viewColours = useMemo(() => [...colourOrder.map((_, i) => lineColour(i)), colors.graphite, colors.danger], [colourOrder]);

  // ---- cut, marks ---------------------------------------------------------------
  const chamberRef = useRef<ChamberViewHandle>(null);
  const [cutMm, setCutMm] = useState<number | null>(null);
  const layerHeightMm = shownInstance?.layerHeight ?? options.layerHeightMm;
  const usedHeight = shownResult?.height ?? 0;
  const stackBottom = shownInstance?.margin?.bottom ?? mb;
  const stackTop = shownInstance?.margin?.top ?? mt;
  const stack = useMemo(() => buildStackOf(usedHeight, { bottom: stackBottom, top: stackTop }, layerHeightMm), [usedHeight, stackBottom, stackTop, layerHeightMm]);
  // Marks are indices into the layout shown: another layout drops them.
  // (A hand edit on a kept layout shows its result as the layout not kept yet: that change keeps the marks.)
  const marksFollow = useRef(false);
  useEffect(() => {
    if (marksFollow.current) marksFollow.current = false;
    else clearMarked();
  }, [shownId]);
  const onPick = (i: number | null) => {
    if (i !== null && editable && !running) toggleMarked(i);
  };
  // Changes by hand can be taken back one by one: each remembers the layout not kept, the layout shown and the marks
  // from before it. A new packing run, or keeping or reloading, starts afresh.
  const [undoable, setUndoable] = useState<UndoStep[]>([]);
  const remember = () => setUndoable((u) => [...u.slice(-(UNDO_STEPS - 1)), { working, shownId, marked: [...marked] }]);
  useEffect(() => {
    if (running) setUndoable([]);
  }, [running]);
  const onUndo = () => {
    const last = undoable.at(-1);
    if (!last || running) return;
    setUndoable((u) => u.slice(0, -1));
    session.restoreWorking(last.working);
    marksFollow.current = last.shownId !== shownId;
    showLayout(planId, last.shownId);
    setMarked(last.marked);
  };
  const dropWorking = () => {
    setUndoable([]);
    session.dropWorking();
  };
  const onRemoveMarked = () => {
    if (!shownInstance || !shownResult) return;
    const removed = new Set(marked);
    const next = withoutPlacements(shownInstance, shownResult, removed);
    if (!next) return;
    remember();
    clearMarked();
    // Packed by shape, the density counts the parts' own volumes, and what was moved by hand keeps being checked.
    const result = shownByShape ? withPartVolumes(next, volumeOf) : next;
    session.showWorking({ mode: 'edit', instance: shownInstance, kept: [], result, lines, baseLines: lines, problem: null, handMoved: movedAfterRemoval(handMoved, removed) });
  };
  // Marked parts moved, turned or dropped by hand: the result shown as a layout not kept yet, checked as it changes.
  const editable3d = editable && !running && !!shownInstance && !!shownResult && marked.length > 0;
  /** Shows the layout a hand edit of `instance` left as the layout not kept yet; returns it as shown. */
  const showEdited = (instance: PackInstanceInput, out: { result: PackResult; indexOf?: number[] }): PackResult => {
    // Packed by shape, the changed parts may be listed anew (lift-out order): the marks follow them.
    const at = (i: number) => out.indexOf?.[i] ?? i;
    const keep = marked.map(at);
    remember();
    const result = shownByShape ? withPartVolumes(out.result, volumeOf) : out.result;
    const moved = shownByShape ? [...new Set([...handMoved, ...marked])].map(at) : undefined;
    session.showWorking({ mode: 'edit', instance, kept: [], result, lines, baseLines: lines, problem: null, handMoved: moved });
    // The edited layout holds the same placements: the marks stay on them.
    marksFollow.current = shownId !== WORKING;
    setMarked(keep);
    return result;
  };
  // Packed by shape, a drop lowers the marked parts as far as their shapes allow (into a hollow, through a hole),
  // worked out against the meshes in the packing worker; the layout it answers comes checked.
  const [dropping, setDropping] = useState(false);
  const latestShown = useRef(shownResult);
  latestShown.current = shownResult;
  const dropByShape = async (instance: PackInstanceInput, result: PackResult) => {
    setDropping(true);
    try {
      const outcome = await checkShapes(instance, result, { drop: [...marked] });
      // Changed meanwhile (undone, packed again): this answer is for a layout no longer shown.
      if (latestShown.current !== result) return;
      const decoded = outcome.ok && outcome.dropped ? decodeLayout(outcome.dropped.layout) : null;
      const next = decoded?.ok ? droppedByShapeResult(instance, result, decoded.result.placements) : null;
      if (!outcome.ok || !outcome.dropped || !next) {
        const why = outcome.ok ? 'the packing worker sent no layout back' : outcome.problems.map((p) => `${p.field} ${p.message}`).join('; ');
        say({ tone: 'danger', text: `The marked parts could not be dropped by their shapes: ${why}.` });
        return;
      }
      const shown = showEdited(instance, { result: next, indexOf: outcome.dropped.indexOf });
      exactFaults.current.set(shown, new Set(outcome.faults));
    } catch (e) {
      if (latestShown.current === result) say({ tone: 'danger', text: `The marked parts could not be dropped by their shapes: ${e instanceof Error ? e.message : String(e)}.` });
    } finally {
      setDropping(false);
    }
  };
  const onHandEdit = (e: HandEdit) => {
    if (!editable3d || !shownInstance || !shownResult || dropping) return;
    if (e.kind === 'drop' && shownByShape) {
      void dropByShape(shownInstance, shownResult);
      return;
    }
    const out = handEdited(shownInstance, shownResult, new Set(marked), e);
    if (!out.ok) {
      say({ tone: 'danger', text: out.message });
      return;
    }
    // The edited layout and where each part of the one shown went in it.
    return { result: showEdited(shownInstance, out), at: (i: number) => out.indexOf?.[i] ?? i };
  };
  // A drag starts on a marked part; it moves every marked part, and its release is one change by hand like a key's.
  const onDragStart = (i: number) => editable3d && marked.includes(i);
  const onDrag = (dxMm: number, dyMm: number, phase: 'move' | 'end' | 'cancel') => {
    if (phase === 'move') {
      setDragMm([dxMm, dyMm]);
      return;
    }
    setDragMm(null);
    if (phase !== 'end' || (dxMm === 0 && dyMm === 0)) return;
    const checked = dragExact && dragExact.dxMm === dxMm && dragExact.dyMm === dyMm ? dragExact : null;
    const edited = onHandEdit({ kind: 'move', dxMm, dyMm });
    if (checked && edited) releasedFaults.current.set(edited.result, new Set([...checked.faults].map(edited.at)));
  };
  const moveCut = (layers: number) => setCutMm(movedCutMm(cutMm, stack.topMm, layerHeightMm, layers));

  // ---- re-pack what is new, fill the rest ------------------------------------------
  const lockedInstance = !showingWorking && shownSummary?.locked && stored.data ? stored.data.instance : null;
  const repack = useMemo(() => repackAvailability(lockedInstance, fullInstance), [lockedInstance, fullInstance]);
  const onRepack = () => {
    if (stored.data && repack.available) session.repack(stored.data.result);
  };
  const fillCandidates = useMemo(() => fillCandidatesOf(openLines.data ?? [], lines), [openLines.data, lines]);
  const fillAvailable = fillCandidates.reduce((s, c) => s + c.extra, 0);
  const fillReason = fillReasonOf(shownResult, shownInstance, fullInstance, fillAvailable);
  const onFill = () => {
    if (shownResult && shownInstance && !fillReason) session.fill(shownResult.placements, fillCandidates);
  };

  // ---- the server ----------------------------------------------------------------------
  const actions = useLayoutActions({
    labId: lab.id,
    plan,
    refetch,
    editable,
    draft,
    dirty,
    savedLines,
    savedOptions,
    options,
    working,
    running,
    stale,
    faults: faults.size,
    dropWorking,
    shownId,
    onOptions,
    say,
  });

  // ---- shortcuts ---------------------------------------------------------------------------
  const helpOpen = useHelpOpen();
  const hasKeys = useEditorShortcuts(
    {
      pack: session.pack,
      cancel: () => {
        if (helpOpen) setHelpOpen(false);
        else if (running) packer.cancel();
      },
      save: () => void actions.onSave(),
      keep: () => void actions.onKeep(),
      fit: () => chamberRef.current?.setView('fit'),
      frame: () => chamberRef.current?.toggleFrame(),
      ...(editable3d
        ? {
            moveLeft: ({ shift }: { shift: boolean }) => onHandEdit({ kind: 'move', dxMm: shift ? -1 : -MOVE_STEP_MM, dyMm: 0 }),
            moveRight: ({ shift }: { shift: boolean }) => onHandEdit({ kind: 'move', dxMm: shift ? 1 : MOVE_STEP_MM, dyMm: 0 }),
            moveBack: ({ shift }: { shift: boolean }) => onHandEdit({ kind: 'move', dxMm: 0, dyMm: shift ? 1 : MOVE_STEP_MM }),
            moveFront: ({ shift }: { shift: boolean }) => onHandEdit({ kind: 'move', dxMm: 0, dyMm: shift ? -1 : -MOVE_STEP_MM }),
            turn: () => onHandEdit({ kind: 'turn' }),
            drop: () => onHandEdit({ kind: 'drop' }),
          }
        : {}),
      ...(undoable.length > 0 && !running ? { undo: onUndo } : {}),
      top: () => chamberRef.current?.setView('top'),
      front: () => chamberRef.current?.setView('front'),
      side: () => chamberRef.current?.setView('side'),
      layerUp: ({ shift }) => moveCut(shift ? 10 : 1),
      layerDown: ({ shift }) => moveCut(shift ? -10 : -1),
      help: () => setHelpOpen(!helpOpen),
    },
    true,
  );

  // ---- what the panes show ---------------------------------------------------------------------
  const rows: LayoutRow[] = useMemo(() => {
    const r = rowsOf(plan.layouts);
    if (workingResult && working) r.unshift(workingRow({ ...working, result: workingResult }, running, workingNumbers, stale));
    return r;
  }, [plan.layouts, working, workingResult, workingNumbers, running, stale]);
  const shownLabel = shownLabelOf({ showingWorking, working, running, stale, summary: shownSummary, fetching: stored.isFetching });

  const linesPane: LinesPaneProps = {
    lines: editorLines,
    meshTriangles: meshTrianglesOf(lines, lineInfo),
    placedTriangles: placedTrianglesOf(lines, lineInfo),
    openMeshParts: openMeshPartsOf(lines, lineInfo),
    editable,
    onQuantity: (id: string, quantity: number) => changeLines((ls) => withQuantity(ls, id, quantity)),
    onRule: (id: string, rule: PlanOrientationRule | null) => changeLines((ls) => withRule(ls, id, rule)),
    onRuleAll: (rule: PlanOrientationRule | null) => changeLines((ls) => withRuleForAll(ls, rule, lineInfo)),
    onRemoveLine: (id: string) => changeLines((ls) => withoutLine(ls, id)),
    options,
    onOptions,
    materialSpacingMm: material.spacingMm,
    layerHeightsMm: machine.layerHeightsMm,
    packer: { status: packer.status, progress: packer.progress, phase: packer.phase, error: session.error },
    packingWhat: working ? PACKING_WHAT[working.mode] : null,
    onPack: session.pack,
    onCancel: packer.cancel,
    onRetry: session.retry,
    fill: { available: fillAvailable, reason: fillReason, onFill },
    repack: { available: repack.available, reason: repack.reason, onRepack },
  };
  const buildPane: Omit<BuildPaneProps, 'viewHeightPx'> = {
    chamberMm: machine.chamberMm,
    margin: viewMargin,
    placements,
    lineColours: viewColours,
    meshesByPart: chamberMeshes.meshes,
    stack,
    cutMm,
    onCut: setCutMm,
    describe,
    onPick,
    onDragStart,
    onDrag,
    marked: marked.length,
    markedBox: marked.length === 1 && viewResult?.placements[marked[0]] ? { position: viewResult.placements[marked[0]].position, size: viewResult.placements[marked[0]].size } : null,
    onUndo: undoable.length > 0 && !running ? onUndo : null,
    faults: faults.size,
    spacingMm: shownInstance?.spacing ?? fullInstance.spacing ?? 0,
    onHandEdit: editable3d ? onHandEdit : null,
    onRemoveMarked,
    onClearMarked: clearMarked,
    byShape: shownByShape,
    // While a drag is held, what its own check found (the notice names the check that marked the parts).
    shapeCheck: dropping ? 'dropping' : drag ? (dragExact?.byShape ? 'checked' : null) : (shapeCheckState?.state ?? null),
    shapeCheckMessage: shapeCheckState?.message ?? null,
    editable,
    caption: shownLabel,
    live: running && showingWorking && !!working?.result,
    loading: !showingWorking && !!storedId && !stored.data,
  };
  // What no layout of the shown parts can stand under (the instance's parts, as the layout was packed).
  const floor = useMemo(() => (shownInstance ? layoutFloor(shownInstance, shownByShape, volumeOf) : null), [shownInstance, shownByShape, volumeOf]);
  const numbersPane = {
    numbers: shownNumbers,
    title: shownLabel,
    bedAreaMm2: (machine.chamberMm[0] - 2 * material.marginXyMm) * (machine.chamberMm[1] - 2 * material.marginXyMm),
    cutLayer: cutMm === null ? null : Math.round(cutMm / layerHeightMm),
    stackNote: shownResult ? stackNote(stack) : undefined,
    floorNote: shownResult ? (floorNote(floor, shownResult, (id) => partNames.get(id), shownByShape) ?? undefined) : undefined,
    note: showingWorking ? 'Estimated here; the server estimates it again when the layout is kept.' : undefined,
    partNames,
  };
  const layoutsPane = { rows, shownId, editable, onShow: (id: string) => showLayout(planId, id), onChoose: actions.onChoose, onLock: actions.onLock, onDelete: actions.onDelete, busyId: actions.busyLayout };

  return {
    plan,
    machine,
    editable,
    canPlan,
    name,
    onName,
    dirty,
    hasDraft: !!draft,
    message,
    packingError: session.error,
    // The engine names a part by its id in the instance (the request line's): the planner knows it by its name.
    packingNotes: session.notes.map((w) => w.message.split(`"${w.id}"`).join(`"${partNames.get(w.id) ?? w.id}"`)),
    retry: session.retry,
    helpOpen,
    hasKeys,
    chamberRef,
    chamberLoaders: chamberMeshes.loaders,
    shownNumbers,
    shownLabel,
    linesPane,
    buildPane,
    numbersPane,
    layoutsPane,
    actions,
  };
}
