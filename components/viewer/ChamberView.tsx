/**
 * Native stand-in for the chamber view: no WebGL view ships on phones, so it
 * says so and gives the figures a planner checks at a glance, including the
 * section at the cut (computed with the same maths as the 3D view).
 */
import { forwardRef, useImperativeHandle, useMemo, useState } from 'react';
import { StyleSheet, Text, View } from 'react-native';
import { colors, fonts, radius, spacing, type } from '../theme';
import { footprintAreaMm2, formatMm, groupByPart, spanningAt } from './math';
import type { ChamberViewHandle, ChamberViewProps } from './types';

export type { ChamberViewHandle, ChamberViewProps };

export const ChamberView = forwardRef<ChamberViewHandle, ChamberViewProps>(function ChamberView({ chamberMm, placements, cutHeightMm, style }, ref) {
  const [cut, setCut] = useState<number | null>(null);
  useImperativeHandle(ref, () => ({ setView: () => undefined, setFrame: () => undefined, toggleFrame: () => undefined, setCutHeight: setCut }));
  const height = cut ?? cutHeightMm ?? null;
  const n = placements.partIndex.length;
  const parts = useMemo(() => groupByPart(placements.partIndex).parts.length, [placements.partIndex]);
  let topMm = 0;
  for (let i = 0; i < n; i++) topMm = Math.max(topMm, placements.positions[3 * i + 2] + placements.sizes[3 * i + 2]);
  const section = height !== null ? spanningAt(placements.positions, placements.sizes, height) : null;
  return (
    <View style={[styles.frame, style]} testID="chamber-view">
      <Text style={styles.note}>The 3D chamber view opens in the web app. This build:</Text>
      <Row label="Chamber" value={`${formatMm(chamberMm[0])} × ${formatMm(chamberMm[1])} × ${formatMm(chamberMm[2])}`} />
      <Row label="Placements" value={`${n.toLocaleString()} of ${parts} parts`} />
      <Row label="Used height" value={formatMm(topMm)} />
      {section ? <Row label={`Section at ${formatMm(height as number)}`} value={`${section.length} parts, ${Math.round(footprintAreaMm2(placements.sizes, section)).toLocaleString()} mm² of boxes`} /> : null}
    </View>
  );
});

function Row({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.row}>
      <Text style={styles.label}>{label}</Text>
      <Text style={styles.figure}>{value}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  frame: { padding: spacing.lg, gap: spacing.sm, borderRadius: radius.md, backgroundColor: colors.powderDeep },
  row: { flexDirection: 'row', justifyContent: 'space-between', gap: spacing.md },
  label: { ...type.label, color: colors.inkMuted },
  figure: { ...type.figure, fontFamily: fonts.mono, color: colors.ink },
  note: { ...type.caption, color: colors.inkMuted },
});
