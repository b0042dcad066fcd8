// Over 450 lines: packing session, layout actions, editor model and panes still live together here; they are the seams to cut it along.
/**
 * The plan editor: lines on the left, the chamber in 3D in the centre, the
 * numbers and the layouts on the right (tabs on a phone). Packing runs in the
 * packing worker; the best layout so far is drawn while it improves and can
 * be kept as one of the plan's layouts, compared with the others and chosen.
 * Unsaved edits live in the editor's draft store, so a reload keeps them.
 */
import { router } from 'expo-router';
import { useCallback, useEffect, useEffectEvent, useMemo, useRef, useState } from 'react';
import { ScrollView, StyleSheet, useWindowDimensions, View } from 'react-native';
import { buildCountLowerBound, parseInstance, type PackInstanceInput, type PackResult, type Placement, type Vec3 } from '../../shared/packing';
import type { PlanOrientationRule, PlanView } from '../../shared/schemas/plans';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { usePacker } from '../packing/usePacker';
import {
  useAddLayoutMutation,
  useChooseLayoutMutation,
  useDeleteLayoutMutation,
  useLayoutQuery,
  useOpenLinesQuery,
  usePatchLayoutMutation,
  usePlanQuery,
  useSavePlanMutation,
  useSubmitPlanMutation,
} from '../queries/plans';
import {
  clearMarked,
  discardDraft,
  editDraft,
  getPlanDraft,
  rebaseDraft,
  setEditorTab,
  setHelpOpen,
  showLayout,
  toggleMarked,
  useEditorTab,
  useHelpOpen,
  useMarked,
  usePlanDraft,
  useShownLayout,
  type DraftLine,
  type DraftOptions,
  type EditorTab,
} from '../stores/planEditor';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, ErrorState, LoadingState, Notice, Text, TextInput } from '../ui';
import { PlanFlags } from '../review/PlanFlags';
import { lineColour, type ChamberViewHandle } from '../viewer';
import { BuildPane } from './BuildPane';
import { ConflictDialog } from './ConflictDialog';
import { estimateWorking, numbersFromEstimate, type ShownNumbers } from './estimate';
import { STATUS_LABELS, STATUS_TONES } from './format';
import { buildInstance, defaultOptions, EMPTY_PLACEMENTS, instanceAbove, mergeLayouts, toChamberPlacements, withoutPlacements, type InstanceLine } from './instance';
import { LayoutsTable, rowsOf, type LayoutRow } from './LayoutsTable';
import { LinesPane, type EditorLine } from './LinesPane';
import { NumbersPane } from './NumbersPane';
import { PlanPowderPanel } from '../powder/PlanPowderPanel';
import { PlanHistory } from './PlanHistory';
import { ShortcutHelp } from './ShortcutHelp';
import { useChamberMeshes } from './useChamberMeshes';
import { useEditorShortcuts } from './useEditorShortcuts';

/** Wide enough for three panes side by side. */
const THREE_PANES_PX = 1280;
/** A packing that has not answered this long after its time limit is taken as lost (crashed or out of memory). */
const WORKER_GRACE_MS = 20_000;

type WorkMode = 'pack' | 'repack' | 'fill' | 'edit';
interface Working {
  mode: WorkMode;
  /** The plan's full instance the result is checked against (all lines, their quantities). */
  instance: PackInstanceInput;
  /** Placements carried over unchanged (a locked layout, or what a fill keeps). */
  kept: Placement[];
  result: PackResult | null;
  /** The lines the instance was made from (for a fill: with what it added). */
  lines: DraftLine[];
  /** The lines before the run began: a fill adds to these, however often its best layout changes. */
  baseLines: DraftLine[];
  problem: string | null;
}

const WORKING = 'working';

function sameLines(a: readonly DraftLine[], b: readonly DraftLine[]): boolean {
  if (a.length !== b.length) return false;
  const m = new Map(b.map((l) => [l.requestLineId, l]));
  return a.every((l) => {
    const o = m.get(l.requestLineId);
    return !!o && o.quantity === l.quantity && (o.orientation ?? null) === (l.orientation ?? null);
  });
}

/** Only what the server compares: ids, quantities and allowed orientations of the parts. */
function partsKey(instance: PackInstanceInput | null | undefined): string {
  if (!instance) return '';
  return instance.parts
    .map((p) => `${p.id}:${p.quantity}:${(p.orientations ?? []).join('')}`)
    .sort()
    .join('|');
}

function savedLinesOf(plan: PlanView): DraftLine[] {
  return plan.lines.map((l) => ({ requestLineId: l.requestLineId, quantity: l.quantity, orientation: l.orientationOverride ?? null }));
}

function countById(placements: readonly Placement[]): Map<string, number> {
  const m = new Map<string, number>();
  for (const p of placements) m.set(p.id, (m.get(p.id) ?? 0) + 1);
  return m;
}

