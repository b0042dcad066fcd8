import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../index';
import type { PowderCheckRow, PowderMaterialRow } from '../models/powder';
import { DEFAULT_POLICY, clean, type MovementKind, type PowderPolicy, type ReusedPool } from '../../../shared/powder';

/** Plain records the powder service works with (never ORM instances). */
export type Policy = PowderPolicy;
export type Lot = {
  id: string;
  materialId: string;
  code: string;
  makerLot: string;
  receivedOn: string;
  expiresOn: string | null;
  note: string;
  receivedKg: number;
  onHandKg: number;
};
export type Movement = {
  id: string;
  kind: MovementKind;
  deltaKg: number;
  lotId: string | null;
  lotCode: string | null;
  planId: string | null;
  planName: string | null;
  runId: string | null;
  countedKg: number | null;
  cakeDiscardedKg: number | null;
  reason: string;
  poolAgeAfter: number | null;
  fillAgeBuilds: number | null;
  at: Date;
  byId: string | null;
  byName: string | null;
};
export type Check = {
  id: string;
  mvrCm3Per10Min: number;
  testTempC: number | null;
  testLoadKg: number | null;
  thresholdCm3Per10Min: number | null;
  passed: boolean;
  note: string;
  measuredAt: Date;
  measuredBy: { id: string; name: string } | null;
  releasedAt: Date | null;
  releasedBy: { id: string; name: string } | null;
  releaseReason: string | null;
};
export type NewMovement = {
  labId: string;
  materialId: string;
  lotId: string | null;
  kind: MovementKind;
  deltaKg: number;
  runId?: string | null;
  planId?: string | null;
  countedKg?: number | null;
  cakeDiscardedKg?: number | null;
  reason?: string;
  poolAgeAfter?: number | null;
  fillAgeBuilds?: number | null;
  at: Date;
  byUser: string | null;
};

const policyOf = (row: PowderMaterialRow | null): Policy =>
  row
    ? {
        maxMeanAgeBuilds: row.maxMeanAgeBuilds,
        minRefreshRatio: row.minRefreshRatio,
        minMvrCm3Per10Min: row.minMvrCm3Per10Min,
        reorderLevelKg: row.reorderLevelKg,
        leadTimeDays: row.leadTimeDays,
      }
    : { ...DEFAULT_POLICY };

const person = (id: string | null, name: string | null | undefined) => (id ? { id, name: name ?? '' } : null);

