import PDFDocument from 'pdfkit';
import type { Database } from '../db';
import { plansRepository } from '../db/repositories/plans';
import { labsRepository } from '../db/repositories/labs';
import { AppError, conflict, notFound } from '../errors';
import type { LayoutsService } from './layouts';
import { checkPlanId, planLines, profileRow } from './planCommon';
import { checkExportable, planFilesError, planMeshJob } from './export3mf';
import type { FileStorage } from '../storage';
import type { SheetViewsJob, SheetViewsResult } from '../mesh/planFiles';
import { MeshWorkFailed } from '../mesh/pool';
import { CAUTIONS, CAUTION_DEFERRAL, stageChecklist } from '../../shared/floor';
import { STATUS_LABELS } from '../../shared/plans/status';
import type { Placement } from '../../shared/packing';
import type { CostEstimate } from '../../shared/estimate/cost';

const INK = '#222222';
const MUTED = '#666666';
const BOX_FILL = '#9bb7d4';
/** The shapes' shades, farthest to nearest: eight steps from #34506e to #a8c2dc. */
const SHADE_FAR = [0x34, 0x50, 0x6e];
const SHADE_NEAR = [0xa8, 0xc2, 0xdc];
const SHADES = 8;
const SHADE_RGB = Array.from({ length: SHADES }, (_, k) => SHADE_FAR.map((c, i) => Math.round(c + ((SHADE_NEAR[i] - c) * k) / (SHADES - 1))) as [number, number, number]);
const PAPER: [number, number, number] = [255, 255, 255];
/** The views' cells, in PDF points (1/72 in): finer than a printer's dot gain makes visible. */
const CELL_PT = 0.8;
/** More placed triangles than this, and the views draw boxes (drawing them would hold a mesh thread, and the request, too long). */
export const SHEET_TRIANGLE_LIMIT = 4_000_000;

const fmt = (n: number | undefined, digits = 1) => (typeof n === 'number' && Number.isFinite(n) ? n.toFixed(digits) : '-');
const hours = (seconds: number | undefined) => (typeof seconds === 'number' ? `${fmt(seconds / 3600, 1)} h` : '-');

/**
 *   top view (x right, y up)        side view (x right, z up)
 *   +-------------+                 +-------------+
 *   |  []  []     |                 |             |
 *   |  [] [ ]  [] |                 | [] [] []    |
 *   +-------------+                 +-------------+
 * The chamber's outline and every placed box projected on the view's plane;
 * boxes drawn far to near so the nearer ones stay visible (the top view is
 * seen from above, the side view from the front, y = 0).
 */
function drawView(doc: PDFKit.PDFDocument, chamber: readonly number[], at: ViewAt, placements: readonly Placement[]) {
  const { axes, depthAxis, nearer } = at.view;
  const [a, b] = axes;
  const { x, y } = at;
  const { scale, h } = frame(doc, chamber, at);
  const sorted = [...placements].sort((p, q) => nearer * (p.position[depthAxis] - q.position[depthAxis]));
  doc.lineWidth(0.3);
  for (const p of sorted) {
    const px = x + p.position[a] * scale;
    // PDF y grows downwards; the chamber's axis grows upwards.
    const py = y + h - (p.position[b] + p.size[b]) * scale;
    doc.rect(px, py, Math.max(0.3, p.size[a] * scale), Math.max(0.3, p.size[b] * scale)).fillAndStroke(BOX_FILL, '#34506e');
  }
  return h;
}

/**
 * The parts' own shapes as a mesh worker drew them for the view (../mesh/planFiles.ts): a picture of one pixel a
 * cell, lighter is nearer, laid over the view's frame from its lower left corner (its top row may reach less than
 * a cell past the frame, which clips it).
 */
function drawShapes(doc: PDFKit.PDFDocument, chamber: readonly number[], at: ViewAt, view: { png: Uint8Array; width: number; height: number }) {
  const { axes } = at.view;
  const { x, y } = at;
  const { scale, h } = frame(doc, chamber, at);
  const w = at.room[axes[0]] * scale;
  const cellPt = cellMmOf(at) * scale;
  doc.save().rect(x, y, w, h).clip();
  doc.image(Buffer.from(view.png.buffer, view.png.byteOffset, view.png.byteLength), x, y + h - view.height * cellPt, { width: view.width * cellPt, height: view.height * cellPt });
  doc.restore();
  doc.lineWidth(0.8).strokeColor(INK).rect(x, y, w, h).stroke();
  return h;
}

interface SheetView {
  axes: [number, number];
  depthAxis: number;
  /** 1: a larger coordinate on the depth axis is nearer the viewer; -1: a smaller one. */
  nearer: 1 | -1;
}
const TOP: SheetView = { axes: [0, 1], depthAxis: 2, nearer: 1 };
const FRONT: SheetView = { axes: [0, 2], depthAxis: 1, nearer: -1 };

