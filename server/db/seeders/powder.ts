import type { Database } from '../index';
import { powderRepository } from '../repositories/powder';
import { fillMeanAge, proposeDraws, recoverIntoPool, takeFromPool, type ReusedPool } from '../../../shared/powder';

const DAY_MS = 86_400_000;

/**
 * An invented powder history for the demo lab's first two powders: three
 * deliveries over two months, a dozen earlier builds that drew fresh lots
 * oldest first and sieved most of their cake back (so the reused powder has a
 * plausible mean age), a discard, a count and melt-flow checks that passed.
 * The builds predate the lab's runs in Sinterstack, so they name no run.
 */
export async function seedPowderHistory(db: Database, labId: string, userIds: { lead: string; operator: string }, nowMs = Date.now()): Promise<void> {
  const repo = powderRepository(db);
  const materials = (await repo.materials(labId)).slice(0, 2);
  for (const [index, material] of materials.entries()) {
    await db.sequelize.transaction(async (t) => {
      await repo.lockMaterial(labId, material.id, t);
      await repo.setPolicy(
        labId,
        material.id,
        { maxMeanAgeBuilds: 3, minRefreshRatio: 0.3, minMvrCm3Per10Min: 18, reorderLevelKg: 25, leadTimeDays: 10 },
        userIds.lead,
        t,
      );
      const day = (d: number) => new Date(nowMs - d * DAY_MS);
      const isoDay = (d: number) => day(d).toISOString().slice(0, 10);
      const prefix = index === 0 ? 'PA12' : 'PA11';
      const deliveries = [
        { code: `${prefix}-2609`, kg: 50, ago: 62, maker: 'MX-44718' },
        { code: `${prefix}-2610`, kg: 50, ago: 38, maker: 'MX-45102' },
        { code: `${prefix}-2611`, kg: 25, ago: 9, maker: 'MX-45590' },
      ];
      const lotIds = new Map<string, string>();
      for (const d of deliveries) {
        const id = await repo.createLot(
          { labId, materialId: material.id, code: d.code, makerLot: d.maker, receivedOn: isoDay(d.ago), expiresOn: isoDay(d.ago - 365), note: '', createdBy: userIds.lead },
          t,
        );
        lotIds.set(d.code, id);
        await repo.addMovement({ labId, materialId: material.id, lotId: id, kind: 'received', deltaKg: d.kg, at: day(d.ago), byUser: userIds.lead }, t);
      }
      // Twelve builds of the first powder, one every four to five days, nine larger ones of the second, one every six
      // days: about a third fresh.
      let pool: ReusedPool = { massKg: 0, meanAgeBuilds: 0 };
      const builds = index === 0 ? 12 : 9;
      for (let b = 0; b < builds; b++) {
        const ago = 58 - b * (index === 0 ? 4.5 : 6);
        const cake = 16 + ((b * 7 + 3 * index) % 5) + 2 * index;
        const reused = b === 0 ? 0 : Math.min(pool.massKg, Math.round(cake * 0.65 * 10) / 10);
        const fresh = Math.round((cake - reused) * 10) / 10;
        const lots = (await repo.lots(material.id, t)).filter((l) => l.receivedOn <= isoDay(ago));
        const p = proposeDraws(lots, fresh, isoDay(ago));
        if (p.shortfallKg > 0) continue;
        const fillAge = fillMeanAge(fresh, reused, pool.meanAgeBuilds);
        const base = { labId, materialId: material.id, kind: 'loaded' as const, at: day(ago), byUser: userIds.operator, fillAgeBuilds: fillAge, reason: `earlier build ${b + 1}` };
        for (const draw of p.draws) await repo.addMovement({ ...base, lotId: draw.lotId, deltaKg: -draw.kg }, t);
        if (reused > 0) {
          pool = takeFromPool(pool, reused);
          await repo.addMovement({ ...base, lotId: null, deltaKg: -reused, poolAgeAfter: pool.meanAgeBuilds }, t);
        }
        const recovered = Math.round(cake * 0.72 * 10) / 10;
        pool = recoverIntoPool(pool, recovered, fillAge);
        await repo.addMovement(
          { labId, materialId: material.id, lotId: null, kind: 'recovered', deltaKg: recovered, cakeDiscardedKg: 0.6, at: day(ago - 2), byUser: userIds.operator, poolAgeAfter: pool.meanAgeBuilds, reason: `earlier build ${b + 1}` },
          t,
        );
      }
      const discard = Math.min(2, pool.massKg);
      pool = takeFromPool(pool, discard);
      await repo.addMovement({ labId, materialId: material.id, lotId: null, kind: 'discarded', deltaKg: -discard, at: day(20), byUser: userIds.operator, poolAgeAfter: pool.meanAgeBuilds, reason: 'yellowed powder from the chamber walls' }, t);
      const checks: ReadonlyArray<readonly [number, number]> = index === 0 ? [[40, 24.5], [12, 21.8]] : [[44, 25.9], [15, 23.2]];
      for (const [ago, mvr] of checks) {
        await repo.addCheck(
          { labId, materialId: material.id, mvrCm3Per10Min: mvr, testTempC: 235, testLoadKg: 5, thresholdCm3Per10Min: 18, passed: true, note: '', measuredAt: day(ago), measuredBy: userIds.lead },
          t,
        );
      }
    });
  }
}
