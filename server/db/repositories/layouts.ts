import { literal, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { LayoutRow as LayoutModel } from '../models/plans';
import type { LayoutSettings } from '../../../shared/schemas/plans';

/** The numbers a layout's `summary` column keeps about its packing. */
export type StoredLayoutSummary = { unplaced?: Array<{ id: string; count: number }>; height: number; layers: number; utilization: number; elapsedMs: number };

/** The columns of a layout row a summary shows, with its author's name and the estimate without its per-layer profile. */
export type LayoutSummaryRow = {
  id: string;
  label: string;
  locked: boolean;
  settings: LayoutSettings;
  lines_key: string;
  placement_count: number;
  summary: StoredLayoutSummary;
  result_format: string;
  estimate_summary: Record<string, unknown> | null;
  created_by: string | null;
  created_by_name: string | null;
  created_at: Date | string;
};

/** A whole layout row, with its author's name and whether its plan has it chosen. */
export type LayoutDbRow = Omit<LayoutSummaryRow, 'estimate_summary'> & {
  plan_id: string;
  instance: unknown;
  placements_format: number;
  placements: Buffer;
  part_ids: string[];
  estimate: Record<string, unknown>;
  chosen_layout_id: string | null;
};

/** What a new layout stores: the packing's input and result, its placements as bytes, and its estimate. */
export type NewLayout = {
  planId: string;
  label: string;
  settings: LayoutSettings;
  instance: unknown;
  linesKey: string;
  resultFormat: string;
  placementsFormat: number;
  placementCount: number;
  partIds: string[];
  placements: Buffer;
  summary: StoredLayoutSummary;
  estimate: Record<string, unknown>;
  locked: boolean;
  createdBy: string;
};

const summaryColumns = (l: LayoutModel, creatorName: string | null): Omit<LayoutSummaryRow, 'estimate_summary'> => ({
  id: l.id,
  label: l.label,
  locked: l.locked,
  settings: l.settings as LayoutSettings,
  lines_key: l.linesKey,
  placement_count: l.placementCount,
  summary: l.summary as StoredLayoutSummary,
  result_format: l.resultFormat,
  created_by: l.createdBy,
  created_by_name: creatorName,
  created_at: l.createdAt,
});

/** A plan's packed layouts: their rows, summaries, labels and locks. */
export function layoutsRepository(db: Database) {
  const { Layout, Plan, User } = db.models;
  const creator = { model: User, as: 'creator', attributes: ['name'], required: false };
  return {
    /** The plan's layouts, oldest first, each without its placements and with its estimate less the per-layer profile. */
    async summaries(planId: string, transaction?: Transaction): Promise<LayoutSummaryRow[]> {
      const rows = await Layout.findAll({
        where: { planId },
        attributes: [
          'id',
          'label',
          'locked',
          'settings',
          'linesKey',
          'resultFormat',
          'placementCount',
          'summary',
          'createdBy',
          'createdAt',
          // The per-layer profile is long and no summary shows it: the database leaves it out.
          [literal(`"Layout"."estimate" - 'areaPerLayerMm2'`), 'estimateSummary'],
        ],
        include: [creator],
        order: [['createdAt', 'ASC']],
        transaction,
      });
      return rows.map((l) => ({ ...summaryColumns(l, l.creator?.name ?? null), estimate_summary: l.get('estimateSummary') as Record<string, unknown> | null }));
    },

    /** The whole layout of the lab's plan, or null. */
    async find(labId: string, planId: string, layoutId: string, transaction?: Transaction): Promise<LayoutDbRow | null> {
      const l = await Layout.findOne({
        where: { id: layoutId, planId },
        include: [{ model: Plan, as: 'plan', required: true, where: { labId }, attributes: ['chosenLayoutId'] }, creator],
        transaction,
      });
      if (!l || !l.plan) return null;
      return {
        ...summaryColumns(l, l.creator?.name ?? null),
        plan_id: l.planId,
        instance: l.instance,
        placements_format: l.placementsFormat,
        placements: l.placements,
        part_ids: l.partIds,
        estimate: l.estimate as Record<string, unknown>,
        chosen_layout_id: l.plan.chosenLayoutId,
      };
    },

    /** The plan's layout's id, lines key and lock, or null. */
    async head(planId: string, layoutId: string | null, transaction?: Transaction): Promise<{ id: string; lines_key: string; locked: boolean } | null> {
      if (layoutId === null) return null;
      const l = await Layout.findOne({ where: { id: layoutId, planId }, attributes: ['id', 'linesKey', 'locked'], transaction });
      return l ? { id: l.id, lines_key: l.linesKey, locked: l.locked } : null;
    },

    /** The lines key a layout was packed for, or null when there is no such layout. */
    async linesKeyOf(layoutId: string, transaction?: Transaction): Promise<string | null> {
      const l = await Layout.findByPk(layoutId, { attributes: ['linesKey'], transaction });
      return l ? l.linesKey : null;
    },

    async count(planId: string, transaction?: Transaction): Promise<number> {
      return Layout.count({ where: { planId }, transaction });
    },

    /** Stores a layout; its id. */
    async create(layout: NewLayout, transaction: Transaction): Promise<string> {
      return (await Layout.create(layout, { transaction })).id;
    },

    /** Sets the label and the lock where given; false when the plan has no such layout. */
    async relabel(planId: string, layoutId: string | null, patch: { label?: string | null; locked?: boolean | null }, transaction: Transaction): Promise<boolean> {
      if (layoutId === null) return false;
      const values = { ...(patch.label != null ? { label: patch.label } : {}), ...(patch.locked != null ? { locked: patch.locked } : {}) };
      if (Object.keys(values).length === 0) return (await Layout.count({ where: { id: layoutId, planId }, transaction })) > 0;
      const [count] = await Layout.update(values, { where: { id: layoutId, planId }, transaction });
      return count > 0;
    },

    async remove(layoutId: string, transaction: Transaction): Promise<void> {
      await Layout.destroy({ where: { id: layoutId }, transaction });
    },
  };
}
export type LayoutsRepository = ReturnType<typeof layoutsRepository>;