export function PlanEditor({ planId, lostWorker, onWorkerLost }: { planId: string; lostWorker: string | null; onWorkerLost: (message: string) => void }) {
  const lab = useLab();
  const plan = usePlanQuery(lab.id, planId);
  if (plan.isPending) return <LoadingState label="Loading the plan…" />;
  if (plan.isError) return <ErrorState error={plan.error} onRetry={() => plan.refetch()} />;
  return <Editor plan={plan.data} refetch={() => plan.refetch().then((r) => r.data)} lostWorker={lostWorker} onWorkerLost={onWorkerLost} />;
}

function Editor({ plan, refetch, lostWorker, onWorkerLost }: { plan: PlanView; refetch: () => Promise<PlanView | undefined>; lostWorker: string | null; onWorkerLost: (message: string) => void }) {
  const lab = useLab();
  const planId = plan.id;
  const { width, height } = useWindowDimensions();
  const wide = width >= THREE_PANES_PX;
  const canPlan = lab.has('planner') || lab.has('lead');
  const editable = plan.editable && canPlan;

  const machine = plan.machine as PlanView['machine'] & { chamberMm: Vec3; layerHeightsMm: number[] };
  const material = plan.material as PlanView['material'] & { spacingMm: number; marginXyMm: number; marginBottomMm: number; marginTopMm: number; defaultLayerHeightMm: number };

  const draft = usePlanDraft(planId);
  const savedLines = useMemo(() => savedLinesOf(plan), [plan]);
  const savedOptions = (plan.draft as { options?: DraftOptions } | null)?.options ?? null;
  const lines = draft?.lines ?? savedLines;
  const name = draft?.name ?? plan.name;
  const options: DraftOptions = draft?.options ?? savedOptions ?? defaultOptions(machine, material);
  const dirty = !!draft && (draft.name !== plan.name || !sameLines(draft.lines, savedLines));

  const openLines = useOpenLinesQuery(editable ? lab.id : undefined, plan.material.id, planId);

  // Everything the editor knows about a line, whether saved in the plan or added from the open lines.
  const lineInfo = useMemo(() => {
    const m = new Map<string, Omit<EditorLine, 'quantity' | 'rule' | 'ruleOverride' | 'placed' | 'colour' | 'added'> & { volumeMm3: number; partId: string }>();
    for (const o of openLines.data ?? []) {
      m.set(o.requestLineId, {
        requestLineId: o.requestLineId,
        partName: o.part.name,
        requestTitle: o.request.title,
        dueDate: o.request.dueDate,
        priority: o.request.priority,
        sizeMm: o.part.sizeMm,
        maxQuantity: o.remaining,
        partRule: o.part.orientation,
        volumeMm3: o.part.volumeMm3,
        partId: o.part.id,
      });
    }
    for (const l of plan.lines) {
      m.set(l.requestLineId, {
        requestLineId: l.requestLineId,
        partName: l.part.name,
        requestTitle: l.request.title,
        dueDate: l.request.dueDate,
        priority: l.request.priority,
        sizeMm: l.part.sizeMm,
        maxQuantity: l.lineQuantity - l.plannedElsewhere,
        partRule: l.part.orientation,
        volumeMm3: l.part.volumeMm3,
        partId: l.part.id,
      });
    }
    return m;
  }, [plan.lines, openLines.data]);

  const instanceLines = useCallback(
    (list: readonly DraftLine[]): InstanceLine[] =>
      list
        .filter((l) => lineInfo.has(l.requestLineId))
        .map((l) => {
          const info = lineInfo.get(l.requestLineId)!;
          return { requestLineId: l.requestLineId, quantity: l.quantity, orientation: l.orientation ?? info.partRule, sizeMm: info.sizeMm };
        }),
    [lineInfo],
  );
  const fullInstance = useMemo(() => buildInstance(instanceLines(lines), machine, material, options), [instanceLines, lines, machine, material, options]);
  const lineOrder = useMemo(() => lines.map((l) => l.requestLineId), [lines]);
  const colours = useMemo(() => lineOrder.map((_, i) => lineColour(i)), [lineOrder]);

  // ---- edits -------------------------------------------------------------
  const startDraft = useCallback(() => ({ baseVersion: plan.version, name: plan.name, lines: savedLines, options: savedOptions }), [plan.version, plan.name, savedLines, savedOptions]);
  const changeLines = (change: (ls: DraftLine[]) => DraftLine[]) => editDraft(planId, startDraft, (d) => ({ ...d, lines: change(d.lines) }));
  const onQuantity = (id: string, quantity: number) => changeLines((ls) => ls.map((l) => (l.requestLineId === id ? { ...l, quantity } : l)));
  const onRule = (id: string, rule: PlanOrientationRule | null) => changeLines((ls) => ls.map((l) => (l.requestLineId === id ? { ...l, orientation: rule } : l)));
  const onRuleAll = (rule: PlanOrientationRule | null) =>
    changeLines((ls) => ls.map((l) => ({ ...l, orientation: rule === null || rule === lineInfo.get(l.requestLineId)?.partRule ? null : rule })));
  const onRemoveLine = (id: string) => changeLines((ls) => ls.filter((l) => l.requestLineId !== id));
  const onOptions = (patch: Partial<DraftOptions>) => editDraft(planId, startDraft, (d) => ({ ...d, options: { ...options, ...(d.options ?? {}), ...patch } }));
  const onName = (next: string) => editDraft(planId, startDraft, (d) => ({ ...d, name: next }));

  // ---- packing -----------------------------------------------------------
  const packer = usePacker();
  const [working, setWorking] = useState<Working | null>(null);
  const workingRef = useRef<Working | null>(null);
  workingRef.current = working;
  const [lastRun, setLastRun] = useState<(() => void) | null>(null);
  // The message of a lost worker stays until the next packing starts.
  const [lostShown, setLostShown] = useState(true);
  const [message, setMessage] = useState<{ tone: 'danger' | 'success' | 'info'; text: string } | null>(null);

  const merge = useCallback(
    (w: Working, best: PackResult, check: boolean): Working => {
      if (w.mode === 'pack') return { ...w, result: best, problem: null };
      let instance = w.instance;
      let wLines = w.lines;
      if (w.mode === 'fill') {
        // The plan takes what the fill placed: each added line's quantity becomes its placed count.
        const added = countById(best.placements);
        const next = w.baseLines.map((l) => ({ ...l, quantity: l.quantity + (added.get(l.requestLineId) ?? 0) }));
        for (const [id, n] of added) if (!next.some((l) => l.requestLineId === id)) next.push({ requestLineId: id, quantity: n, orientation: null });
        wLines = next;
        instance = buildInstance(instanceLines(next), machine, material, options);
      }
      if (!check) {
        return { ...w, instance, lines: wLines, result: { ...best, placements: [...w.kept, ...best.placements], height: Math.max(best.height, ...w.kept.map((p) => p.position[2] + p.size[2])) }, problem: null };
      }
      const merged = mergeLayouts(instance, w.kept, best.placements, best.elapsedMs);
      return merged.ok ? { ...w, instance, lines: wLines, result: merged.result, problem: null } : { ...w, instance, lines: wLines, problem: merged.message };
    },
    [instanceLines, machine, material, options],
  );

  // Reads the latest plan and options; only the worker's answers make it run (below).
  const takeBest = useEffectEvent((best: PackResult, final: boolean) => {
    const w = workingRef.current;
    if (!w) return;
    const next = merge(w, best, final);
    setWorking(next);
    if (final && next.mode === 'fill' && !next.problem) {
      // The plan's lines follow the fill, so keeping the layout saves both.
      editDraft(planId, startDraft, (d) => ({ ...d, lines: next.lines }));
    }
  });
  useEffect(() => {
    // Only a new layout from the worker (or its end) moves the working layout.
    if (packer.best) takeBest(packer.best, packer.status === 'done' || packer.status === 'cancelled');
  }, [packer.best, packer.status]);

  // A worker that never answers (crashed, or out of memory) is replaced by remounting the editor.
  useEffect(() => {
    if (packer.status !== 'running') return;
    const t = setTimeout(
      () => onWorkerLost('The packing worker stopped answering: it may have run out of memory or crashed.'),
      (working?.instance.timeLimitMs ?? options.timeLimitMs) + WORKER_GRACE_MS,
    );
    return () => clearTimeout(t);
  }, [packer.status, packer.progress, onWorkerLost, options.timeLimitMs, working?.instance.timeLimitMs]);

  const run = useCallback(
    (w: Working, engineInstance: PackInstanceInput) => {
      setMessage(null);
      setLostShown(false);
      setWorking(w);
      showLayout(planId, WORKING);
      const again = () => {
        setWorking(w);
        showLayout(planId, WORKING);
        packer.start(engineInstance);
      };
      setLastRun(() => again);
      packer.start(engineInstance);
    },
    [packer, planId],
  );

  const onPack = () => {
    if (!editable || packer.status === 'running' || fullInstance.parts.length === 0) return;
    run({ mode: 'pack', instance: fullInstance, kept: [], result: null, lines, baseLines: lines, problem: null }, fullInstance);
  };

  // ---- the layout shown ----------------------------------------------------
  const shownChoice = useShownLayout(planId);
  const latest = plan.layouts.reduce<(typeof plan.layouts)[number] | null>((a, l) => (!a || l.createdAt > a.createdAt ? l : a), null);
  const shownId = shownChoice === WORKING && !working ? (plan.chosenLayoutId ?? latest?.id ?? null) : (shownChoice ?? plan.chosenLayoutId ?? latest?.id ?? null);
  const storedId = shownId && shownId !== WORKING && plan.layouts.some((l) => l.id === shownId) ? shownId : null;
  const stored = useLayoutQuery(lab.id, planId, storedId);
  const showingWorking = shownId === WORKING && !!working;
  const shownResult: PackResult | null = showingWorking ? working!.result : (stored.data?.result ?? null);
  const shownInstance: PackInstanceInput | null = showingWorking ? working!.instance : (stored.data?.instance ?? null);
  const shownSummary = storedId ? plan.layouts.find((l) => l.id === storedId) ?? null : null;

  const partNames = useMemo(() => new Map([...lineInfo].map(([id, i]) => [id, i.partName] as const)), [lineInfo]);
  const volumeByLine = useMemo(() => new Map([...lineInfo].map(([id, i]) => [id, i.volumeMm3] as const)), [lineInfo]);
  const workingNumbers = useMemo(
    () => (working?.result ? estimateWorking(working.instance, working.result, machine, material, volumeByLine) : null),
    [working?.result, working?.instance, machine, material, volumeByLine],
  );
  const shownNumbers: ShownNumbers | null = showingWorking ? workingNumbers : stored.data ? numbersFromEstimate(stored.data.estimate, stored.data.result) : null;

  const colourOrder = useMemo(() => {
    const ids = [...lineOrder];
    for (const p of shownInstance?.parts ?? []) if (!ids.includes(p.id)) ids.push(p.id);
    return ids;
  }, [lineOrder, shownInstance]);
  const partIdsInOrder = useMemo(() => colourOrder.map((id) => lineInfo.get(id)?.partId), [colourOrder, lineInfo]);
  const placements = useMemo(() => (shownResult ? toChamberPlacements(shownResult, colourOrder) : EMPTY_PLACEMENTS), [shownResult, colourOrder]);
  const copiesByIndex = useMemo(() => {
    const c = new Uint32Array(colourOrder.length + 1);
    for (const k of placements.partIndex) c[k]++;
    return c;
  }, [placements, colourOrder.length]);
  const chamberMeshes = useChamberMeshes(lab.id, partIdsInOrder, copiesByIndex);
  const partIds = useMemo(() => shownResult?.placements.map((p) => p.id) ?? [], [shownResult]);
  const describe = useCallback(
    (i: number) => {
      const info = lineInfo.get(partIds[i]);
      return info ? `${info.partName} · ${info.requestTitle} (due ${info.dueDate})` : `Part ${i + 1}`;
    },
    [lineInfo, partIds],
  );

  const placedByLine = useMemo(() => (shownResult ? countById(shownResult.placements) : null), [shownResult]);
  const editorLines: EditorLine[] = lines.map((l, i) => {
    const info = lineInfo.get(l.requestLineId);
    return {
      requestLineId: l.requestLineId,
      partName: info?.partName ?? 'Unknown part',
      requestTitle: info?.requestTitle ?? '',
      dueDate: info?.dueDate ?? '',
      priority: info?.priority ?? 'normal',
      sizeMm: info?.sizeMm ?? [0, 0, 0],
      quantity: l.quantity,
      maxQuantity: Math.max(l.quantity, info?.maxQuantity ?? l.quantity),
      rule: l.orientation ?? info?.partRule ?? 'any',
      ruleOverride: l.orientation,
      partRule: info?.partRule ?? 'any',
      placed: placedByLine ? (placedByLine.get(l.requestLineId) ?? 0) : null,
      colour: colours[i],
      added: !plan.lines.some((p) => p.requestLineId === l.requestLineId),
    };
  });

  const mx = fullInstance.margin?.xy ?? 0;
  const mb = fullInstance.margin?.bottom ?? 0;
  const mt = fullInstance.margin?.top ?? 0;
  // Stable props, so that the 3D view does not redo its buffers when the editor draws again.
  const viewMargin = useMemo(() => ({ xy: mx, bottom: mb, top: mt }), [mx, mb, mt]);
  const viewColours = useMemo(() => colourOrder.map((_, i) => lineColour(i)), [colourOrder]);

  // ---- cut, marks ---------------------------------------------------------
  const chamberRef = useRef<ChamberViewHandle>(null);
  const [cutMm, setCutMm] = useState<number | null>(null);
  const layerHeightMm = shownInstance?.layerHeight ?? options.layerHeightMm;
  const usedHeight = shownResult?.height ?? 0;
  const marked = useMarked();
  useEffect(() => clearMarked(), [shownId]);
  const onPick = (i: number | null) => {
    if (i !== null && editable && packer.status !== 'running') toggleMarked(i);
  };
  const onRemoveMarked = () => {
    if (!shownInstance || !shownResult) return;
    const next = withoutPlacements(shownInstance, shownResult, new Set(marked));
    if (!next) return;
    clearMarked();
    setWorking({ mode: 'edit', instance: shownInstance, kept: [], result: next, lines, baseLines: lines, problem: null });
    showLayout(planId, WORKING);
  };
  const moveCut = (layers: number) => {
    const top = Math.max(usedHeight, layerHeightMm);
    const current = cutMm ?? top;
    const next = Math.max(0, Math.min(top, Math.round(current / layerHeightMm + layers) * layerHeightMm));
    setCutMm(next >= top ? null : next);
  };

  // ---- re-pack what is new, fill the rest ----------------------------------
  const lockedShown = !showingWorking && shownSummary?.locked && stored.data;
  const repack = useMemo(() => {
    if (!lockedShown || !stored.data) return { available: false, reason: 'Lock a kept layout, change the lines, then re-pack only what is new.' };
    if (partsKey(stored.data.instance) === partsKey(fullInstance)) return { available: false, reason: 'The locked layout already holds these lines.' };
    return { available: true, reason: null };
  }, [lockedShown, stored.data, fullInstance]);
  const onRepack = () => {
    if (!stored.data || !repack.available) return;
    const want = new Map(fullInstance.parts.map((p) => [p.id, p.quantity] as const));
    const taken = new Map<string, number>();
    const kept: Placement[] = [];
    for (const p of stored.data.result.placements) {
      const n = taken.get(p.id) ?? 0;
      if (n < (want.get(p.id) ?? 0)) {
        kept.push(p);
        taken.set(p.id, n + 1);
      }
    }
    const parts = fullInstance.parts.map((p) => ({ ...p, quantity: p.quantity - (taken.get(p.id) ?? 0) }));
    run({ mode: 'repack', instance: fullInstance, kept, result: null, lines, baseLines: lines, problem: null }, instanceAbove(fullInstance, kept, parts, 'min-height'));
  };

  const fillCandidates = useMemo(() => {
    const inPlan = new Map(lines.map((l) => [l.requestLineId, l.quantity] as const));
    return (openLines.data ?? [])
      .map((o) => ({ line: o, extra: o.remaining - (inPlan.get(o.requestLineId) ?? 0) }))
      .filter((c) => c.extra > 0 && !inPlan.has(c.line.requestLineId));
  }, [openLines.data, lines]);
  const fillAvailable = fillCandidates.reduce((s, c) => s + c.extra, 0);
  const fillReason = !shownResult
    ? 'Pack first: the rest is filled around a layout.'
    : partsKey(shownInstance) !== partsKey(fullInstance)
      ? 'The lines changed since this layout was packed: pack or re-pack first.'
      : fillAvailable === 0
        ? 'No other open request lines in this material.'
        : null;
  const onFill = () => {
    if (!shownResult || !shownInstance || fillReason) return;
    // Most urgent first, as the server lists them; the engine fills by volume among them.
    const candidateLines: InstanceLine[] = fillCandidates.map((c) => ({
      requestLineId: c.line.requestLineId,
      quantity: c.extra,
      orientation: c.line.part.orientation,
      sizeMm: c.line.part.sizeMm,
    }));
    const candidates = buildInstance(candidateLines, machine, material, options).parts;
    // When everything offered may fit the space left, pack it as low as it goes; when it cannot all fit, take the most volume.
    const slab = instanceAbove(fullInstance, shownResult.placements, candidates, 'min-height');
    const parsedSlab = parseInstance(slab);
    const crowded = parsedSlab.ok && buildCountLowerBound(parsedSlab.instance) > 1;
    const engine = crowded ? { ...slab, objective: 'max-volume' as const } : slab;
    run({ mode: 'fill', instance: fullInstance, kept: shownResult.placements, result: null, lines, baseLines: lines, problem: null }, engine);
  };

  // ---- saving ---------------------------------------------------------------
  const save = useSavePlanMutation(lab.id, planId);
  const addLayout = useAddLayoutMutation(lab.id, planId);
  const choose = useChooseLayoutMutation(lab.id, planId);
  const patchLayout = usePatchLayoutMutation(lab.id, planId);
  const deleteLayout = useDeleteLayoutMutation(lab.id, planId);
  const submit = useSubmitPlanMutation(lab.id, planId);
  const [conflict, setConflict] = useState<{ currentVersion: number | null } | null>(null);
  const [busyLayout, setBusyLayout] = useState<string | null>(null);

  /** Saves the draft's name and lines; resolves false when the save did not happen. */
  const saveDraft = useCallback(
    async (version?: number, linesOverride?: DraftLine[]): Promise<boolean> => {
      const d = getPlanDraft(planId);
      const body = {
        version: version ?? d?.baseVersion ?? plan.version,
        name: (d?.name ?? plan.name).trim() || plan.name,
        lines: (linesOverride ?? d?.lines ?? savedLines).map((l) => ({ requestLineId: l.requestLineId, quantity: l.quantity, orientation: l.orientation })),
        draft: { options: d?.options ?? savedOptions ?? options },
      };
      try {
        await save.mutateAsync(body);
        discardDraft(planId);
        setConflict(null);
        return true;
      } catch (e) {
        if (isApiError(e) && e.code === 'version_conflict') {
          const fresh = await refetch();
          setConflict({ currentVersion: fresh?.version ?? null });
        } else {
          setMessage({ tone: 'danger', text: `Not saved: ${isApiError(e) ? e.message : String(e)} Your changes are kept in this browser.` });
        }
        return false;
      }
    },
    [planId, plan.version, plan.name, savedLines, savedOptions, options, save, refetch],
  );

  const onSave = async () => {
    if (!editable) return;
    setMessage(null);
    if (!draft) {
      setMessage({ tone: 'info', text: 'Nothing to save: the plan is as stored.' });
      return;
    }
    if (await saveDraft()) setMessage({ tone: 'success', text: 'Saved.' });
  };

  const onKeepMine = async () => {
    const fresh = await refetch();
    if (fresh && (await saveDraft(fresh.version))) setMessage({ tone: 'success', text: 'Saved your changes over the newer copy.' });
  };
  const onReload = async () => {
    discardDraft(planId);
    setConflict(null);
    setWorking(null);
    await refetch();
    setMessage({ tone: 'info', text: 'Reloaded the saved plan; your unsaved changes were dropped.' });
  };

  /** My own choice raises the version too; a draft begun before it follows along instead of conflicting with myself. */
  const followVersion = (before: number, after: number) => {
    if (getPlanDraft(planId)?.baseVersion === before) rebaseDraft(planId, after);
  };

  const workingStale = !!working && partsKey(working.instance) !== partsKey(fullInstance);
  const canKeep = editable && !!working?.result && !working.problem && packer.status !== 'running' && !workingStale && working.result.placements.length > 0;
  const onKeep = async () => {
    if (!working?.result || !canKeep) return;
    setMessage(null);
    // The server checks a layout against the saved lines: save them first when they differ.
    if (!sameLines(working.lines, savedLines) || dirty) {
      const ok = await saveDraft(undefined, working.lines);
      if (!ok) return;
    }
    try {
      const label = `${working.mode === 'fill' ? 'Filled' : working.mode === 'repack' ? 'Re-packed' : working.mode === 'edit' ? 'Edited' : 'Seed'} ${working.mode === 'pack' ? working.instance.seed : ''}`.trim();
      const res = await addLayout.mutateAsync({ instance: working.instance, result: working.result, label: `${label} · ${working.result.layers} layers` });
      setWorking(null);
      showLayout(planId, res.id);
      setMessage({ tone: 'success', text: `Kept as "${res.label}".` });
      if (working.mode === 'pack') onOptions({ seed: (working.instance.seed ?? 0) + 1 });
    } catch (e) {
      setMessage({ tone: 'danger', text: `The layout was not kept: ${isApiError(e) ? e.message : String(e)}` });
    }
  };

  const onChoose = async (layoutId: string) => {
    setBusyLayout(layoutId);
    setMessage(null);
    try {
      const res = await choose.mutateAsync(layoutId);
      followVersion(plan.version, res.version);
    } catch (e) {
      setMessage({ tone: 'danger', text: isApiError(e) ? e.message : String(e) });
    } finally {
      setBusyLayout(null);
    }
  };
  const onLock = (layoutId: string, locked: boolean) =>
    patchLayout.mutate({ layoutId, locked }, { onError: (e) => setMessage({ tone: 'danger', text: isApiError(e) ? e.message : String(e) }) });
  const onDelete = (layoutId: string) => {
    if (shownId === layoutId) showLayout(planId, null);
    deleteLayout.mutate(layoutId, { onError: (e) => setMessage({ tone: 'danger', text: isApiError(e) ? e.message : String(e) }) });
  };

  const chosen = plan.layouts.find((l) => l.chosen) ?? null;
  const submitBlock = !chosen ? 'Choose a layout first.' : !chosen.matchesPlan ? 'The chosen layout no longer matches the lines: pack and choose again.' : dirty ? 'Save or undo your changes first.' : null;
  const onSubmit = async () => {
    if (submitBlock) {
      setMessage({ tone: 'info', text: submitBlock });
      return;
    }
    setMessage(null);
    try {
      const res = await submit.mutateAsync(undefined);
      setMessage({ tone: 'success', text: `Sent for review${res.notified?.length ? `; ${res.notified.length} lead${res.notified.length === 1 ? ' was' : 's were'} told` : ''}.` });
    } catch (e) {
      setMessage({ tone: 'danger', text: isApiError(e) ? e.message : String(e) });
    }
  };

  // ---- shortcuts ------------------------------------------------------------
  const helpOpen = useHelpOpen();
  const hasKeys = useEditorShortcuts(
    {
      pack: onPack,
      cancel: () => {
        if (helpOpen) setHelpOpen(false);
        else if (packer.status === 'running') packer.cancel();
      },
      save: () => void onSave(),
      keep: () => void onKeep(),
      fit: () => chamberRef.current?.setView('fit'),
      top: () => chamberRef.current?.setView('top'),
      front: () => chamberRef.current?.setView('front'),
      side: () => chamberRef.current?.setView('side'),
      layerUp: ({ shift }) => moveCut(shift ? 10 : 1),
      layerDown: ({ shift }) => moveCut(shift ? -10 : -1),
      help: () => setHelpOpen(!helpOpen),
    },
    true,
  );

  // ---- layout rows ------------------------------------------------------------
  const rows: LayoutRow[] = useMemo(() => {
    const r = rowsOf(plan.layouts);
    if (working?.result) {
      r.unshift({
        id: WORKING,
        label: packer.status === 'running' ? 'Packing…' : 'Not kept yet',
        numbers: workingNumbers,
        chosen: false,
        locked: false,
        matchesPlan: !workingStale,
        settings: `${working.instance.layerHeight} mm layers · seed ${working.instance.seed} · ${working.instance.spacing} mm gap`,
        working: true,
      });
    }
    return r;
  }, [plan.layouts, working, workingNumbers, packer.status, workingStale]);

  const shownLabel = showingWorking
    ? !working?.result
      ? packer.status === 'running'
        ? 'Packing: waiting for the first layout'
        : 'This packing gave no layout'
      : packer.status === 'running'
      ? 'Packing: best layout so far'
      : workingStale
        ? 'Not kept · the lines changed since, pack again'
        : `Not kept yet · ${working?.mode === 'fill' ? 'filled' : working?.mode === 'edit' ? 'edited' : 'packed'}`
    : shownSummary
      ? `${shownSummary.label}${shownSummary.chosen ? ' · chosen' : ''}${shownSummary.locked ? ' · locked' : ''}`
      : stored.isFetching
        ? 'Loading layout…'
        : 'No layout yet: pack the plan';

  // ---- panes ----------------------------------------------------------------
  const tab = useEditorTab();
  const packerError = (lostShown ? lostWorker : null) ?? packer.error ?? working?.problem ?? null;
  const retry = lastRun ?? (lostWorker && lostShown ? onPack : null);
  const linesPane = (
    <LinesPane
      lines={editorLines}
      editable={editable}
      onQuantity={onQuantity}
      onRule={onRule}
      onRuleAll={onRuleAll}
      onRemoveLine={onRemoveLine}
      options={options}
      onOptions={onOptions}
      materialSpacingMm={material.spacingMm}
      layerHeightsMm={machine.layerHeightsMm}
      packer={{ status: packer.status, progress: packer.progress, phase: packer.phase, error: packerError }}
      packingWhat={working ? { pack: 'Packing every line', repack: 'Packing what is new above the locked parts', fill: 'Filling the free space above', edit: 'Packing' }[working.mode] : null}
      onPack={onPack}
      onCancel={packer.cancel}
      onRetry={retry}
      fill={{ available: fillAvailable, reason: fillReason, onFill }}
      repack={{ available: repack.available, reason: repack.reason, onRepack }}
    />
  );
  const buildHeight = wide ? undefined : Math.max(360, Math.round(height * 0.62));
  const buildPane = (
    <BuildPane
      ref={chamberRef}
      chamberMm={machine.chamberMm}
      margin={viewMargin}
      placements={placements}
      lineColours={viewColours}
      meshesByPart={chamberMeshes.meshes}
      heightMm={usedHeight}
      layerHeightMm={layerHeightMm}
      cutMm={cutMm}
      onCut={setCutMm}
      describe={describe}
      onPick={onPick}
      marked={marked.length}
      onRemoveMarked={onRemoveMarked}
      onClearMarked={clearMarked}
      editable={editable}
      caption={shownLabel}
      live={packer.status === 'running' && showingWorking && !!working?.result}
      heightPx={buildHeight}
      loading={!showingWorking && !!storedId && !stored.data}
    />
  );
  const bedAreaMm2 = (machine.chamberMm[0] - 2 * material.marginXyMm) * (machine.chamberMm[1] - 2 * material.marginXyMm);
  const numbersPane = (
    <NumbersPane
      numbers={shownNumbers}
      title={shownLabel}
      bedAreaMm2={bedAreaMm2}
      cutLayer={cutMm === null ? null : Math.round(cutMm / layerHeightMm)}
      note={showingWorking ? 'Estimated here; the server estimates it again when the layout is kept.' : undefined}
      partNames={partNames}
    />
  );
  const powderPane = <PlanPowderPanel planId={planId} freshKg={shownNumbers?.freshKg} reusedKg={shownNumbers?.reusedKg} layoutLabel={shownLabel} />;
  const layoutsPane = (
    <View style={styles.box} testID="plan-layouts">
      <View style={styles.boxHead}>
        <Text variant="heading">Layouts</Text>
        {editable ? <Button label="Keep layout (K)" size="sm" onPress={onKeep} disabled={!canKeep} loading={addLayout.isPending} testID="layout-keep" /> : null}
      </View>
      <LayoutsTable
        rows={rows}
        shownId={shownId}
        editable={editable}
        onShow={(id) => showLayout(planId, id)}
        onChoose={onChoose}
        onLock={onLock}
        onDelete={onDelete}
        busyId={busyLayout}
      />
    </View>
  );
  const historyPane = (
    <View style={styles.box}>
      <Text variant="heading">History</Text>
      <PlanHistory events={plan.events} />
    </View>
  );

  const titleBox = (
    <View style={[styles.titleBox, !wide && styles.titleBoxPhone]}>
      {editable ? (
        <TextInput value={name} onChangeText={onName} accessibilityLabel="Plan name" style={styles.nameInput} testID="plan-name" />
      ) : (
        <Text variant="title" numberOfLines={wide ? 1 : 2} testID="plan-name-readonly">{plan.name}</Text>
      )}
      <Text variant="caption" color="inkMuted" numberOfLines={wide ? 1 : 2}>
        {plan.machine.name} ({machine.chamberMm.join(' × ')} mm) · {plan.material.name} · version {plan.version}
      </Text>
    </View>
  );
  const header = (
    <View style={styles.header}>
      <Button label="‹ Plans" variant="ghost" size="sm" onPress={() => router.navigate('/plans')} testID="plan-back" />
      {wide ? titleBox : null}
      <Badge label={STATUS_LABELS[plan.status]} tone={STATUS_TONES[plan.status]} testID="plan-status" />
      {dirty ? <Badge label="Unsaved changes" tone="amber" testID="plan-dirty" /> : null}
      {wide ? null : titleBox}
      <View style={styles.headerActions}>
        {hasKeys && wide ? <Button label="Shortcuts (?)" variant="ghost" size="sm" onPress={() => setHelpOpen(true)} testID="plan-shortcuts" /> : null}
        {editable ? (
          <>
            <Button label="Save (S)" variant="secondary" size="sm" onPress={onSave} disabled={!draft} loading={save.isPending} testID="plan-save" />
            <Button label="Send for review" size="sm" onPress={onSubmit} loading={submit.isPending} testID="plan-submit" />
          </>
        ) : null}
      </View>
    </View>
  );

  const banner = (
    <>
      {!plan.editable ? (
        <Notice tone="info" title={`${STATUS_LABELS[plan.status]}: read-only`} testID="plan-readonly">
          {plan.status === 'in_review' ? 'A lead reviews the chosen layout; it can be changed again if they send it back.' : 'This plan can no longer be changed here.'}
        </Notice>
      ) : null}
      {plan.editable && !canPlan ? <Notice tone="info">Only planners and leads change plans.</Notice> : null}
      {plan.chosenLayoutId ? <PlanFlags planId={plan.id} compact /> : null}
      {plan.status === 'changes_requested' ? (
        <Notice tone="caution" title="Sent back" testID="plan-sent-back">{[...plan.events].reverse().find((e) => e.to === 'changes_requested')?.comment ?? ''}</Notice>
      ) : null}
      {packerError ? (
        <Notice tone="danger" title="Packing failed" testID="pack-error">
          <Text>{packerError} The plan is unchanged.</Text>
          {retry ? <Button label="Try again" variant="secondary" size="sm" onPress={retry} testID="pack-retry" /> : null}
        </Notice>
      ) : null}
      {message ? (
        <Notice tone={message.tone === 'success' ? 'success' : message.tone === 'danger' ? 'danger' : 'info'} testID="plan-message">
          {message.text}
        </Notice>
      ) : null}
    </>
  );

  const sheets = (
    <>
      <ShortcutHelp open={helpOpen} onClose={() => setHelpOpen(false)} />
      <ConflictDialog
        open={!!conflict}
        currentVersion={conflict?.currentVersion ?? null}
        onReload={onReload}
        onKeepMine={onKeepMine}
        onClose={() => setConflict(null)}
        busy={save.isPending}
      />
    </>
  );

  if (wide) {
    return (
      <View style={styles.screen} testID="screen-plan-editor">
        {header}
        {banner}
        <View style={styles.panes} testID="plan-panes-wide">
          <ScrollView style={styles.left} contentContainerStyle={styles.paneContent}>
            {linesPane}
          </ScrollView>
          <View style={styles.centre}>{buildPane}</View>
          <ScrollView style={styles.right} contentContainerStyle={styles.paneContent}>
            {numbersPane}
            {powderPane}
            {layoutsPane}
            {historyPane}
          </ScrollView>
        </View>
        {sheets}
        {chamberMeshes.loaders}
      </View>
    );
  }

  const TABS: { key: EditorTab; label: string }[] = [
    { key: 'lines', label: 'Lines' },
    { key: 'build', label: '3D' },
    { key: 'numbers', label: 'Numbers' },
    { key: 'layouts', label: 'Layouts' },
  ];
  return (
    <View style={styles.screen} testID="screen-plan-editor">
      <ScrollView contentContainerStyle={styles.phoneContent} keyboardShouldPersistTaps="handled">
        {header}
        {banner}
        <View style={styles.tabs} accessibilityRole="tablist" testID="plan-tabs">
          {TABS.map((t) => (
            <Button key={t.key} label={t.label} size="sm" variant={tab === t.key ? 'primary' : 'ghost'} onPress={() => setEditorTab(t.key)} testID={`plan-tab-${t.key}`} aria-selected={tab === t.key} />
          ))}
        </View>
        {tab === 'lines' ? linesPane : null}
        {tab === 'build' ? buildPane : null}
        {tab === 'numbers' ? numbersPane : null}
        {tab === 'numbers' ? powderPane : null}
        {tab === 'layouts' ? (
          <>
            {layoutsPane}
            {historyPane}
          </>
        ) : null}
      </ScrollView>
      {sheets}
      {chamberMeshes.loaders}
    </View>
  );
}

const styles = StyleSheet.create({
  screen: { flex: 1, backgroundColor: colors.powder, padding: spacing.lg, gap: spacing.md },
  header: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  titleBox: { flexGrow: 1, flexShrink: 1, flexBasis: 260, gap: 2 },
  titleBoxPhone: { flexBasis: '100%' },
  nameInput: { fontSize: 20, fontWeight: '600', paddingVertical: 4 },
  headerActions: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap', marginLeft: 'auto' },
  panes: { flex: 1, flexDirection: 'row', gap: spacing.md, minHeight: 0 },
  left: { width: 330, flexGrow: 0 },
  centre: { flex: 1, minWidth: 0 },
  right: { width: 420, flexGrow: 0 },
  paneContent: { gap: spacing.md, paddingBottom: spacing.xl },
  phoneContent: { gap: spacing.md, paddingBottom: spacing.xxxl },
  tabs: { flexDirection: 'row', gap: spacing.xs, flexWrap: 'wrap' },
  box: { gap: spacing.md, padding: spacing.lg, backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line },
  boxHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm },
});
