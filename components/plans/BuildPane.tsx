import { forwardRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ChamberView, LayerSlider, type ChamberPlacements, type ChamberViewHandle, type PartMesh, type Vec3 } from '../viewer';
import { colors, radius, spacing, useIsWide } from '../theme';
import { Button, Notice, Text } from '../ui';
import type { BuildStack, HandEdit } from './editorModel';

export interface BuildPaneProps {
  chamberMm: Vec3;
  margin: { xy: number; bottom: number; top: number };
  placements: ChamberPlacements;
  lineColours: readonly string[];
  meshesByPart?: ReadonlyMap<number, PartMesh>;
  /** The layers as printed, from the floor: the slider counts these, as the numbers do. */
  stack: BuildStack;
  cutMm: number | null;
  onCut: (heightMm: number | null) => void;
  describe: (index: number) => string;
  onPick: (index: number | null) => void;
  /** A press on a part: true when it is marked and may be dragged (see ChamberView). */
  onDragStart: (index: number) => boolean;
  onDrag: (dxMm: number, dyMm: number, phase: 'move' | 'end' | 'cancel') => void;
  marked: number;
  /** Where the one marked part is (its box's low corner) and its size, as shown (while dragged too). */
  markedBox: { position: readonly number[]; size: readonly number[] } | null;
  /** Takes back the last change by hand; null when there is none. */
  onUndo: (() => void) | null;
  /** Placements a hand edit left closer than the spacing or outside the usable region. */
  faults: number;
  spacingMm: number;
  /** Moves, turns or drops the marked parts; null when they cannot be changed (nothing marked, packing, read-only). */
  onHandEdit: ((edit: HandEdit) => void) | null;
  onRemoveMarked: () => void;
  onClearMarked: () => void;
  editable: boolean;
  /**
   * The layout shown was packed by shape: a part changed by hand is checked by its box at once, then against the
   * parts' meshes in the packing worker (so it may be moved into a hollow), and a drop lowers it as far as its shape allows.
   */
  byShape: boolean;
  /** Where the check against the meshes of a layout by shape changed by hand stands (null: none under way or due). */
  shapeCheck: 'checking' | 'checked' | 'failed' | 'dropping' | null;
  /** Why the check against the meshes could not be made, when it failed. */
  shapeCheckMessage: string | null;
  caption: string;
  live: boolean;
  /**
   * Fixed height of the 3D view: the bars and notices that come and go (marked parts, parts too close) then add to
   * the pane under it instead of squeezing the view, so the parts stay where the pointer found them. Left out, the
   * pane fills its column.
   */
  viewHeightPx?: number;
  /** A stored layout is on its way: the 3D view waits for it, so its first frame already holds every part. */
  loading: boolean;
}

const STEP_MM = 5;
const mm = (v: number) => v.toFixed(1);
/** The plate seen from the front: left and right along x, back (away) and front along y. */
const MOVES: { label: string; name: string; testID: string; edit: HandEdit }[] = [
  { label: '←', name: `Move ${STEP_MM} mm left`, testID: 'plan-move-left', edit: { kind: 'move', dxMm: -STEP_MM, dyMm: 0 } },
  { label: '→', name: `Move ${STEP_MM} mm right`, testID: 'plan-move-right', edit: { kind: 'move', dxMm: STEP_MM, dyMm: 0 } },
  { label: '↑', name: `Move ${STEP_MM} mm back`, testID: 'plan-move-back', edit: { kind: 'move', dxMm: 0, dyMm: STEP_MM } },
  { label: '↓', name: `Move ${STEP_MM} mm to the front`, testID: 'plan-move-front', edit: { kind: 'move', dxMm: 0, dyMm: -STEP_MM } },
];

/** What the pointer does: a wide screen has a mouse to hover with, a phone only taps. */
function pointerHint(wide: boolean, editable: boolean, byShape: boolean): string {
  if (editable && byShape) {
    return wide
      ? 'Hover a part to see its line; click to mark it, drag to move it. Drop (D) sinks marked parts into hollows.'
      : 'Tap to mark; a drop lowers parts into hollows.';
  }
  if (wide) return editable ? 'Hover a part to see its line; click to mark it, drag a marked part to move it.' : 'Hover a part to see its line.';
  return editable ? 'Tap a part to mark it; drag a marked part to move it.' : 'Tap a part to see its line.';
}

/** What the parts at fault break, as the check that found them sees it. */
function faultText(p: Pick<BuildPaneProps, 'faults' | 'byShape' | 'shapeCheck' | 'spacingMm'>): string {
  const n = p.faults;
  const them = n === 1 ? 'it' : 'them';
  if (!p.byShape) {
    return `${n} part${n === 1 ? ' is' : 's are'} closer than the ${p.spacingMm} mm spacing to another or outside the usable region (red). Move ${them} apart or drop ${them} to a free height: the layout cannot be kept until then.`;
  }
  if (p.shapeCheck === 'checked') {
    return `By the parts' shapes, ${n} part${n === 1 ? ' is' : 's are'} closer than the ${p.spacingMm} mm spacing to another, outside the usable region, or in the way of a part lifted out before ${them} (red). Move ${them} clear or drop ${them}: the layout cannot be kept until then.`;
  }
  return `${n} part${n === 1 ? "'s box is" : "s' boxes are"} closer than the ${p.spacingMm} mm spacing to another part's box, outside the usable region, or in the way of a part lifted out before it (red). Their shapes are checked once the change is made; the layout cannot be kept while any is at fault.`;
}

