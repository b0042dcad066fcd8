import { useMemo, useState } from 'react';
import { StyleSheet, View, type GestureResponderEvent, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Path, Text as SvgText } from 'react-native-svg';
import { format } from 'date-fns';
import { colors, fonts, spacing } from '../theme';
import { Figure, Text } from '../ui';
import { chartScale, readoutAt, stepPath, type StockSeriesInput } from './chartModel';

const LEFT = 44;
const BOTTOM = 22;
/** Room above the plot for the top tick's label and the unit. */
const TOP = 18;
const kg = (v: number | null) => (v === null ? '–' : `${v.toFixed(1)} kg`);

/**
 * Stock over time: fresh (ember) and reused (teal) from the ledger, then the
 * fresh stock forecast from the queue (dashed) with the reorder level. Touch
 * or point at the chart to read the values at that moment.
 */
export function StockChart({ series, heightPx = 200, testID = 'stock-chart' }: { series: StockSeriesInput; heightPx?: number; testID?: string }) {
  const [width, setWidth] = useState(0);
  const [atMs, setAtMs] = useState<number | null>(null);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.round(e.nativeEvent.layout.width));
  const plotW = Math.max(0, width - LEFT - 8);
  const plotH = heightPx - BOTTOM - TOP;
  const yAt = (kgValue: number) => TOP + scale.y(kgValue, plotH);
  const scale = useMemo(() => chartScale(series), [series]);
  const paths = useMemo(() => {
    if (plotW <= 0) return null;
    const hist = series.history;
    const fresh = stepPath(hist.map((p) => ({ atMs: p.atMs, kg: p.freshKg })), scale, plotW, plotH, series.nowMs);
    const reused = stepPath(hist.map((p) => ({ atMs: p.atMs, kg: p.reusedKg })), scale, plotW, plotH, series.nowMs);
    const ahead = stepPath(series.forecast.map((p) => ({ atMs: p.atMs, kg: p.stockKg })), scale, plotW, plotH, scale.t1);
    return { fresh, reused, ahead };
  }, [series, scale, plotW, plotH]);

  const pick = (e: GestureResponderEvent) => {
    if (plotW <= 0) return;
    const x = Math.min(plotW, Math.max(0, e.nativeEvent.locationX - LEFT));
    setAtMs(scale.t0 + (x / plotW) * (scale.t1 - scale.t0));
  };
  const shownAt = atMs ?? series.nowMs;
  const r = readoutAt(series, shownAt);
  const future = shownAt > series.nowMs;

  return (
    <View style={styles.root} testID={testID}>
      <View
        onLayout={onLayout}
        style={{ height: heightPx }}
        onStartShouldSetResponder={() => true}
        onResponderGrant={pick}
        onResponderMove={pick}
        // Pointer hover on the web reads like a touch.
        {...({ onMouseMove: (e: { nativeEvent: { offsetX?: number; locationX?: number } }) => pick({ nativeEvent: { locationX: e.nativeEvent.offsetX ?? e.nativeEvent.locationX ?? 0 } } as GestureResponderEvent) } as object)}
        accessibilityRole="image"
        accessibilityLabel={`Stock over time. Now: fresh ${kg(readoutAt(series, series.nowMs).freshKg)}, reused ${kg(readoutAt(series, series.nowMs).reusedKg)}.`}
      >
        {paths ? (
          <Svg width={width} height={heightPx}>
            {scale.yTicks.map((v) => (
              <Line key={`y${v}`} x1={LEFT} x2={LEFT + plotW} y1={yAt(v)} y2={yAt(v)} stroke={colors.line} strokeWidth={1} />
            ))}
            {scale.yTicks.map((v) => (
              <SvgText key={`yl${v}`} x={LEFT - 6} y={yAt(v) + 4} fontSize={10} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="end">
                {String(v)}
              </SvgText>
            ))}
            {scale.xTicks.map((t) => (
              <SvgText key={`x${t}`} x={LEFT + scale.x(t, plotW)} y={heightPx - 6} fontSize={10} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="middle">
                {format(t, 'd MMM')}
              </SvgText>
            ))}
            <Line x1={LEFT} x2={LEFT} y1={TOP} y2={TOP + plotH} stroke={colors.lineStrong} />
            <Line x1={LEFT} x2={LEFT + plotW} y1={TOP + plotH} y2={TOP + plotH} stroke={colors.lineStrong} />
            {series.reorderLevelKg > 0 ? (
              <Line x1={LEFT} x2={LEFT + plotW} y1={yAt(series.reorderLevelKg)} y2={yAt(series.reorderLevelKg)} stroke={colors.danger} strokeDasharray="2 4" />
            ) : null}
            <Line x1={LEFT + scale.x(series.nowMs, plotW)} x2={LEFT + scale.x(series.nowMs, plotW)} y1={TOP} y2={TOP + plotH} stroke={colors.inkFaint} strokeDasharray="3 3" />
            <Path d={paths.reused} transform={`translate(${LEFT} ${TOP})`} stroke={colors.teal} strokeWidth={2} fill="none" />
            <Path d={paths.fresh} transform={`translate(${LEFT} ${TOP})`} stroke={colors.ember} strokeWidth={2.2} fill="none" />
            <Path d={paths.ahead} transform={`translate(${LEFT} ${TOP})`} stroke={colors.ember} strokeWidth={2} strokeDasharray="6 4" fill="none" />
            <Line x1={LEFT + scale.x(shownAt, plotW)} x2={LEFT + scale.x(shownAt, plotW)} y1={TOP} y2={TOP + plotH} stroke={colors.ink} strokeWidth={1} />
            <SvgText x={LEFT - 6} y={10} fontSize={10} fontFamily={fonts.mono} fill={colors.inkMuted} textAnchor="end">
              kg
            </SvgText>
          </Svg>
        ) : null}
      </View>
      <View style={styles.readout} testID={`${testID}-readout`}>
        <Text variant="label">{format(shownAt, 'd MMM yyyy, HH:mm')}</Text>
        {future ? (
          <Figure variant="figure" color="ember">{`Fresh, forecast: ${kg(r.forecastKg)}${r.label ? ` after “${r.label}”` : ''}`}</Figure>
        ) : (
          <>
            <Figure variant="figure" color="ember">{`Fresh ${kg(r.freshKg)}`}</Figure>
            <Figure variant="figure" color="teal">{`Reused ${kg(r.reusedKg)}`}</Figure>
          </>
        )}
      </View>
      <View style={styles.legend}>
        <Text variant="caption" color="inkMuted">
          ━ fresh ━ reused (teal) ┅ fresh forecast from the queue ┄ reorder level (red)
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  root: { gap: spacing.xs },
  readout: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md, alignItems: 'baseline' },
  legend: { flexDirection: 'row', flexWrap: 'wrap' },
});
