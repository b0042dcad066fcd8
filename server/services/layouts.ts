import { RULE_ORIENTATIONS, RULE_ROTATIONS } from '../../shared/plans/instance';
import type { Database } from '../db';
import { plansRepository } from '../db/repositories/plans';
import { layoutsRepository, type LayoutDbRow } from '../db/repositories/layouts';
import { AppError, conflict, notFound } from '../errors';
import {
  checkPlanId,
  effectiveRule,
  layoutSummary,
  linesKey,
  lockPlan,
  planLines,
  profileRow,
  readOnly,
  reopenIfSentBack,
  type Actor,
  type LineRow,
} from './planCommon';
import { isEditable } from '../../shared/plans/status';
import {
  decodePlacementBytes,
  encodePlacementBytes,
  fromPlacementArrays,
  excessProblems,
  parseInstance,
  PlacementBytesError,
  PLACEMENTS_FORMAT,
  RESULT_FORMAT,
  RESULT_FORMAT_V2,
  TOLERANCE_MM,
  toPlacementArrays,
  transformTurn,
  validateLayout,
  type FieldProblem,
  type LayoutProfiles,
  type PackInstance,
  type PackResult,
  type PackResultV2,
  type Placement,
  type Vec3,
} from '../../shared/packing';
import { estimateLayout, InvalidInputError, layerCount, profileInfo, type CalibrationInput, type LayoutEstimate } from '../../shared/estimate';
import type { ProfilesLookup, ShapeCheckRequest } from './layoutProfiles';
import type { MachineProfile, MaterialProfile } from '../../shared/types/profiles';
import type { LayoutChosen, LayoutCreate, LayoutCreated, LayoutPatch, LayoutSummaryView, LayoutViewAnswer } from '../../shared/schemas/plans';

/** Format-2 placement bytes (shared/packing/codec.ts) as the Buffer the database driver binds. */
export function encodePlacements(placements: readonly Placement[], partIds: string[], profiles: LayoutProfiles = {}): Buffer {
  const arrays = toPlacementArrays(placements, partIds);
  if (arrays.ids.length !== partIds.length) throw new Error('a placement names a part that is not in the layout');
  const bytes = encodePlacementBytes(arrays, profiles);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/** Rebuilds the placements of any stored format; sizes from the part sizes of the layout's own instance. */
export function decodePlacements(format: number, bytes: Uint8Array, count: number, partIds: string[], sizeOf: (id: string) => Vec3 | undefined) {
  try {
    const decoded = decodePlacementBytes(format, bytes, count, partIds, sizeOf);
    return { placements: fromPlacementArrays(decoded), areaProfile: decoded.areaProfile, contourProfile: decoded.contourProfile };
  } catch (err) {
    if (err instanceof PlacementBytesError) throw new AppError(500, err.code, err.message);
    throw err;
  }
}

const close = (a: number, b: number) => Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a), Math.abs(b));

/**
 * The instance must be the plan's own build: the machine's chamber and one of
 * its layer heights, at least the material's spacing and margins, and one
 * part per plan line (id = the request line id) with the line's quantity, the
 * part's size and only orientations the line's rule allows.
 */
