/**
 * Cross-section area per layer as a filled profile, floor at the left, with
 * the layers whose area jumps sharply from the one below marked: a sudden
 * change of scanned area changes the heat put into the bed, which loads the
 * cake unevenly. Used by the plan editor and the review screen.
 */
import { useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Path, Rect } from 'react-native-svg';
import { findAreaJumps, type AreaJump } from '../../shared/estimate';
import { colors, spacing } from '../theme';
import { Text } from '../ui';

export interface AreaPerLayerChartProps {
  areaPerLayerMm2: ArrayLike<number>;
  layerHeightMm: number;
  /** The jumps to flag; found here with the shared rule when left out. */
  jumps?: readonly AreaJump[];
  /** The bed's area, for the scale (share of the bed); the largest layer when left out. */
  bedAreaMm2?: number;
  /** Layer the view is cut at, drawn as a line. */
  cutLayer?: number | null;
  heightPx?: number;
  testID?: string;
}

/** Largest area in each of `bins` runs of layers: a thin spike stays visible when many layers share a pixel. */
export function binMax(values: ArrayLike<number>, bins: number): Float32Array {
  const n = values.length;
  const count = Math.max(1, Math.min(n, Math.floor(bins)));
  const out = new Float32Array(count);
  for (let i = 0; i < n; i++) {
    const b = Math.min(count - 1, Math.floor((i * count) / n));
    if (values[i] > out[b]) out[b] = values[i];
  }
  return out;
}

export function AreaPerLayerChart({ areaPerLayerMm2, layerHeightMm, jumps, bedAreaMm2, cutLayer, heightPx = 120, testID = 'area-chart' }: AreaPerLayerChartProps) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const n = areaPerLayerMm2.length;
  const flagged = useMemo(() => jumps ?? findAreaJumps(areaPerLayerMm2, { minDeltaMm2: (bedAreaMm2 ?? 0) * 0.02 }), [jumps, areaPerLayerMm2, bedAreaMm2]);

  const chart = useMemo(() => {
    if (width <= 0 || n === 0) return null;
    const bins = binMax(areaPerLayerMm2, width);
    let peak = bedAreaMm2 ?? 0;
    for (const v of bins) peak = Math.max(peak, v);
    if (peak <= 0) peak = 1;
    const h = heightPx;
    const step = width / bins.length;
    let d = `M0 ${h}`;
    bins.forEach((v, i) => {
      const y = h - (v / peak) * (h - 2);
      d += ` L${(i * step).toFixed(1)} ${y.toFixed(1)} L${((i + 1) * step).toFixed(1)} ${y.toFixed(1)}`;
    });
    d += ` L${width} ${h} Z`;
    return { d, peak, x: (layer: number) => ((layer + 0.5) / n) * width };
  }, [width, n, areaPerLayerMm2, bedAreaMm2, heightPx]);

  const peakShare = bedAreaMm2 && chart ? Math.round((Math.max(...Array.from(binMax(areaPerLayerMm2, 256))) / bedAreaMm2) * 100) : null;

  return (
    <View testID={testID} accessibilityLabel={`Cross-section area per layer, ${n} layers, ${flagged.length} sharp changes`}>
      <View style={styles.plot} onLayout={onLayout}>
        {chart ? (
          <Svg width={width} height={heightPx}>
            <Rect x={0} y={0} width={width} height={heightPx} fill={colors.powderDeep} />
            <Path d={chart.d} fill={colors.teal} fillOpacity={0.55} stroke={colors.teal} strokeWidth={1} />
            {flagged.map((j) => (
              <Line key={j.layerIndex} x1={chart.x(j.layerIndex)} x2={chart.x(j.layerIndex)} y1={0} y2={heightPx} stroke={colors.danger} strokeWidth={1.5} strokeOpacity={0.8} />
            ))}
            {cutLayer != null && cutLayer >= 0 && cutLayer <= n ? (
              <Line x1={(cutLayer / n) * width} x2={(cutLayer / n) * width} y1={0} y2={heightPx} stroke={colors.ember} strokeWidth={2} strokeDasharray="4 3" />
            ) : null}
          </Svg>
        ) : (
          <View style={{ height: heightPx }} />
        )}
      </View>
      <View style={styles.axis}>
        <Text variant="caption" color="inkMuted">Floor</Text>
        <Text variant="caption" color="inkMuted">
          {n} layers × {layerHeightMm} mm{peakShare !== null ? ` · peak ${peakShare} % of the bed` : ''}
        </Text>
        <Text variant="caption" color="inkMuted">Top</Text>
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
  plot: { width: '100%', borderRadius: 4, overflow: 'hidden' },
  axis: { flexDirection: 'row', justifyContent: 'space-between', marginTop: spacing.xxs },
});
