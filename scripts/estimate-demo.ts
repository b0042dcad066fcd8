/**
 * The estimate's formulas with their sources, and its figures for the demo machines' builds:
 * `npm run --silent estimate:demo` prints them as Markdown.
 *
 * With `-- --before DIR`, where DIR holds an earlier copy of the project's `shared/` folder (its `estimate/` and
 * `demo/`), the same builds are estimated by that copy too, side by side: for example
 *
 *   mkdir -p /tmp/before && git archive <commit> shared | tar -x -C /tmp/before
 *   ln -s "$PWD/node_modules" /tmp/before/node_modules
 *   npm run --silent estimate:demo -- --before /tmp/before/shared
 *
 * The builds are invented: a grid of clips and housings of the demo lab's nylon 12 on each demo machine, one
 * shallow (parts up to 19 mm), one deeper (35 mm) and one filling the chamber, each part's own volume a share of
 * its box (0.6 for a clip, 0.45 for a housing) as meshes of such parts have.
 */
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { fail } from './lib/cli';
import { estimateLayout } from '../shared/estimate';
import { demoMachines, demoMaterials } from '../shared/demo/profiles';

type Box = { id: string; position: [number, number, number]; size: [number, number, number] };
type Profile = { name: string } & Record<string, unknown>;
/** What either copy of the estimate answers, as far as the tables read it. */
type Estimate = {
  layerCount: number;
  layerHeightMm: number;
  print: { printSeconds: number };
  cooling: { inMachineSeconds: number; outsideSeconds: number };
  powder: { freshPowderKg: number; cakeMassKg: number };
  cost: { totalCost: number; costPerPart: number | null; perPart?: Array<{ id: string; each: number }> };
};
type Module = { estimateLayout: (input: object) => Estimate; demoMachines: Profile[]; demoMaterials: Profile[] };
const num = (p: Profile, key: string) => p[key] as number;

const PARTS = {
  clip: { size: [20, 12, 8] as [number, number, number], share: 0.6 },
  housing: { size: [60, 40, 30] as [number, number, number], share: 0.45 },
};

export const FORMULAS: Array<[string, string]> = [
  ['Scan speed v = min(P / (E_V h t), top speed): the material keeps its volumetric energy density E_V = P / (v h t)', 'Gibson, Rosen & Stucker, Additive Manufacturing Technologies, 2nd ed. (2015), §5.4.2, eq. 5.1'],
  ['Hatch time of a layer = A / (v h); contour time = passes x C / v', 'derived from eq. 5.1 (the laser covers h of width per mm travelled)'],
  ['Print time = preheat + sum over layers of max(recoat + hatch + contour, minimum layer time)', "common practice (the machine's recoat and its minimum layer time)"],
  ['Layers = ceil((top of the highest part + top margin) / layer height)', 'common practice'],
  ['Cake core cooling: theta = product over three plane walls of sum C_n exp(-zeta_n^2 Fo) cos(zeta_n x*), zeta tan zeta = Bi, Bi = hL/k, Fo = alpha t / L^2', 'Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, §5.5 and §5.8 (checked against Example 5.4 and the semi-infinite solid, §5.7)'],
  ['Time in the machine: core from the bed to the removal temperature; outside: from there to the handling temperature', "the machine maker's removal and handling temperatures, the lab's figures"],
  ['Cake mass = parts x solid density + (cake volume - parts) x bulk density', 'mass balance'],
  ['Fresh powder = max(refresh ratio x fill, parts mass + sieving, crust and feed-surplus losses)', 'mass balance; refresh ratios: Polymers 2025, 17(5):577'],
  ["Cost = machine hours x rate (one chamber: through the outside cooling) + energy + inert gas + powder + labour + scrap allowance f / (1 - f)", 'Hopkinson & Dickens, Proc. IMechE C 217 (2003); Ruffo, Tuck & Hague, Proc. IMechE B 220 (2006)'],
  ['Cost per part: laser time and the powder in the parts by volume, the other held time and powder by height, labour equally; the shares add up to the total', 'after Ruffo, Tuck & Hague (2006); docs/estimate.md'],
  ['Calibration: least squares through the origin (print, cooling from core readings), two regressors for layer and scan factors', 'Draper & Smith, Applied Regression Analysis, 3rd ed., §1.2 and §5.1 (from memory); checked against Anscombe (1973) set I'],
];

/** Boxes of one part in a grid inside the margins, layer upon layer up to `topMm`. */
function grid(chamber: number[], material: Profile, part: keyof typeof PARTS, fromZ: number, topMm: number, xFrom = 0, xTo = 1): Box[] {
  const { size } = PARTS[part];
  const g = num(material, 'spacingMm');
  const m = num(material, 'marginXyMm');
  const x0 = m + (chamber[0] - 2 * m) * xFrom;
  const x1 = m + (chamber[0] - 2 * m) * xTo;
  const boxes: Box[] = [];
  for (let z = fromZ; z + size[2] <= topMm + 1e-9; z += size[2] + g) {
    for (let y = m; y + size[1] <= chamber[1] - m + 1e-9; y += size[1] + g) {
      for (let x = x0; x + size[0] <= x1 + 1e-9; x += size[0] + g) boxes.push({ id: part, position: [x, y, z], size: [...size] });
    }
  }
  return boxes;
}