export function instanceProblems(instance: PackInstance, machine: MachineProfile, material: MaterialProfile, lines: LineRow[]): FieldProblem[] {
  const problems: FieldProblem[] = [];
  const bad = (field: string, message: string) => problems.push({ field: `instance.${field}`, message });
  for (let a = 0; a < 3; a++) {
    if (!close(instance.chamber[a], machine.chamberMm[a])) bad(`chamber[${a}]`, `must be the machine's chamber, ${machine.chamberMm[a]} mm`);
  }
  if (!machine.layerHeightsMm.some((h) => close(h, instance.layerHeight))) {
    bad('layerHeight', `must be one of the machine's layer heights (${machine.layerHeightsMm.join(', ')} mm)`);
  }
  const tol = 1e-6;
  if (instance.spacing < material.spacingMm - tol) bad('spacing', `must be at least the material's spacing, ${material.spacingMm} mm`);
  if (instance.margin.xy < material.marginXyMm - tol) bad('margin.xy', `must be at least the material's wall margin, ${material.marginXyMm} mm`);
  if (instance.margin.bottom < material.marginBottomMm - tol) bad('margin.bottom', `must be at least the material's bottom margin, ${material.marginBottomMm} mm`);
  if (instance.margin.top < material.marginTopMm - tol) bad('margin.top', `must be at least the material's top margin, ${material.marginTopMm} mm`);

  const byLine = new Map(lines.map((l) => [l.request_line_id, l]));
  const seen = new Set<string>();
  instance.parts.forEach((part, i) => {
    const line = byLine.get(part.id);
    if (!line) {
      bad(`parts[${i}].id`, `"${part.id}" is not a line of this plan (part ids are the plan's request line ids)`);
      return;
    }
    seen.add(part.id);
    if (part.quantity !== line.quantity) bad(`parts[${i}].quantity`, `must be ${line.quantity}, the plan's quantity of "${line.part_name}"`);
    const size: Vec3 = [line.size_x_mm, line.size_y_mm, line.size_z_mm];
    for (let a = 0; a < 3; a++) {
      if (!close(part.size[a], size[a])) bad(`parts[${i}].size[${a}]`, `must be ${size[a]} mm, the size of "${line.part_name}"`);
    }
    const rule = effectiveRule(line);
    const allowed = RULE_ORIENTATIONS[rule];
    const extra = part.orientations.filter((o) => !allowed.includes(o));
    if (extra.length > 0) {
      bad(`parts[${i}].orientations`, `allows ${extra.join(', ')}, which the rule "${rule}" of "${line.part_name}" forbids (allowed: ${allowed.join(', ')})`);
    }
  });
  for (const line of lines) {
    if (!seen.has(line.request_line_id)) bad('parts', `has no part for the plan's line "${line.part_name}" (id ${line.request_line_id})`);
  }
  return problems;
}

/** What a mesh worker needs to check a layout packed by shape: the build, and per line its quantity and the rotations its rule allows. */
function shapeCheckOf(instance: PackInstance, result: PackResultV2, lines: LineRow[]): ShapeCheckRequest {
  const byLine = new Map(lines.map((l) => [l.request_line_id, l]));
  return {
    chamber: instance.chamber,
    margin: instance.margin,
    spacing: instance.spacing,
    layerHeight: instance.layerHeight,
    objective: instance.objective,
    // instanceProblems has already matched every part with a line.
    parts: instance.parts.map((p) => ({ id: p.id, quantity: p.quantity, size: p.size, rotations: [...RULE_ROTATIONS[effectiveRule(byLine.get(p.id)!)]] })),
    result,
  };
}

/** The sliced sections from z = 0 to the layout's top, one number a layer (the result's own profile length). */
function storedSections(p: { areaPerLayerMm2: Float64Array; contourPerLayerMm: Float64Array }, height: number, layerHeight: number): LayoutProfiles {
  const n = height > 0 ? Math.min(p.areaPerLayerMm2.length, Math.ceil(height / layerHeight - 1e-9)) : 0;
  return { areaProfile: p.areaPerLayerMm2.subarray(0, n), contourProfile: p.contourPerLayerMm.subarray(0, n) };
}

function refuse(problems: FieldProblem[], root = ''): never {
  const withRoot = problems.map((p) => ({ field: root ? `${root}.${p.field}` : p.field, message: p.message }));
  const first = withRoot[0];
  const more = withRoot.length > 1 ? ` (and ${withRoot.length - 1} more problem${withRoot.length > 2 ? 's' : ''})` : '';
  throw new AppError(400, 'invalid_input', `${first.field} ${first.message}${more}`, first.field, { problems: withRoot.slice(0, 50) });
}

