/**
 * Cross-section area per layer as a filled profile, floor at the left, with
 * the layers whose area jumps sharply from the one below marked: a sudden
 * change of scanned area changes the heat put into the bed, which loads the
 * cake unevenly. Axes in cm² and mm above the floor; pointing at (or touching)
 * the plot reads out that layer. Used by the plan editor and the review screen.
 */
import { useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Path, Rect } from 'react-native-svg';
import { findAreaJumps, type AreaJump } from '../../shared/estimate';
import { colors, fonts, spacing } from '../theme';
import { Text } from '../ui';
import { areaChartModel, readoutAt } from './areaChartModel';

export { binMax } from './areaChartModel';

export interface AreaPerLayerChartProps {
  areaPerLayerMm2: ArrayLike<number>;
  layerHeightMm: number;
  /** The jumps to flag; found here with the shared rule when left out. */
  jumps?: readonly AreaJump[];
  /** The bed's area, for the readout's share of the bed and the minimum change flagged. */
  bedAreaMm2?: number;
  /** Layer the view is cut at, drawn as a line. */
  cutLayer?: number | null;
  heightPx?: number;
  testID?: string;
}

const GUTTER = 44;

const fmt = (v: number, digits = 1) => String(Number(v.toFixed(digits)));

export function AreaPerLayerChart({ areaPerLayerMm2, layerHeightMm, jumps, bedAreaMm2, cutLayer, heightPx = 120, testID = 'area-chart' }: AreaPerLayerChartProps) {
  const [width, setWidth] = useState(0);
  const [pointerX, setPointerX] = useState<number | null>(null);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const n = areaPerLayerMm2.length;
  const flagged = useMemo(() => jumps ?? findAreaJumps(areaPerLayerMm2, { minDeltaMm2: (bedAreaMm2 ?? 0) * 0.02 }), [jumps, areaPerLayerMm2, bedAreaMm2]);
  const flaggedSet = useMemo(() => new Set(flagged.map((j) => j.layerIndex)), [flagged]);
  const chart = useMemo(() => areaChartModel(areaPerLayerMm2, layerHeightMm, width, heightPx), [areaPerLayerMm2, layerHeightMm, width, heightPx]);
  const readout = pointerX != null ? readoutAt(areaPerLayerMm2, layerHeightMm, pointerX, width, flaggedSet, bedAreaMm2) : null;

  // Pointer events carry the position within the plot; a touch sets the readout where it lands.
  const track = (e: { nativeEvent: { offsetX?: number; locationX?: number } }) => {
    const x = e.nativeEvent.offsetX ?? e.nativeEvent.locationX;
    if (typeof x === 'number' && Number.isFinite(x)) setPointerX(Math.max(0, Math.min(width - 1, x)));
  };
  const pointerProps = { onPointerMove: track, onPointerDown: track, onPointerLeave: () => setPointerX(null) } as object;

  return (
    <View testID={testID} accessibilityLabel={`Cross-section area per layer, ${n} layers, ${flagged.length} sharp changes`} style={{ gap: spacing.xxs }}>
      <Text variant="caption" color={readout?.flagged ? 'danger' : readout ? 'ink' : 'inkMuted'} testID={`${testID}-readout`} style={styles.readout}>
        {readout
          ? `Layer ${readout.layer} of ${n} · ${fmt(readout.topMm, 2)} mm · ${fmt(readout.areaMm2 / 100, 1)} cm²${
              readout.bedShare != null ? ` · ${fmt(readout.bedShare * 100, 1)} % of the bed` : ''
            }${readout.flagged ? ' · sharp change' : ''}`
          : 'Point at or touch the chart to read a layer.'}
      </Text>
      <View style={styles.row}>
        <View style={[styles.gutter, { height: heightPx }]}>
          {chart?.yTicks.map((t) => (
            <Text key={t.cm2} variant="caption" color="inkMuted" style={[styles.yTick, { top: Math.min(heightPx - 14, Math.max(0, t.y - 7)) }]}>
              {fmt(t.cm2, 2)}
            </Text>
          ))}
        </View>
        <View style={styles.plot} onLayout={onLayout} {...pointerProps} testID={`${testID}-plot`}>
          {chart ? (
            <Svg width={width} height={heightPx}>
              <Rect x={0} y={0} width={width} height={heightPx} fill={colors.powderDeep} />
              {chart.yTicks.map((t) => (
                <Line key={t.cm2} x1={0} x2={width} y1={t.y} y2={t.y} stroke={colors.line} strokeWidth={1} />
              ))}
              <Path d={chart.path} fill={colors.teal} fillOpacity={0.55} stroke={colors.teal} strokeWidth={1} />
              {flagged.map((j) => (
                <Line key={j.layerIndex} x1={chart.layerX(j.layerIndex)} x2={chart.layerX(j.layerIndex)} y1={0} y2={heightPx} stroke={colors.danger} strokeWidth={1.5} strokeOpacity={0.8} />
              ))}
              {cutLayer != null && cutLayer >= 0 && cutLayer <= n ? (
                <Line x1={(cutLayer / n) * width} x2={(cutLayer / n) * width} y1={0} y2={heightPx} stroke={colors.ember} strokeWidth={2} strokeDasharray="4 3" />
              ) : null}
              {readout ? <Line x1={chart.layerX(readout.layer - 1)} x2={chart.layerX(readout.layer - 1)} y1={0} y2={heightPx} stroke={colors.ink} strokeWidth={1} /> : null}
            </Svg>
          ) : (
            <View style={{ height: heightPx }} />
          )}
        </View>
      </View>
      <View style={[styles.xAxis, { marginLeft: GUTTER }]}>
        {chart?.xTicks.map((t, i) => (
          <Text
            key={t.mm}
            variant="caption"
            color="inkMuted"
            style={[styles.xTick, i === 0 ? { left: 0 } : { left: Math.min(width - 36, Math.max(0, t.x - 18)), width: 36, textAlign: 'center' }]}
          >
            {fmt(t.mm, 2)}
          </Text>
        ))}
      </View>
      <View style={[styles.axisTitles, { marginLeft: GUTTER }]}>
        <Text variant="caption" color="inkFaint">cm² per layer (up) · mm above the floor (across)</Text>
        <Text variant="caption" color="inkFaint">
          {n} layers × {layerHeightMm} mm
        </Text>
      </View>
      <Text variant="caption" color={flagged.length > 0 ? 'danger' : 'inkMuted'} testID={`${testID}-jumps`}>
        {flagged.length === 0
          ? 'No sharp area changes between layers.'
          : `${flagged.length} layer${flagged.length === 1 ? '' : 's'} where the area at least doubles or halves from the one below (red): an uneven heat load; first at layer ${flagged[0].layerIndex + 1} (${((flagged[0].layerIndex + 1) * layerHeightMm).toFixed(1)} mm).`}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  readout: { fontFamily: fonts.mono, minHeight: 16 },
  row: { flexDirection: 'row' },
  gutter: { width: GUTTER, position: 'relative' },
  yTick: { position: 'absolute', right: spacing.xs, fontSize: 11, lineHeight: 14 },
  plot: { flex: 1, borderRadius: 4, overflow: 'hidden', cursor: 'crosshair' } as object,
  xAxis: { height: 16, position: 'relative' },
  xTick: { position: 'absolute', top: 0, fontSize: 11, lineHeight: 14 },
  axisTitles: { flexDirection: 'row', justifyContent: 'space-between', flexWrap: 'wrap', gap: spacing.xs },
});