function builds(machine: Profile, material: Profile): Array<{ name: string; placements: Box[] }> {
  const c = machine.chamberMm as number[];
  const z0 = num(material, 'marginBottomMm');
  const full = c[2] - num(material, 'marginTopMm');
  return [
    { name: 'clips up to 19 mm', placements: grid(c, material, 'clip', z0, 19) },
    { name: 'clips up to 35 mm', placements: grid(c, material, 'clip', z0, 35) },
    { name: 'full: clips and housings', placements: [...grid(c, material, 'clip', z0, full, 0, 0.5), ...grid(c, material, 'housing', z0, full, 0.5, 1)] },
  ];
}

function figures(mod: Module, machineName: string, placements: Box[]): Record<string, string> {
  const machine = mod.demoMachines.find((m) => m.name === machineName)!;
  const material = mod.demoMaterials[0];
  const volume = (id: string) => PARTS[id as keyof typeof PARTS].size.reduce((a, b) => a * b, 1) * PARTS[id as keyof typeof PARTS].share;
  const partsVolumeMm3 = placements.reduce((s, p) => s + volume(p.id), 0);
  const e = mod.estimateLayout({
    layout: { placements },
    machine,
    material,
    partsVolumeMm3,
    volumeById: { clip: volume('clip'), housing: volume('housing') },
    partCount: placements.length,
  });
  const h = (s: number) => `${(s / 3600).toFixed(1)} h`;
  const money = (n: number | null | undefined) => (typeof n === 'number' ? n.toFixed(2) : '–');
  const perPart = (id: string) => (Array.isArray(e.cost.perPart) ? e.cost.perPart.find((p) => p.id === id)?.each : placements.some((p) => p.id === id) ? e.cost.costPerPart : undefined);
  const partsKg = ((partsVolumeMm3 / 1000) * num(material, 'solidDensityGPerCm3')) / 1000;
  return {
    parts: String(placements.length),
    layers: `${e.layerCount} x ${e.layerHeightMm} mm`,
    print: h(e.print.printSeconds),
    'cooling in the machine': h(e.cooling.inMachineSeconds),
    'cooling outside': h(e.cooling.outsideSeconds),
    'parts mass': `${partsKg.toFixed(2)} kg`,
    'fresh powder': `${e.powder.freshPowderKg.toFixed(2)} kg`,
    'cake mass': `${e.powder.cakeMassKg.toFixed(2)} kg`,
    'build cost': money(e.cost.totalCost),
    'cost of a clip': money(perPart('clip')),
    'cost of a housing': money(perPart('housing')),
  };
}

async function loadBefore(dir: string): Promise<Module> {
  const at = (p: string) => pathToFileURL(path.resolve(dir, p)).href;
  try {
    const est = await import(at('estimate/index.ts'));
    const demo = await import(at('demo/profiles.ts'));
    return { estimateLayout: est.estimateLayout, demoMachines: demo.demoMachines, demoMaterials: demo.demoMaterials };
  } catch (err) {
    fail(`--before ${dir}: cannot load estimate/index.ts and demo/profiles.ts there (${(err as Error).message})`);
  }
}

async function main() {
  const args = process.argv.slice(2);
  const i = args.indexOf('--before');
  const before = i >= 0 ? await loadBefore(args[i + 1] ?? fail('--before needs a folder')) : null;
  const now: Module = { estimateLayout: estimateLayout as unknown as Module['estimateLayout'], demoMachines: demoMachines as unknown as Profile[], demoMaterials: demoMaterials as unknown as Profile[] };

  const out: string[] = ['## Formulas and their sources', ''];
  for (const [formula, source] of FORMULAS) out.push(`- ${formula}. *${source}*`);
  out.push('');
  for (const machine of demoMachines) {
    for (const b of builds(machine as unknown as Profile, demoMaterials[0] as unknown as Profile)) {
      out.push(`### ${machine.name} (${machine.chamberMm.join(' x ')} mm, ${machine.chamberCount} chamber${machine.chamberCount === 1 ? '' : 's'}), ${demoMaterials[0].name}: ${b.name}`, '');
      const after = figures(now, machine.name, b.placements);
      const was = before ? figures(before, machine.name, b.placements) : null;
      out.push(was ? '| | before | after |' : '| | figure |', was ? '| --- | ---: | ---: |' : '| --- | ---: |');
      for (const key of Object.keys(after)) out.push(was ? `| ${key} | ${was[key] ?? '–'} | ${after[key]} |` : `| ${key} | ${after[key]} |`);
      out.push('');
    }
  }
  process.stdout.write(out.join('\n'));
}

void main();
