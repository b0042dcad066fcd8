/**
 * What the plan editor does with the server: save the draft (and settle a
 * version conflict), keep the layout being made, choose, lock and remove
 * kept layouts, send the plan for review. Each action tells its outcome
 * through `say`.
 */
import { useCallback, useState } from 'react';
import type { PlanView } from '../../shared/schemas/plans';
import { isApiError } from '../api/client';
import {
  useAddLayoutMutation,
  useChooseLayoutMutation,
  useDeleteLayoutMutation,
  usePatchLayoutMutation,
  useSavePlanMutation,
  useSubmitPlanMutation,
} from '../queries/plans';
import { discardDraft, getPlanDraft, rebaseDraft, showLayout, type DraftLine, type DraftOptions, type PlanDraft } from '../stores/planEditor';
import { canKeep, isByShape, keptLabel, sameLines, submitBlockOf, type Working } from './editorModel';
import { shapeResultOf } from './byShape';

export interface EditorMessage {
  tone: 'danger' | 'success' | 'info';
  text: string;
}

export interface LayoutActionsInput {
  labId: string;
  plan: PlanView;
  refetch: () => Promise<PlanView | undefined>;
  editable: boolean;
  draft: PlanDraft | null;
  dirty: boolean;
  savedLines: DraftLine[];
  savedOptions: DraftOptions | null;
  options: DraftOptions;
  /** The layout being made, whether a run is going, and whether the lines changed since it began. */
  working: Working | null;
  running: boolean;
  stale: boolean;
  /** Placements of the working layout a hand edit left breaking the rules: it cannot be kept until none are. */
  faults: number;
  dropWorking: () => void;
  /** The layout shown (a kept layout's id, or the working one's). */
  shownId: string | null;
  onOptions: (patch: Partial<DraftOptions>) => void;
  say: (message: EditorMessage | null) => void;
}

const reason = (e: unknown) => (isApiError(e) ? e.message : String(e));

export function useLayoutActions(a: LayoutActionsInput) {
  const { labId, plan, refetch, say } = a;
  const planId = plan.id;
  const save = useSavePlanMutation(labId, planId);
  const addLayout = useAddLayoutMutation(labId, planId);
  const choose = useChooseLayoutMutation(labId, planId);
  const patchLayout = usePatchLayoutMutation(labId, planId);
  const deleteLayout = useDeleteLayoutMutation(labId, planId);
  const submit = useSubmitPlanMutation(labId, planId);
  const [conflict, setConflict] = useState<{ currentVersion: number | null } | null>(null);
  const [busyLayout, setBusyLayout] = useState<string | null>(null);

  const { savedLines, savedOptions, options } = a;
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
          say({ tone: 'danger', text: `Not saved: ${reason(e)} Your changes are kept in this browser.` });
        }
        return false;
      }
    },
    [planId, plan.version, plan.name, savedLines, savedOptions, options, save, refetch, say],
  );

  const onSave = async () => {
    if (!a.editable) return;
    say(null);
    if (!a.draft) {
      say({ tone: 'info', text: 'Nothing to save: the plan is as stored.' });
      return;
    }
    if (await saveDraft()) say({ tone: 'success', text: 'Saved.' });
  };

  const onKeepMine = async () => {
    const fresh = await refetch();
    if (fresh && (await saveDraft(fresh.version))) say({ tone: 'success', text: 'Saved your changes over the newer copy.' });
  };
  const onReload = async () => {
    discardDraft(planId);
    setConflict(null);
    a.dropWorking();
    await refetch();
    say({ tone: 'info', text: 'Reloaded the saved plan; your unsaved changes were dropped.' });
  };

  /** My own choice raises the version too; a draft begun before it follows along instead of conflicting with myself. */
  const followVersion = (before: number, after: number) => {
    if (getPlanDraft(planId)?.baseVersion === before) rebaseDraft(planId, after);
  };

  const keepable = canKeep(a.working, { editable: a.editable, running: a.running, stale: a.stale, faults: a.faults });
  const onKeep = async () => {
    const working = a.working;
    if (!working?.result || !keepable) return;
    const kept = { ...working, result: working.result };
    say(null);
    // The server checks a layout against the saved lines: save them first when they differ.
    if (!sameLines(kept.lines, savedLines) || a.dirty) {
      const ok = await saveDraft(undefined, kept.lines);
      if (!ok) return;
    }
    try {
      // A packing by shape is kept as one: the server checks its meshes before it keeps it.
      const result = isByShape(kept.result) ? shapeResultOf(kept.result) : kept.result;
      const res = await addLayout.mutateAsync({ instance: kept.instance, result, label: keptLabel(kept) });
      a.dropWorking();
      showLayout(planId, res.id);
      say({ tone: 'success', text: `Kept as "${res.label}".` });
      if (kept.mode === 'pack') a.onOptions({ seed: (kept.instance.seed ?? 0) + 1 });
    } catch (e) {
      say({ tone: 'danger', text: `The layout was not kept: ${reason(e)}` });
    }
  };

  const onChoose = async (layoutId: string) => {
    setBusyLayout(layoutId);
    say(null);
    try {
      const res = await choose.mutateAsync(layoutId);
      followVersion(plan.version, res.version);
    } catch (e) {
      say({ tone: 'danger', text: reason(e) });
    } finally {
      setBusyLayout(null);
    }
  };
  const onLock = (layoutId: string, locked: boolean) => patchLayout.mutate({ layoutId, locked }, { onError: (e) => say({ tone: 'danger', text: reason(e) }) });
  const onDelete = (layoutId: string) => {
    if (a.shownId === layoutId) showLayout(planId, null);
    deleteLayout.mutate(layoutId, { onError: (e) => say({ tone: 'danger', text: reason(e) }) });
  };

  const submitBlock = submitBlockOf(plan.layouts, a.dirty);
  const onSubmit = async () => {
    if (submitBlock) {
      say({ tone: 'info', text: submitBlock });
      return;
    }
    say(null);
    try {
      const res = await submit.mutateAsync(undefined);
      say({ tone: 'success', text: `Sent for review${res.notified?.length ? `; ${res.notified.length} lead${res.notified.length === 1 ? ' was' : 's were'} told` : ''}.` });
    } catch (e) {
      say({ tone: 'danger', text: reason(e) });
    }
  };

  return {
    onSave,
    saving: save.isPending,
    canKeep: keepable,
    onKeep,
    keeping: addLayout.isPending,
    onChoose,
    onLock,
    onDelete,
    busyLayout,
    onSubmit,
    submitting: submit.isPending,
    conflict,
    closeConflict: () => setConflict(null),
    onKeepMine,
    onReload,
  };
}
