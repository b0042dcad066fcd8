import PDFDocument from 'pdfkit';
import type { Database } from '../db';
import { plansRepository } from '../db/repositories/plans';
import { labsRepository } from '../db/repositories/labs';
import { conflict, notFound } from '../errors';
import type { LayoutsService } from './layouts';
import { checkPlanId, planLines, profileRow } from './planCommon';
import { checkExportable } from './export3mf';
import { CAUTIONS, CAUTION_DEFERRAL, stageChecklist } from '../../shared/floor';
import { STATUS_LABELS } from '../../shared/plans/status';
import type { Placement } from '../../shared/packing';
import type { CostEstimate } from '../../shared/estimate/cost';

const INK = '#222222';
const MUTED = '#666666';
const BOX_FILL = '#9bb7d4';

const fmt = (n: number | undefined, digits = 1) => (typeof n === 'number' && Number.isFinite(n) ? n.toFixed(digits) : '-');
const hours = (seconds: number | undefined) => (typeof seconds === 'number' ? `${fmt(seconds / 3600, 1)} h` : '-');

/**
 *   top view (x right, y up)        side view (x right, z up)
 *   +-------------+                 +-------------+
 *   |  []  []     |                 |             |
 *   |  [] [ ]  [] |                 | [] [] []    |
 *   +-------------+                 +-------------+
 * The chamber's outline and every placed box projected on the view's plane;
 * boxes drawn back to front so the nearer ones stay visible.
 */
function drawView(
  doc: PDFKit.PDFDocument,
  title: string,
  chamber: readonly number[],
  placements: readonly Placement[],
  axes: [number, number],
  depthAxis: number,
  x: number,
  y: number,
  width: number,
  height: number,
) {
  const [a, b] = axes;
  const scale = Math.min(width / chamber[a], height / chamber[b]);
  const w = chamber[a] * scale;
  const h = chamber[b] * scale;
  doc.fillColor(INK).fontSize(9).text(title, x, y - 12, { width, lineBreak: false });
  doc.lineWidth(0.8).strokeColor(INK).rect(x, y, w, h).stroke();
  const sorted = [...placements].sort((p, q) => p.position[depthAxis] - q.position[depthAxis]);
  doc.lineWidth(0.3);
  for (const p of sorted) {
    const px = x + p.position[a] * scale;
    // PDF y grows downwards; the chamber's axis grows upwards.
    const py = y + h - (p.position[b] + p.size[b]) * scale;
    doc.rect(px, py, Math.max(0.3, p.size[a] * scale), Math.max(0.3, p.size[b] * scale)).fillAndStroke(BOX_FILL, '#34506e');
  }
  doc.fillColor(MUTED).fontSize(7).text(`${fmt(chamber[a], 0)} x ${fmt(chamber[b], 0)} mm`, x, y + h + 3, { width, lineBreak: false });
  return h;
}

/** The estimate's cost, as stored with the layout (the sheet reads only these fields). */
type SheetCost = Omit<CostEstimate, 'costPerPart' | 'perPart'> & { perPart: Array<Pick<CostEstimate['perPart'][number], 'id' | 'count' | 'each' | 'total'>> };

/** The layout's stored estimate, as far as the sheet reads it (an older layout may lack any of it). */
type SheetEstimate = {
  layerCount?: number;
  layerHeightMm?: number;
  heightMm?: number;
  print?: { printSeconds?: number; preheatSeconds?: number };
  cooling?: { inMachineSeconds?: number; outsideSeconds?: number };
  powder?: { freshPowderKg?: number; reusedPowderKg?: number; cakeMassKg?: number; packingDensity?: number };
  calibration?: { calibrated?: boolean; runs?: number };
  profileSource?: string;
  profileBoxPlacements?: number;
  byBoxes?: { printSeconds?: number };
  cost?: SheetCost;
};

/**
 * The build sheet's estimate lines: layers, print, cooling, powder, and what the scan areas were made of (with,
 * from the meshes, what the print would read with every part counted as its box). An older layout's estimate may
 * lack any of it: a dash stands in.
 */