/** An estimate as JSON: the per-layer profile as a plain array. */
function estimateJson(e: LayoutEstimate) {
  return { ...e, areaPerLayerMm2: Array.from(e.areaPerLayerMm2) };
}

/** Estimate factors fitted from the machine's recorded runs, once runs are recorded. */
export type CalibrationLookup = (labId: string, machineId: string) => Promise<CalibrationInput | undefined>;


export type LayoutsDeps = { calibrationFor?: CalibrationLookup; profilesFor?: ProfilesLookup };

/** A plan's layouts: saving a packing (checked and estimated), reading it back, choosing, labelling, deleting. */
export function layoutsService(db: Database, deps: LayoutsDeps = {}) {
  const { sequelize } = db;
  const plans = plansRepository(db);
  const layouts = layoutsRepository(db);
  /** The layout id as given when it can be one; null (no such layout) otherwise. */
  const layoutIdOrNull = (layoutId: string) => (/^[0-9a-f-]{36}$/i.test(layoutId) ? layoutId : null);

  async function layoutRow(labId: string, planId: string, layoutId: string): Promise<LayoutDbRow> {
    if (!/^[0-9a-f-]{36}$/i.test(layoutId)) throw notFound('That layout');
    const row = await layouts.find(labId, checkPlanId(planId), layoutId);
    if (!row) throw notFound('That layout');
    return row;
  }

  return {
    /**
     * Checks the packing against the engine's rules and the plan, estimates it
     * on the plan's machine and material, and stores it with its placements packed as bytes.
     */
    async add(labId: string, planId: string, user: Actor, input: LayoutCreate): Promise<LayoutCreated> {
      const parsed = parseInstance(input.instance);
      if (!parsed.ok) refuse(parsed.problems, 'instance');
      const instance = parsed.instance;
      // Packed by shape, parts may share box space (a clip in a housing): the meshes decide, on a mesh worker below.
      const byShape = input.result.format === RESULT_FORMAT_V2;
      // Both formats place parts the same way for the codec and the estimate (a v2 placement adds its transform).
      const result = input.result as unknown as PackResult;

      // Read and checked before the plan is locked: the check against the meshes waits for a mesh worker (up to the
      // slicing's wait), and a transaction held meanwhile kept a pooled connection and the plan's lock (a dozen saves
      // at once ran the pool dry, and other users' reads failed). What was read is made sure of under the lock below.
      const head = await plans.head(labId, checkPlanId(planId));
      if (!head) throw notFound('That plan');
      if (!isEditable(head.status)) throw readOnly(head.status);
      const machine = await profileRow(db, 'machines', labId, head.machineId);
      const material = await profileRow(db, 'materials', labId, head.materialId);
      if (!machine || !material) throw notFound("That plan's machine or material");
      const lines = await planLines(db, head.id);

      const mismatch = instanceProblems(instance, machine as unknown as MachineProfile, material as unknown as MaterialProfile, lines);
      if (mismatch.length > 0) refuse(mismatch);
      // Counts and the height first, in one pass: copies too many, or a top beyond the chamber, are refused before
      // any pair of placements is looked at or any layer counted from the height given.
      const excess = excessProblems(instance.parts, result.placements);
      if (excess.length > 0) refuse(excess, 'result');
      if (!(typeof result.height === 'number' && result.height >= 0 && result.height <= instance.chamber[2] + TOLERANCE_MM)) {
        refuse([{ field: 'height', message: `must be the top of the highest placed part, from 0 to the chamber's ${instance.chamber[2]} mm, not ${result.height}` }], 'result');
      }
      if (!byShape) {
        const invalid = validateLayout(instance, result);
        if (invalid.length > 0) refuse(invalid, 'result');
      } else {
        // What needs no mesh is refused here, before any worker is asked.
        // So is a transform that is not one of the 24 quarter turns (the meshes' check's own rule): the slicing of
        // the layout could not take it.
        result.placements.forEach((p, i) => {
          const t = (p as { transform?: unknown }).transform;
          const turn = t === undefined ? null : transformTurn(t);
          if (turn && 'problem' in turn) refuse([{ field: `placements[${i}].transform`, message: turn.problem }], 'result');
        });
      }

      const calibration = deps.calibrationFor ? await deps.calibrationFor(labId, head.machineId) : undefined;
      const volumeOf = new Map(lines.map((l) => [l.request_line_id, l.volume_mm3]));
      let partsVolumeMm3 = 0;
      for (const p of result.placements) partsVolumeMm3 += volumeOf.get(p.id) ?? 0;
      // Sections of the real meshes, sliced in the mesh workers; the boxes when they cannot be had.
      const layers = layerCount(result.height, instance.margin.top, instance.layerHeight);
      const check = byShape ? shapeCheckOf(instance, result as unknown as PackResultV2, lines) : undefined;
      const profiles = deps.profilesFor ? await deps.profilesFor(head.id, instance, result, layers, undefined, user.id, check) : null;
      if (byShape) {
        if (result.placements.length === 0) {
          // Nothing placed: no mesh to check it against, the same rules as any layout (no top, its margin's layers).
          const invalid = validateLayout(instance, { ...result, format: RESULT_FORMAT } as PackResult);
          if (invalid.length > 0) refuse(invalid, 'result');
        } else if (!profiles?.problems) {
          throw new AppError(
            503,
            'shape_check_unavailable',
            "This layout packed by shape could not be checked against the parts' meshes just now (no mesh worker finished in time); nothing was kept. Try keeping it again in a moment.",
          );
        } else if (profiles.problems.length > 0) refuse(profiles.problems, 'result');
      }
      let estimate: LayoutEstimate;
      try {
        const { id: _m, ...machineProfile } = machine;
        const { id: _t, ...materialProfile } = material;
        estimate = estimateLayout({
          layout: { placements: result.placements, heightMm: result.height, margin: instance.margin },
          machine: machineProfile as MachineProfile,
          material: materialProfile as MaterialProfile,
          layerHeightMm: instance.layerHeight,
          calibration,
          partsVolumeMm3,
          // Each part's own volume, for the cost per part (by volume and height, docs/estimate.md).
          volumeById: new Map([...volumeOf].filter((e): e is [string, number] => typeof e[1] === 'number')),
          partCount: result.placements.length,
          ...(profiles && profiles.meshPlacements > 0 ? { areaPerLayerMm2: profiles.areaPerLayerMm2 } : {}),
        });
      } catch (err) {
        if (err instanceof InvalidInputError) refuse(err.problems);
        throw err;
      }

      return sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!isEditable(plan.status)) throw readOnly(plan.status);
        // Checked against the plan as it was read: its machine, material and lines must still be those.
        const current = await planLines(db, plan.id, transaction);
        if (plan.machine_id !== head.machineId || plan.material_id !== head.materialId || linesKey(current) !== linesKey(lines)) {
          throw conflict('plan_changed', 'The plan changed while this layout was being checked (its machine, material or lines); nothing was kept. Pack it again for the plan as it is now.');
        }
        const partIds = instance.parts.map((p) => p.id);
        const settings = {
          seed: instance.seed,
          spacingMm: instance.spacing,
          layerHeightMm: instance.layerHeight,
          timeLimitMs: instance.timeLimitMs,
          objective: instance.objective,
          margin: instance.margin,
        };
        const summary = { unplaced: result.unplaced, height: result.height, layers: result.layers, utilization: result.utilization, elapsedMs: result.elapsedMs };
        const count = await layouts.count(plan.id, transaction);
        const label = input.label ?? `Layout ${count + 1}`;
        const json = { ...estimateJson(estimate), ...profileInfo(profiles) };
        const id = await layouts.create(
          {
            planId: plan.id,
            label,
            settings,
            instance,
            linesKey: linesKey(lines),
            resultFormat: result.format,
            placementsFormat: PLACEMENTS_FORMAT,
            placementCount: result.placements.length,
            partIds,
            // A layout packed by shape keeps the sections its check sliced, not the ones it came with.
            placements: encodePlacements(result.placements, partIds, byShape && profiles ? storedSections(profiles, result.height, instance.layerHeight) : result),
            summary,
            estimate: json,
            locked: input.locked ?? false,
            createdBy: user.id,
          },
          transaction,
        );
        await reopenIfSentBack(db, plan, user.id, transaction);
        await plans.touch(plan.id, transaction);
        return { id, label, estimate: json };
      });
    },

    /** The whole layout, placements as the packing contract's objects; read as stored, whatever engine wrote it. */
    async get(labId: string, planId: string, layoutId: string): Promise<LayoutViewAnswer> {
      const row = await layoutRow(labId, planId, layoutId);
      const instance = row.instance as PackInstance;
      const sizes = new Map<string, Vec3>((instance.parts ?? []).map((p) => [p.id, p.size]));
      const { placements, areaProfile, contourProfile } = decodePlacements(row.placements_format, row.placements, row.placement_count, row.part_ids, (id) =>
        sizes.get(id),
      );
      const lines = await planLines(db, row.plan_id);
      const summary: LayoutSummaryView = layoutSummary({ ...row, estimate_summary: {} }, row, linesKey(lines));
      return {
        ...summary,
        planId: row.plan_id,
        instance,
        result: {
          format: row.result_format,
          placements,
          unplaced: row.summary.unplaced ?? [],
          height: row.summary.height,
          layers: row.summary.layers,
          utilization: row.summary.utilization,
          elapsedMs: row.summary.elapsedMs,
          ...(areaProfile ? { areaProfile: Array.from(areaProfile) } : {}),
          ...(contourProfile ? { contourProfile: Array.from(contourProfile) } : {}),
        },
        estimate: row.estimate,
      };
    },

    /** Marks the layout as the one to review; one packed for other lines is refused. */
    async choose(labId: string, planId: string, layoutId: string, user: Actor): Promise<LayoutChosen> {
      return sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!isEditable(plan.status)) throw readOnly(plan.status);
        const layout = await layouts.head(plan.id, layoutIdOrNull(layoutId), transaction);
        if (!layout) throw notFound('That layout');
        if (layout.lines_key !== linesKey(await planLines(db, plan.id, transaction))) {
          throw conflict('layout_stale', "This layout was packed before the plan's lines changed; pack again to get one that fits them.");
        }
        await reopenIfSentBack(db, plan, user.id, transaction);
        const version = await plans.choose(plan.id, layout.id, transaction);
        return { id: plan.id, chosenLayoutId: layout.id, version, status: plan.status };
      });
    },

    async update(labId: string, planId: string, layoutId: string, input: LayoutPatch) {
      await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!isEditable(plan.status)) throw readOnly(plan.status);
        const found = await layouts.relabel(plan.id, layoutIdOrNull(layoutId), { label: input.label ?? null, locked: input.locked ?? null }, transaction);
        if (!found) throw notFound('That layout');
      });
      return this.get(labId, planId, layoutId);
    },

    /** A locked layout stays until unlocked; deleting the chosen one leaves the plan without a choice. */
    async remove(labId: string, planId: string, layoutId: string, user: Actor) {
      await sequelize.transaction(async (transaction) => {
        const plan = await lockPlan(db, labId, planId, transaction);
        if (!isEditable(plan.status)) throw readOnly(plan.status);
        const layout = await layouts.head(plan.id, layoutIdOrNull(layoutId), transaction);
        if (!layout) throw notFound('That layout');
        if (layout.locked) throw conflict('locked', 'This layout is locked; unlock it before deleting it.');
        await layouts.remove(layout.id, transaction);
        if (plan.chosen_layout_id === layout.id) await plans.bumpVersion(plan.id, transaction);
        await reopenIfSentBack(db, plan, user.id, transaction);
      });
    },
  };
}
export type LayoutsService = ReturnType<typeof layoutsService>;

