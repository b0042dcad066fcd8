import { buildWarnings, reuseBlocked, type BuildWarning, type MeltFlowState, type PowderPolicy } from './policy';
import { proposeDraws, type Draw, type LotOnHand } from './propose';
import { KG_EPS, clean } from './stock';

/** What the floor card knows of a material's stock before a start. */
export interface LoadStock {
  /** False until the lab records the material's first movement: then the start is not checked against the shelf. */
  tracked: boolean;
  materialName: string;
  lots: readonly LotOnHand[];
  reusedKg: number;
  reusedMeanAgeBuilds: number;
  policy: PowderPolicy;
  lastCheck: MeltFlowState | null;
}

export interface LoadCheck {
  /** The fresh powder by lot that the start records: the operator's picks, or oldest first. */
  draws: Draw[];
  /** What the server would refuse the start for (409), in the words it uses. */
  problems: string[];
  freshShortKg: number;
  reusedShortKg: number;
  /** The material's rules the fill breaks: the lab decides, the start is not refused. */
  warnings: BuildWarning[];
}

const kg = (v: number) => `${clean(v).toFixed(1)} kg`;

/**
 * Checks a load before the start, as the server will: the fresh powder from
 * the lots (the operator's picks, or oldest first), the reused powder from
 * the pool, and a failed melt-flow check that blocks reuse.
 */
export function checkLoad(stock: LoadStock, freshKg: number, reusedKg: number, picked: ReadonlyArray<{ lotId: string; kg: number }> | null, today: string): LoadCheck {
  const none: LoadCheck = { draws: [], problems: [], freshShortKg: 0, reusedShortKg: 0, warnings: [] };
  if (!stock.tracked || !Number.isFinite(freshKg) || !Number.isFinite(reusedKg)) return none;
  const name = stock.materialName;
  const problems: string[] = [];
  let draws: Draw[];
  let freshShortKg = 0;
  if (picked) {
    const byId = new Map(stock.lots.map((l) => [l.id, l]));
    draws = [];
    for (const p of picked) {
      const lot = byId.get(p.lotId);
      if (!lot || !(p.kg > 0)) continue;
      if (p.kg > lot.onHandKg + KG_EPS) problems.push(`Lot ${lot.code} of ${name} holds ${kg(lot.onHandKg)}, not ${kg(p.kg)}: ${kg(p.kg - lot.onHandKg)} short.`);
      draws.push({ lotId: lot.id, code: lot.code, kg: p.kg });
    }
    const sum = draws.reduce((a, d) => a + d.kg, 0);
    if (Math.abs(sum - freshKg) > 0.001) problems.push(`The lots add up to ${kg(sum)}, but ${kg(freshKg)} of fresh powder is loaded: they must match.`);
  } else {
    const p = proposeDraws(stock.lots, freshKg, today);
    draws = p.draws;
    freshShortKg = p.shortfallKg;
    if (freshShortKg > 0) {
      const onHand = draws.reduce((a, d) => a + d.kg, 0);
      problems.push(
        `Not enough fresh ${name}: this build loads ${kg(freshKg)} and the usable lots hold ${kg(onHand)}` +
          `${p.skippedExpired.length ? ` (expired lots left out: ${p.skippedExpired.join(', ')})` : ''}: ${kg(freshShortKg)} short.`,
      );
    }
  }
  const reusedShortKg = reusedKg > stock.reusedKg + KG_EPS ? clean(reusedKg - stock.reusedKg) : 0;
  if (reusedShortKg > 0) problems.push(`Not enough reused ${name}: this build loads ${kg(reusedKg)} and the reused stock holds ${kg(stock.reusedKg)}: ${kg(reusedShortKg)} short.`);
  if (reusedKg > 0 && reuseBlocked(stock.lastCheck)) {
    problems.push(`The reused ${name} failed its last melt-flow check: it may not be loaded until a lead releases it. Load fresh powder only, or ask a lead.`);
  }
  const warnings = buildWarnings({ freshKg, reusedKg }, stock.reusedMeanAgeBuilds, stock.policy, stock.lastCheck).filter((w) => w.code !== 'melt_flow');
  return { draws, problems, freshShortKg, reusedShortKg, warnings };
}
