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
  marked: number;
  /** Placements a hand edit left closer than the spacing or outside the usable region. */
  faults: number;
  spacingMm: number;
  /** Moves, turns or drops the marked parts; null when they cannot be changed (nothing marked, packing, read-only). */
  onHandEdit: ((edit: HandEdit) => void) | null;
  onRemoveMarked: () => void;
  onClearMarked: () => void;
  editable: boolean;
  caption: string;
  live: boolean;
  /** Fixed height (phone); the pane fills its column when left out. */
  heightPx?: number;
  /** A stored layout is on its way: the 3D view waits for it, so its first frame already holds every part. */
  loading: boolean;
}

const STEP_MM = 5;
/** The plate seen from the front: left and right along x, back (away) and front along y. */
const MOVES: { label: string; name: string; testID: string; edit: HandEdit }[] = [
  { label: '←', name: `Move ${STEP_MM} mm left`, testID: 'plan-move-left', edit: { kind: 'move', dxMm: -STEP_MM, dyMm: 0 } },
  { label: '→', name: `Move ${STEP_MM} mm right`, testID: 'plan-move-right', edit: { kind: 'move', dxMm: STEP_MM, dyMm: 0 } },
  { label: '↑', name: `Move ${STEP_MM} mm back`, testID: 'plan-move-back', edit: { kind: 'move', dxMm: 0, dyMm: STEP_MM } },
  { label: '↓', name: `Move ${STEP_MM} mm to the front`, testID: 'plan-move-front', edit: { kind: 'move', dxMm: 0, dyMm: -STEP_MM } },
];

/** What the pointer does: a wide screen has a mouse to hover with, a phone only taps. */
function pointerHint(wide: boolean, editable: boolean): string {
  if (wide) return editable ? 'Hover a part to see its line; click to mark it to move, turn or remove.' : 'Hover a part to see its line.';
  return editable ? 'Tap a part to see its line and mark it to move, turn or remove.' : 'Tap a part to see its line.';
}

/** Centre pane: the chamber in 3D with the layer slider; clicking parts marks them for removal. */
export const BuildPane = forwardRef<ChamberViewHandle, BuildPaneProps>(function BuildPane(p, ref) {
  const [hovered, setHovered] = useState<number | null>(null);
  const wide = useIsWide();
  const top = Math.max(p.stack.topMm, p.stack.layerHeightMm);
  return (
    <View style={[styles.pane, p.heightPx ? { height: p.heightPx } : styles.fill]} testID="plan-build">
      <View style={styles.caption}>
        <Text variant="label" numberOfLines={1} testID="plan-build-caption">
          {p.caption}
        </Text>
        {p.live ? <Text variant="caption" color="ember" testID="plan-build-live">Best so far, improving…</Text> : null}
        <Text variant="caption" color="inkMuted" numberOfLines={1} style={{ marginLeft: 'auto' }} testID="plan-build-hover">
          {hovered !== null ? p.describe(hovered) : pointerHint(wide, p.editable)}
        </Text>
      </View>
      <View style={styles.body}>
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
      {p.faults > 0 ? (
        <Notice tone="caution" title="Parts too close" testID="plan-edit-faults">
          {`${p.faults} part${p.faults === 1 ? ' is' : 's are'} closer than the ${p.spacingMm} mm spacing to another or outside the usable region (red). Move ${p.faults === 1 ? 'it' : 'them'} apart or drop ${p.faults === 1 ? 'it' : 'them'} to a free height: the layout cannot be kept until then.`}
        </Notice>
      ) : null}
      {p.editable && p.marked > 0 ? (
        <View style={styles.marked} testID="plan-marked">
          <Text variant="label">{p.marked} part{p.marked === 1 ? '' : 's'} marked</Text>
          {p.onHandEdit ? (
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
          <Button label="Remove from layout" size="sm" variant="danger" onPress={p.onRemoveMarked} testID="plan-remove-marked" />
          <Button label="Clear" size="sm" variant="ghost" onPress={p.onClearMarked} />
        </View>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  pane: { gap: spacing.sm, minHeight: 320 },
  fill: { flex: 1 },
  caption: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  body: { flex: 1, flexDirection: 'row', gap: spacing.sm, minHeight: 0 },
  view: { flex: 1, borderRadius: radius.lg, overflow: 'hidden', backgroundColor: colors.graphite },
  canvas: { flex: 1 },
  wait: { flex: 1, alignItems: 'center', justifyContent: 'center' },
  slider: { width: 84 },
  marked: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  moves: { flexDirection: 'row', gap: spacing.xxs },
});