export function estimateLines(est: SheetEstimate | undefined, machine?: { removalTempC?: number | null; handlingTempC?: number | null }): string[] {
  const calib = est?.calibration?.calibrated ? `calibrated from ${est.calibration.runs} runs` : 'not calibrated yet';
  const boxes = typeof est?.byBoxes?.printSeconds === 'number' ? `; counted as boxes, the print would read ${hours(est.byBoxes.printSeconds)}` : '';
  return [
    `${est?.layerCount ?? '-'} layers of ${fmt(est?.layerHeightMm, 2)} mm, parts up to ${fmt(est?.heightMm)} mm`,
    `Print ${hours(est?.print?.printSeconds)} (preheat ${hours(est?.print?.preheatSeconds)}) · ${calib}`,
    `Cooling ${hours(est?.cooling?.inMachineSeconds)} in the machine to ${machine?.removalTempC ?? '-'} °C, then ${hours(est?.cooling?.outsideSeconds)} outside to ${machine?.handlingTempC ?? '-'} °C`,
    `Powder: ${fmt(est?.powder?.freshPowderKg, 2)} kg fresh + ${fmt(est?.powder?.reusedPowderKg, 2)} kg reused (cake ${fmt(est?.powder?.cakeMassKg, 2)} kg) · packing density ${fmt((est?.powder?.packingDensity ?? 0) * 100)} %`,
    est?.profileSource === 'mesh'
      ? `Scan areas from the parts' sliced shapes${est.profileBoxPlacements ? ` (${est.profileBoxPlacements} placed parts counted as boxes)` : ''}${boxes}`
      : "Box estimate: scan areas from the parts' bounding boxes, which read high",
  ];
}

/**
 * The build sheet's cost lines: what the build costs by what it pays for, then each request line's parts with the
 * cost of one and of all (shared by volume and height, docs/estimate.md), and their sum, which is the total.
 * Nothing for an estimate stored before the cost per part was kept.
 */
export function costLines(cost: SheetCost | undefined, lines: ReadonlyArray<{ request_line_id: string; part_name: string }>): string[] {
  if (!cost || !Array.isArray(cost.perPart)) return [];
  const money = (n: number) => fmt(n, 2);
  const out = [
    `Machine ${fmt(cost.machineHours, 1)} h${cost.heldThroughOutsideCooling ? ' (held through the outside cooling: one chamber)' : ''} ${money(cost.machineCost)} · energy ${money(cost.energyCost)} · inert gas ${money(cost.inertGasCost)} · powder ${money(cost.powderCost)} · labour ${money(cost.labourCost)} · scrap allowance ${money(cost.scrapCost)} · total ${money(cost.totalCost)}`,
  ];
  const name = new Map(lines.map((l) => [l.request_line_id, l.part_name]));
  for (const p of cost.perPart) out.push(`${p.count} x ${name.get(p.id) ?? p.id}: ${money(p.each)} each, ${money(p.total)} in all`);
  out.push(`The parts add up to ${money(cost.perPart.reduce((s, p) => s + p.total, 0))}, the build's total.`);
  return out;
}