/** Centre pane: the chamber in 3D with the layer slider; clicking parts marks them for removal. */
export const BuildPane = forwardRef<ChamberViewHandle, BuildPaneProps>(function BuildPane(p, ref) {
  const [hovered, setHovered] = useState<number | null>(null);
  const wide = useIsWide();
  const top = Math.max(p.stack.topMm, p.stack.layerHeightMm);
  return (
    <View style={[styles.pane, p.viewHeightPx ? null : styles.fill]} testID="plan-build">
      <View style={styles.caption}>
        <Text variant="label" numberOfLines={1} testID="plan-build-caption">
          {p.caption}
        </Text>
        {p.live ? <Text variant="caption" color="ember" testID="plan-build-live">Best so far, improving…</Text> : null}
        {/* On a phone the hint keeps a line of its own, so the part named under a finger does not move the view down. */}
        <Text variant="caption" color="inkMuted" numberOfLines={1} style={wide ? { marginLeft: 'auto' } : styles.ownLine} testID="plan-build-hover">
          {hovered !== null ? p.describe(hovered) : pointerHint(wide, p.editable, p.byShape)}
        </Text>
      </View>
      <View style={[styles.body, p.viewHeightPx ? { height: p.viewHeightPx } : styles.fill]}>
        <View style={styles.view}>
          {p.loading ? (
            <View style={styles.wait} testID="plan-build-loading">
              <Text color="onGraphiteMuted">Loading the layout…</Text>
            </View>
          ) : (
          <ChamberView
            ref={ref}
            chamberMm={p.chamberMm}
            margin={p.margin}
            placements={p.placements}
            lineColours={p.lineColours}
            meshesByPart={p.meshesByPart}
            cutHeightMm={p.cutMm}
            onHover={setHovered}
            onPick={p.onPick}
            onDragStart={p.onDragStart}
            onDrag={p.onDrag}
            describePlacement={p.describe}
            style={styles.canvas}
          />
          )}
        </View>
        <View style={styles.slider}>
          <LayerSlider
            maxHeightMm={top}
            layerHeightMm={p.stack.layerHeightMm}
            valueMm={p.cutMm ?? top}
            onChange={(h) => p.onCut(h >= top ? null : h)}
            testID="plan-layer-slider"
          />
        </View>
      </View>
      {p.stack.layers > 0 ? (
        <Text variant="caption" color="inkMuted" testID="plan-build-layers-note">
          {`Layers count from the floor as printed: ${Number(p.stack.floorMarginMm.toFixed(2))} mm of powder under the parts (floor margin) and ${Number(p.stack.topMarginMm.toFixed(2))} mm over them included.`}
        </Text>
      ) : null}
      {p.byShape && p.shapeCheck && p.shapeCheck !== 'checked' ? (
        <Text variant="caption" color={p.shapeCheck === 'failed' ? 'danger' : 'inkMuted'} testID="plan-shape-check">
          {p.shapeCheck === 'dropping'
            ? 'Dropping the marked parts by their shapes…'
            : p.shapeCheck === 'checking'
              ? "Checking the change against the parts' shapes…"
              : `The change could not be checked against the parts' shapes (${p.shapeCheckMessage ?? 'no answer'}): its parts are checked by their boxes, and the server checks the shapes when the layout is kept.`}
        </Text>
      ) : null}
      {p.faults > 0 ? (
        <Notice tone="caution" title="Parts too close" testID="plan-edit-faults">
          {faultText(p)}
        </Notice>
      ) : null}
      {p.editable && (p.marked > 0 || p.onUndo) ? (
        <View style={styles.marked} testID={p.marked > 0 ? 'plan-marked' : 'plan-edit-bar'}>
          {p.onUndo ? (
            <Button label="Undo" size="sm" variant="secondary" onPress={p.onUndo} accessibilityLabel="Undo the last change by hand (Ctrl Z)" testID="plan-undo" />
          ) : null}
          {p.marked > 0 ? <Text variant="label">{p.marked} part{p.marked === 1 ? '' : 's'} marked</Text> : null}
          {p.markedBox ? (
            <Text variant="caption" color="inkMuted" testID="plan-marked-at">
              {`at x ${mm(p.markedBox.position[0])}, y ${mm(p.markedBox.position[1])}, z ${mm(p.markedBox.position[2])} mm`}
            </Text>
          ) : null}
          {p.marked > 0 && p.onHandEdit ? (
            <>
              <View style={styles.moves} accessibilityRole="toolbar" accessibilityLabel="Move the marked parts">
                {MOVES.map((m) => (
                  <Button key={m.testID} label={m.label} size="sm" variant="secondary" onPress={() => p.onHandEdit?.(m.edit)} accessibilityLabel={m.name} testID={m.testID} />
                ))}
              </View>
              <Button label="Turn (R)" size="sm" variant="secondary" onPress={() => p.onHandEdit?.({ kind: 'turn' })} testID="plan-turn" />
              <Button label="Drop (D)" size="sm" variant="secondary" onPress={() => p.onHandEdit?.({ kind: 'drop' })} testID="plan-drop" />
            </>
          ) : null}
          {p.marked > 0 ? (
            <>
              <Button label="Remove from layout" size="sm" variant="danger" onPress={p.onRemoveMarked} testID="plan-remove-marked" />
              <Button label="Clear" size="sm" variant="ghost" onPress={p.onClearMarked} />
            </>
          ) : null}
        </View>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  pane: { gap: spacing.sm, minHeight: 320 },
  fill: { flex: 1 },
  ownLine: { flexBasis: '100%' },
  caption: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  body: { flexDirection: 'row', gap: spacing.sm, minHeight: 0 },
  view: { flex: 1, borderRadius: radius.lg, overflow: 'hidden', backgroundColor: colors.graphite },
  canvas: { flex: 1 },
  wait: { flex: 1, alignItems: 'center', justifyContent: 'center' },
  slider: { width: 84 },
  marked: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  moves: { flexDirection: 'row', gap: spacing.xxs },
});