/** Where a view goes on the page (points), under which title, and the room of the chamber it draws. */
interface ViewAt {
  title: string;
  view: SheetView;
  /** The chamber, or in the side view of a shallow build the chamber up to a little over the build's top (mm). */
  room: readonly number[];
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Points per mm of a view: its room fitted into its place on the page. */
const scaleOf = (at: ViewAt) => Math.min(at.width / at.room[at.view.axes[0]], at.height / at.room[at.view.axes[1]]);
/** The millimetres of a view's cell, CELL_PT on the page. */
const cellMmOf = (at: ViewAt) => CELL_PT / scaleOf(at);

/**
 * How much of the chamber's height the side view draws: a little over the build's top (its highest part and 5 mm,
 * rounded up to 10 mm), so that a shallow build in a tall chamber is drawn large enough to read rather than as a
 * strip along the floor; all of it when the build reaches that high.
 */
function sideRoom(chamber: readonly number[], placements: ReadonlyArray<Pick<Placement, 'position' | 'size'>>): number[] {
  const top = placements.reduce((t, p) => Math.max(t, p.position[2] + p.size[2]), 0);
  const shown = Math.max(20, Math.ceil((top + 5) / 10) * 10);
  return [chamber[0], chamber[1], Math.min(chamber[2], shown)];
}

/** A view's title, the outline and size of its room; returns its scale (points per mm) and height in points. */
function frame(doc: PDFKit.PDFDocument, chamber: readonly number[], at: ViewAt) {
  const { title, x, y, width, room } = at;
  const [a, b] = at.view.axes;
  const scale = scaleOf(at);
  const w = room[a] * scale;
  const h = room[b] * scale;
  doc.fillColor(INK).fontSize(9).text(title, x, y - 12, { width, lineBreak: false });
  doc.lineWidth(0.8).strokeColor(INK).rect(x, y, w, h).stroke();
  const size = `${fmt(room[a], 0)} x ${fmt(room[b], 0)} mm`;
  const cut = room[b] < chamber[b] - 1e-9 ? `, the lowest ${fmt(room[b], 0)} mm of the chamber's ${fmt(chamber[b], 0)} mm` : '';
  doc.fillColor(MUTED).fontSize(7).text(`${size}${cut}`, x, y + h + 3, { width, lineBreak: false });
  return { scale, h };
}

/**
 * The views' pictures, drawn from the parts' meshes in a mesh worker, or why the views draw boxes instead: a
 * part's file that is missing or cannot be read, more triangles than a sheet draws, or a worker that could not
 * finish.
 */
async function shapesOf(
  plans: ReturnType<typeof plansRepository>,
  deps: SheetDeps,
  planId: string,
  chamber: readonly number[],
  placements: readonly Placement[],
  views: readonly ViewAt[],
): Promise<SheetViewsResult> {
  const what = 'the views draw bounding boxes';
  try {
    const job = await planMeshJob(plans, deps.storage, planId, placements, what);
    return await deps.draw({
      ...job,
      chamber,
      views: views.map((at) => ({ ...at.view, cellMm: cellMmOf(at), sizeMm: [at.room[at.view.axes[0]], at.room[at.view.axes[1]]] as [number, number] })),
      palette: SHADE_RGB,
      background: PAPER,
      triangleLimit: SHEET_TRIANGLE_LIMIT,
    });
  } catch (e) {
    if (e instanceof MeshWorkFailed) return { reason: `${e.message} The views draw bounding boxes.` };
    const answer = planFilesError(e, what);
    if (answer instanceof AppError && answer.status === 409) return { reason: answer.message };
    throw answer;
  }
}

/** What the sheet is made with: the layouts, the file store, and a mesh worker that draws the views. */
export type SheetDeps = { layouts: LayoutsService; storage: FileStorage; draw: (job: SheetViewsJob) => Promise<SheetViewsResult> };

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
export function sheetService(db: Database, deps: SheetDeps) {
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
      const top: ViewAt = { title: 'Top view (x, y), from above', view: TOP, room: chamber, x: left, y: viewTop, width: half, height: 210 };
      const side: ViewAt = { title: 'Side view (x, z), from the front', view: FRONT, room: sideRoom(chamber, placements), x: left + half + 20, y: viewTop, width: half, height: 210 };
      const shapes = await shapesOf(plans, deps, plan.id, chamber, placements, [top, side]);
      const [hTop, hSide] =
        'views' in shapes
          ? [drawShapes(doc, chamber, top, shapes.views[0]), drawShapes(doc, chamber, side, shapes.views[1])]
          : [drawView(doc, chamber, top, placements), drawView(doc, chamber, side, placements)];
      doc.x = left;
      doc.y = viewTop + Math.max(hTop, hSide) + 20;
      doc.font('Helvetica').fontSize(8).fillColor(MUTED);
      if ('views' in shapes) {
        doc.text("The views draw the parts' own shapes, shaded by depth: lighter is higher in the top view and nearer the front in the side view.");
      } else {
        doc.text(
          layout.resultFormat === 'pack-result/2'
            ? `${shapes.reason} The boxes of parts nested in each other overlap; the build file (3MF) holds each part's exact placement.`
            : shapes.reason,
        );
      }
      doc.moveDown(0.8);
      doc.fillColor(INK);

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