/** The operator's clipboard copy of an approved plan: views, part list, estimates, checklists and cautions, as a PDF. */
export function sheetService(db: Database, deps: { layouts: LayoutsService }) {
  const plans = plansRepository(db);
  const labs = labsRepository(db);

  return {
    async build(labId: string, planId: string): Promise<{ name: string; bytes: Buffer }> {
      const plan = await plans.head(labId, checkPlanId(planId));
      if (!plan) throw notFound('That plan');
      checkExportable(plan.status, 'build sheet');
      if (!plan.chosenLayoutId) throw conflict('no_chosen_layout', 'This plan has no chosen layout.');
      const [layout, lines, machine, material] = await Promise.all([
        deps.layouts.get(labId, plan.id, plan.chosenLayoutId),
        planLines(db, plan.id),
        profileRow(db, 'machines', labId, plan.machineId),
        profileRow(db, 'materials', labId, plan.materialId),
      ]);
      const est = layout.estimate as SheetEstimate | undefined;
      const chamber = (machine?.chamberMm ?? layout.instance.chamber) as number[];
      const placements = layout.result.placements as Placement[];

      const doc = new PDFDocument({
        size: 'A4',
        margin: 40,
        info: { Title: `Build sheet: ${plan.name}`, Subject: plan.name, Creator: 'Sinterstack' },
      });
      const chunks: Buffer[] = [];
      doc.on('data', (c: Buffer) => chunks.push(c));
      const ended = new Promise<void>((resolve, reject) => {
        doc.on('end', () => resolve());
        doc.on('error', reject);
      });
      const left = doc.page.margins.left;
      const usable = doc.page.width - left - doc.page.margins.right;

      doc.fillColor(INK).font('Helvetica-Bold').fontSize(16).text(plan.name);
      doc.font('Helvetica').fontSize(9).fillColor(MUTED);
      doc.text(
        `Machine ${machine?.name ?? ''} · material ${material?.name ?? ''} · ${STATUS_LABELS[plan.status]}` +
          (plan.queuePosition ? ` · number ${plan.queuePosition} in the queue` : '') +
          ` · layout "${layout.label}" · printed ${new Date().toISOString().slice(0, 16).replace('T', ' ')} UTC`,
      );
      doc.moveDown(1.5);

      const viewTop = doc.y + 14;
      const half = (usable - 20) / 2;
      const hTop = drawView(doc, 'Top view (x, y)', chamber, placements, [0, 1], 2, left, viewTop, half, 210);
      const hSide = drawView(doc, 'Side view (x, z)', chamber, placements, [0, 2], 1, left + half + 20, viewTop, half, 210);
      doc.x = left;
      doc.y = viewTop + Math.max(hTop, hSide) + 20;
      if (layout.resultFormat === 'pack-result/2') {
        doc.font('Helvetica').fontSize(8).fillColor(MUTED);
        doc.text("Packed by the parts' shapes: the views draw each part's bounding box, so the boxes of parts nested in each other overlap. The build file (3MF) holds each part's exact placement.");
        doc.moveDown(0.8);
        doc.fillColor(INK);
      }

      doc.fillColor(INK).font('Helvetica-Bold').fontSize(11).text('Parts by request line');
      doc.font('Helvetica').fontSize(9);
      for (const l of lines) {
        const placed = placements.filter((p) => p.id === l.request_line_id).length;
        doc.text(`${l.quantity} x ${l.part_name}  ·  request "${l.request_title}", due ${l.due_date}  ·  ${placed} placed  ·  ${fmt(l.size_x_mm)} x ${fmt(l.size_y_mm)} x ${fmt(l.size_z_mm)} mm`);
      }
      doc.moveDown();

      doc.font('Helvetica-Bold').fontSize(11).text('Estimates');
      doc.font('Helvetica').fontSize(9);
      for (const line of estimateLines(est, machine ?? undefined)) {
        doc.text(line);
      }
      doc.moveDown();

      const costs = costLines(est?.cost, lines);
      if (costs.length > 0) {
        const lab = await labs.lab(labId);
        doc.font('Helvetica-Bold').fontSize(11).text(`Cost in ${lab?.currency ?? 'the lab\'s currency'}, from the lab's rates`);
        doc.font('Helvetica').fontSize(9);
        for (const line of costs) doc.text(line);
        doc.moveDown();
      }

      const checklist = (title: string, items: ReturnType<typeof stageChecklist>) => {
        doc.font('Helvetica-Bold').fontSize(11).fillColor(INK).text(title);
        doc.font('Helvetica').fontSize(9);
        for (const item of items) {
          const y = doc.y;
          doc.lineWidth(0.6).rect(left, y + 1, 7, 7).stroke();
          doc.text(item.label, left + 12, y);
        }
        doc.x = left;
        doc.moveDown(0.5);
      };
      checklist(
        'Before printing',
        stageChecklist('queued', { freshPowderKg: est?.powder?.freshPowderKg, reusedPowderKg: est?.powder?.reusedPowderKg }),
      );
      checklist('Finishing', stageChecklist('finishing'));

      doc.font('Helvetica-Bold').fontSize(11).fillColor(INK).text('Safety');
      doc.font('Helvetica-Oblique').fontSize(8).fillColor(MUTED).text(CAUTION_DEFERRAL);
      for (const caution of Object.values(CAUTIONS)) {
        doc.font('Helvetica-Bold').fontSize(9).fillColor(INK).text(caution.title);
        doc.font('Helvetica').fontSize(8).text(caution.points.join(' '));
        doc.fillColor(MUTED).text(`See: ${caution.reference}.`).fillColor(INK);
      }
      doc.end();
      await ended;
      return { name: plan.name, bytes: Buffer.concat(chunks) };
    },
  };
}
export type SheetService = ReturnType<typeof sheetService>;
