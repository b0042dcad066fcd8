import { create } from 'zustand';
import { createJSONStorage, persist } from 'zustand/middleware';
import type { PlanOrientationRule } from '../../shared/schemas/plans';
import { persistStorage } from './persistStorage';

/**
 * The plan editor's client state. Unsaved edits of a plan (its name, lines,
 * quantities, orientation rules and packing options) are a draft kept per
 * plan in local storage on the web, so a reload loses nothing; the plan
 * itself stays in react-query. Which layout is shown, the open tab and the
 * help sheet are per page and not kept.
 */
export interface DraftLine {
  requestLineId: string;
  quantity: number;
  /** Null keeps the part's own rule. */
  orientation: PlanOrientationRule | null;
}

export interface DraftOptions {
  seed: number;
  spacingMm: number;
  timeLimitMs: number;
  layerHeightMm: number;
  /** Pack the parts by their boxes (the default) or by their shapes. */
  fit?: 'box' | 'shape';
}

export interface PlanDraft {
  /** The plan version the draft started from: a save sends it. */
  baseVersion: number;
  name: string;
  lines: DraftLine[];
  options: DraftOptions | null;
  changedAt: string;
}

export type EditorTab = 'lines' | 'build' | 'numbers' | 'layouts';

interface PlanEditorState {
  drafts: Record<string, PlanDraft>;
  /** Layout shown per plan: a stored layout's id, or 'working' for the packing not yet kept. */
  shown: Record<string, string>;
  tab: EditorTab;
  /** On a wide screen: the numbers and layouts in a column beside the 3D view rather than under it. */
  numbersBeside: boolean;
  helpOpen: boolean;
  /** Placement indices of the shown layout marked for removal. */
  marked: number[];
}

export const usePlanEditorStore = create<PlanEditorState>()(
  persist<PlanEditorState, [], [], Pick<PlanEditorState, 'drafts'>>(
    () => ({ drafts: {}, shown: {}, tab: 'build', numbersBeside: false, helpOpen: false, marked: [] }),
    {
      name: 'sinterstack.plan-drafts',
      storage: createJSONStorage(() => persistStorage),
      partialize: (s) => ({ drafts: s.drafts }),
      version: 1,
    },
  ),
);

export const usePlanDraft = (planId: string) => usePlanEditorStore((s) => s.drafts[planId] ?? null);
export const useShownLayout = (planId: string) => usePlanEditorStore((s) => s.shown[planId] ?? null);
export const useEditorTab = () => usePlanEditorStore((s) => s.tab);
export const useNumbersBeside = () => usePlanEditorStore((s) => s.numbersBeside);
export const useHelpOpen = () => usePlanEditorStore((s) => s.helpOpen);
export const useMarked = () => usePlanEditorStore((s) => s.marked);

export function getPlanDraft(planId: string): PlanDraft | null {
  return usePlanEditorStore.getState().drafts[planId] ?? null;
}

/** Starts or changes the draft; `start` gives the plan's saved state when there is no draft yet. */
export function editDraft(planId: string, start: () => Omit<PlanDraft, 'changedAt'>, change: (d: PlanDraft) => PlanDraft): void {
  usePlanEditorStore.setState((s) => {
    const current = s.drafts[planId] ?? { ...start(), changedAt: new Date().toISOString() };
    return { drafts: { ...s.drafts, [planId]: { ...change(current), changedAt: new Date().toISOString() } } };
  });
}

/** After a save the draft follows the saved version, or goes when nothing differs. */
export function rebaseDraft(planId: string, version: number): void {
  usePlanEditorStore.setState((s) => {
    const d = s.drafts[planId];
    if (!d) return s;
    return { drafts: { ...s.drafts, [planId]: { ...d, baseVersion: version } } };
  });
}

export function discardDraft(planId: string): void {
  usePlanEditorStore.setState((s) => {
    const { [planId]: _gone, ...rest } = s.drafts;
    return { drafts: rest };
  });
}

export function showLayout(planId: string, layoutId: string | null): void {
  usePlanEditorStore.setState((s) => {
    const { [planId]: _old, ...rest } = s.shown;
    return { shown: layoutId ? { ...rest, [planId]: layoutId } : rest, marked: [] };
  });
}

export function setEditorTab(tab: EditorTab): void {
  usePlanEditorStore.setState({ tab });
}

export function setNumbersBeside(beside: boolean): void {
  usePlanEditorStore.setState({ numbersBeside: beside });
}

export function setHelpOpen(open: boolean): void {
  usePlanEditorStore.setState({ helpOpen: open });
}

export function toggleMarked(index: number): void {
  usePlanEditorStore.setState((s) => ({ marked: s.marked.includes(index) ? s.marked.filter((i) => i !== index) : [...s.marked, index] }));
}

export function setMarked(indices: number[]): void {
  usePlanEditorStore.setState({ marked: indices });
}

export function clearMarked(): void {
  usePlanEditorStore.setState({ marked: [] });
}