/** The powder tables behind plain functions; raw SQL only for sums and joins a model query cannot say. */
export function powderRepository(db: Database) {
  const { sequelize } = db;
  const { PowderMaterial, PowderLot, PowderMovement, PowderCheck, PowderShortage } = db.models;
  const select = <T extends object>(sql: string, bind: unknown[], transaction?: Transaction) =>
    sequelize.query<T>(sql, { bind, type: QueryTypes.SELECT, transaction });

  return {
    /** The lab's materials by name (a material of another lab is simply not there). */
    async materials(labId: string): Promise<Array<{ id: string; name: string }>> {
      return select<{ id: string; name: string }>('SELECT id, name FROM materials WHERE lab_id = $1 ORDER BY name', [labId]);
    },

    async material(labId: string, materialId: string, transaction?: Transaction): Promise<{ id: string; name: string } | null> {
      const [row] = await select<{ id: string; name: string }>('SELECT id, name FROM materials WHERE id = $1 AND lab_id = $2', [materialId, labId], transaction);
      return row ?? null;
    },

    /**
     * Locks the material's powder row for the rest of the transaction (made
     * with the default rules on first use): movements of one material queue
     * up here, so a sum read after the lock stays true until commit.
     */
    async lockMaterial(labId: string, materialId: string, transaction: Transaction): Promise<Policy> {
      await sequelize.query(
        `INSERT INTO powder_materials (material_id, lab_id, max_mean_age_builds, min_refresh_ratio, min_mvr_cm3_per_10min, reorder_level_kg, lead_time_days, created_at, updated_at)
         VALUES ($1, $2, $3, $4, $5, $6, $7, now(), now()) ON CONFLICT (material_id) DO NOTHING`,
        {
          bind: [materialId, labId, DEFAULT_POLICY.maxMeanAgeBuilds, DEFAULT_POLICY.minRefreshRatio, DEFAULT_POLICY.minMvrCm3Per10Min, DEFAULT_POLICY.reorderLevelKg, DEFAULT_POLICY.leadTimeDays],
          transaction,
        },
      );
      const row = await PowderMaterial.findOne({ where: { materialId, labId }, lock: transaction.LOCK.UPDATE, transaction });
      return policyOf(row);
    },

    async policies(materialIds: string[]): Promise<Map<string, Policy>> {
      const rows = await PowderMaterial.findAll({ where: { materialId: { [Op.in]: materialIds } } });
      return new Map(materialIds.map((id) => [id, policyOf(rows.find((r) => r.materialId === id) ?? null)]));
    },

    async setPolicy(labId: string, materialId: string, policy: Policy, userId: string, transaction: Transaction): Promise<void> {
      await PowderMaterial.update({ ...policy, updatedBy: userId }, { where: { materialId, labId }, transaction });
    },

    /** Fresh and reused stock, the pool's age, whether any movement exists: per material of the lab. */
    async totals(labId: string, transaction?: Transaction): Promise<Map<string, { freshKg: number; reusedKg: number; lotCount: number; tracked: boolean }>> {
      const rows = await select<{ material_id: string; fresh: number | null; reused: number | null; lots: string; n: string }>(
        `SELECT m.material_id,
                sum(m.delta_kg) FILTER (WHERE m.lot_id IS NOT NULL) AS fresh,
                sum(m.delta_kg) FILTER (WHERE m.lot_id IS NULL) AS reused,
                count(DISTINCT m.lot_id) AS lots, count(*) AS n
           FROM powder_movements m WHERE m.lab_id = $1 GROUP BY m.material_id`,
        [labId],
        transaction,
      );
      return new Map(rows.map((r) => [r.material_id, { freshKg: clean(r.fresh ?? 0), reusedKg: clean(r.reused ?? 0), lotCount: Number(r.lots), tracked: Number(r.n) > 0 }]));
    },

    /** The reused pool: its mass (sum of its movements) and mean age (the last movement that recorded one). */
    async pool(materialId: string, transaction?: Transaction): Promise<ReusedPool & { tracked: boolean }> {
      const [row] = await select<{ mass: number | null; n: string; age: number | null }>(
        `SELECT (SELECT sum(delta_kg) FROM powder_movements WHERE material_id = $1 AND lot_id IS NULL) AS mass,
                (SELECT count(*) FROM powder_movements WHERE material_id = $1) AS n,
                (SELECT pool_age_after FROM powder_movements WHERE material_id = $1 AND pool_age_after IS NOT NULL ORDER BY seq DESC LIMIT 1) AS age`,
        [materialId],
        transaction,
      );
      const massKg = clean(row?.mass ?? 0);
      return { massKg, meanAgeBuilds: massKg > 0 ? (row?.age ?? 0) : 0, tracked: Number(row?.n ?? 0) > 0 };
    },

    /** The material's fresh lots with what was received and what is left. */
    async lots(materialId: string, transaction?: Transaction): Promise<Lot[]> {
      const rows = await select<{
        id: string; material_id: string; code: string; maker_lot: string; received_on: string; expires_on: string | null; note: string; received: number | null; on_hand: number | null;
      }>(
        `SELECT l.id, l.material_id, l.code, l.maker_lot, to_char(l.received_on, 'YYYY-MM-DD') AS received_on,
                to_char(l.expires_on, 'YYYY-MM-DD') AS expires_on, l.note,
                sum(m.delta_kg) FILTER (WHERE m.kind = 'received') AS received, sum(m.delta_kg) AS on_hand
           FROM powder_lots l LEFT JOIN powder_movements m ON m.lot_id = l.id
          WHERE l.material_id = $1 GROUP BY l.id ORDER BY l.received_on, l.code`,
        [materialId],
        transaction,
      );
      return rows.map((r) => ({
        id: r.id,
        materialId: r.material_id,
        code: r.code,
        makerLot: r.maker_lot,
        receivedOn: r.received_on,
        expiresOn: r.expires_on,
        note: r.note,
        receivedKg: clean(r.received ?? 0),
        onHandKg: clean(r.on_hand ?? 0),
      }));
    },

    async lot(labId: string, lotId: string, transaction?: Transaction): Promise<Lot | null> {
      const row = await PowderLot.findOne({ where: { id: lotId, labId }, transaction });
      if (!row) return null;
      return (await this.lots(row.materialId, transaction)).find((l) => l.id === lotId) ?? null;
    },

    async lotCodeTaken(materialId: string, code: string, transaction: Transaction): Promise<boolean> {
      return (await PowderLot.count({ where: { materialId, code }, transaction })) > 0;
    },

    async createLot(
      input: { labId: string; materialId: string; code: string; makerLot: string; receivedOn: string; expiresOn: string | null; note: string; createdBy: string },
      transaction: Transaction,
    ): Promise<string> {
      const row = await PowderLot.create(input, { transaction });
      return row.id;
    },

    async addMovement(m: NewMovement, transaction: Transaction): Promise<string> {
      const row = await PowderMovement.create(
        {
          labId: m.labId,
          materialId: m.materialId,
          lotId: m.lotId,
          kind: m.kind,
          deltaKg: m.deltaKg,
          runId: m.runId ?? null,
          planId: m.planId ?? null,
          countedKg: m.countedKg ?? null,
          cakeDiscardedKg: m.cakeDiscardedKg ?? null,
          reason: m.reason ?? '',
          poolAgeAfter: m.poolAgeAfter ?? null,
          fillAgeBuilds: m.fillAgeBuilds ?? null,
          at: m.at,
          byUser: m.byUser,
        },
        { transaction },
      );
      return row.id;
    },

    async movements(where: { materialId?: string; lotId?: string; runId?: string }, limit = 500, transaction?: Transaction): Promise<Movement[]> {
      const conds: string[] = [];
      const bind: unknown[] = [];
      if (where.materialId) conds.push(`m.material_id = $${bind.push(where.materialId)}`);
      if (where.lotId) conds.push(`m.lot_id = $${bind.push(where.lotId)}`);
      if (where.runId) conds.push(`m.run_id = $${bind.push(where.runId)}`);
      const rows = await select<{
        id: string; kind: MovementKind; delta_kg: number; lot_id: string | null; lot_code: string | null; plan_id: string | null; plan_name: string | null; run_id: string | null;
        counted_kg: number | null; cake_discarded_kg: number | null; reason: string; pool_age_after: number | null; fill_age_builds: number | null; at: Date; by_user: string | null; by_name: string | null;
      }>(
        `SELECT m.id, m.kind, m.delta_kg, m.lot_id, l.code AS lot_code, m.plan_id, p.name AS plan_name, m.run_id, m.counted_kg, m.cake_discarded_kg,
                m.reason, m.pool_age_after, m.fill_age_builds, m.at, m.by_user, u.name AS by_name
           FROM powder_movements m LEFT JOIN powder_lots l ON l.id = m.lot_id LEFT JOIN plans p ON p.id = m.plan_id LEFT JOIN users u ON u.id = m.by_user
          WHERE ${conds.join(' AND ') || 'true'} ORDER BY m.at DESC, m.seq DESC LIMIT ${Math.max(1, Math.floor(limit))}`,
        bind,
        transaction,
      );
      return rows.map((r) => ({
        id: r.id,
        kind: r.kind,
        deltaKg: r.delta_kg,
        lotId: r.lot_id,
        lotCode: r.lot_code,
        planId: r.plan_id,
        planName: r.plan_name,
        runId: r.run_id,
        countedKg: r.counted_kg,
        cakeDiscardedKg: r.cake_discarded_kg,
        reason: r.reason,
        poolAgeAfter: r.pool_age_after,
        fillAgeBuilds: r.fill_age_builds,
        at: new Date(r.at),
        byId: r.by_user,
        byName: r.by_name,
      }));
    },

    /** Every movement of a material, oldest first, for the stock-over-time chart. */
    async ledger(materialId: string): Promise<Array<{ kind: MovementKind; deltaKg: number; lotId: string | null; atMs: number }>> {
      const rows = await PowderMovement.findAll({ where: { materialId }, attributes: ['kind', 'deltaKg', 'lotId', 'at'], order: [['at', 'ASC'], ['seq', 'ASC']] });
      return rows.map((r) => ({ kind: r.kind, deltaKg: r.deltaKg, lotId: r.lotId, atMs: r.at.getTime() }));
    },

    async checks(materialId: string, limit = 50, transaction?: Transaction): Promise<Check[]> {
      const rows = await select<{
        id: string; mvr_cm3_per_10min: number; test_temp_c: number | null; test_load_kg: number | null; threshold_cm3_per_10min: number | null; passed: boolean; note: string;
        measured_at: Date; measured_by: string | null; measured_name: string | null; released_at: Date | null; released_by: string | null; released_name: string | null; release_reason: string | null;
      }>(
        `SELECT c.*, mu.name AS measured_name, ru.name AS released_name
           FROM powder_checks c LEFT JOIN users mu ON mu.id = c.measured_by LEFT JOIN users ru ON ru.id = c.released_by
          WHERE c.material_id = $1 ORDER BY c.measured_at DESC, c.created_at DESC LIMIT ${Math.max(1, Math.floor(limit))}`,
        [materialId],
        transaction,
      );
      return rows.map((r) => ({
        id: r.id,
        mvrCm3Per10Min: r.mvr_cm3_per_10min,
        testTempC: r.test_temp_c,
        testLoadKg: r.test_load_kg,
        thresholdCm3Per10Min: r.threshold_cm3_per_10min,
        passed: r.passed,
        note: r.note,
        measuredAt: new Date(r.measured_at),
        measuredBy: person(r.measured_by, r.measured_name),
        releasedAt: r.released_at ? new Date(r.released_at) : null,
        releasedBy: person(r.released_by, r.released_name),
        releaseReason: r.release_reason,
      }));
    },

    async addCheck(
      c: Pick<PowderCheckRow, 'labId' | 'materialId' | 'mvrCm3Per10Min' | 'testTempC' | 'testLoadKg' | 'thresholdCm3Per10Min' | 'passed' | 'note' | 'measuredAt' | 'measuredBy'>,
      transaction: Transaction,
    ): Promise<string> {
      const row = await PowderCheck.create({ ...c, releasedAt: null, releasedBy: null, releaseReason: null }, { transaction });
      return row.id;
    },

    async checkRow(labId: string, checkId: string, transaction: Transaction): Promise<{ id: string; materialId: string; passed: boolean; released: boolean } | null> {
      const row = await PowderCheck.findOne({ where: { id: checkId, labId }, transaction });
      return row ? { id: row.id, materialId: row.materialId, passed: row.passed, released: row.releasedAt !== null } : null;
    },

    async release(checkId: string, userId: string, reason: string, transaction: Transaction): Promise<void> {
      await PowderCheck.update({ releasedAt: new Date(), releasedBy: userId, releaseReason: reason }, { where: { id: checkId }, transaction });
    },

    /** The run of a plan with its material and what it loaded. */
    async runOfPlan(labId: string, planId: string, transaction?: Transaction) {
      const [row] = await select<{
        run_id: string | null; plan_id: string; plan_name: string; status: string; material_id: string; machine_id: string; chosen_layout_id: string | null; started_at: Date | null;
        fresh_loaded: number | null; reused_loaded: number | null;
      }>(
        `SELECT r.id AS run_id, p.id AS plan_id, p.name AS plan_name, p.status, p.material_id, p.machine_id, p.chosen_layout_id, r.started_at,
                r.fresh_powder_loaded_kg AS fresh_loaded, r.reused_powder_loaded_kg AS reused_loaded
           FROM plans p LEFT JOIN runs r ON r.plan_id = p.id WHERE p.id = $1 AND p.lab_id = $2`,
        [planId, labId],
        transaction,
      );
      return row ?? null;
    },

    /** The stored estimate of a layout, as the layout service wrote it. */
    async layoutEstimate(layoutId: string, transaction?: Transaction): Promise<Record<string, unknown> | null> {
      const [row] = await select<{ estimate: Record<string, unknown> | null }>(`SELECT estimate - 'areaPerLayerMm2' AS estimate FROM layouts WHERE id = $1`, [layoutId], transaction);
      return row?.estimate ?? null;
    },

    /** Builds a lot went into, with the requests their parts were for. */
    async buildsOfLot(lotId: string) {
      return select<{ plan_id: string; plan_name: string; status: string; run_id: string; started_at: Date; kg: number; requests: Array<{ id: string; title: string }> | null }>(
        `SELECT p.id AS plan_id, p.name AS plan_name, p.status, r.id AS run_id, r.started_at, -sum(m.delta_kg) AS kg,
                (SELECT json_agg(DISTINCT jsonb_build_object('id', q.id, 'title', q.title))
                   FROM plan_lines pl JOIN request_lines rl ON rl.id = pl.request_line_id JOIN requests q ON q.id = rl.request_id
                  WHERE pl.plan_id = p.id) AS requests
           FROM powder_movements m JOIN runs r ON r.id = m.run_id JOIN plans p ON p.id = r.plan_id
          WHERE m.lot_id = $1 AND m.kind = 'loaded' GROUP BY p.id, r.id ORDER BY r.started_at DESC`,
        [lotId],
      );
    },

    /**
     * Lots whose powder may be in a build's reused share: every fresh lot
     * loaded into a build of the same material whose powder was sieved back
     * before this build was loaded (the pool is mixed, so this is the honest
     * "may contain" list of a recall).
     */
    async lotsBehindPool(materialId: string, runId: string) {
      return select<{ id: string; code: string }>(
        `SELECT DISTINCT l.id, l.code FROM powder_movements load
           JOIN powder_movements rec ON rec.run_id = load.run_id AND rec.kind = 'recovered' AND rec.delta_kg > 0
           JOIN powder_lots l ON l.id = load.lot_id
          WHERE load.material_id = $1 AND load.kind = 'loaded' AND load.lot_id IS NOT NULL
            AND rec.seq < (SELECT min(seq) FROM powder_movements WHERE run_id = $2 AND kind = 'loaded')
          ORDER BY l.code`,
        [materialId, runId],
      );
    },

    /** Runs that printed a request's parts. */
    async runsOfRequest(labId: string, requestId: string) {
      return select<{ plan_id: string; plan_name: string; status: string; run_id: string; started_at: Date; material_id: string }>(
        `SELECT DISTINCT p.id AS plan_id, p.name AS plan_name, p.status, r.id AS run_id, r.started_at, p.material_id
           FROM requests q JOIN request_lines rl ON rl.request_id = q.id JOIN plan_lines pl ON pl.request_line_id = rl.id
           JOIN plans p ON p.id = pl.plan_id JOIN runs r ON r.plan_id = p.id
          WHERE q.id = $1 AND q.lab_id = $2 ORDER BY r.started_at`,
        [requestId, labId],
      );
    },

    async request(labId: string, requestId: string) {
      const [row] = await select<{ id: string; title: string }>('SELECT id, title FROM requests WHERE id = $1 AND lab_id = $2', [requestId, labId]);
      return row ?? null;
    },

    /** Queued and started-not-loaded plans with their chosen estimate, for the forecast. */
    async queuedPlans(labId: string) {
      return select<{ id: string; name: string; machine_id: string; material_id: string; estimate: Record<string, unknown> | null }>(
        `SELECT p.id, p.name, p.machine_id, p.material_id, l.estimate - 'areaPerLayerMm2' AS estimate
           FROM plans p LEFT JOIN layouts l ON l.id = p.chosen_layout_id WHERE p.lab_id = $1 AND p.status = 'queued'`,
        [labId],
      );
    },

    async machineIds(labId: string): Promise<string[]> {
      return (await select<{ id: string }>('SELECT id FROM machines WHERE lab_id = $1', [labId])).map((r) => r.id);
    },

    /** Opens a shortage unless one is open; true when this call opened it (so the e-mail goes once). */
    async openShortage(labId: string, materialId: string, belowAt: Date, neededKg: number): Promise<string | null> {
      const rows = await select<{ id: string }>(
        `INSERT INTO powder_shortages (id, lab_id, material_id, below_at, needed_kg, opened_at) VALUES (gen_random_uuid(), $1, $2, $3, $4, now())
         ON CONFLICT (material_id) WHERE closed_at IS NULL DO NOTHING RETURNING id`,
        [labId, materialId, belowAt, neededKg],
      );
      return rows[0]?.id ?? null;
    },

    async markMailed(id: string): Promise<void> {
      await PowderShortage.update({ mailedAt: new Date() }, { where: { id } });
    },

    async closeShortage(materialId: string): Promise<void> {
      await PowderShortage.update({ closedAt: new Date() }, { where: { materialId, closedAt: null } });
    },

    /** Labs with at least one powder movement (a material is tracked from its first). */
    async trackedLabs(): Promise<string[]> {
      const rows = await select<{ lab_id: string }>('SELECT DISTINCT lab_id FROM powder_movements', []);
      return rows.map((r) => r.lab_id);
    },

    async openShortages(labId: string) {
      const rows = await PowderShortage.findAll({ where: { labId, closedAt: null } });
      return rows.map((r) => ({ id: r.id, materialId: r.materialId, belowAt: r.belowAt, mailedAt: r.mailedAt }));
    },
  };
}
export type PowderRepository = ReturnType<typeof powderRepository>;
