/**
 * Native stand-in for the 3D preview: the app does not ship a WebGL view on
 * phones, so it says so and shows the measured box instead of an empty frame.
 */
import { StyleSheet, Text, View, type StyleProp, type ViewStyle } from 'react-native';
import { colors, fonts, radius, spacing, type } from '../theme';
import { boundsOf, formatMm, sizeOf, type Vec3 } from './math';

export interface PartPreviewProps {
  mesh: { positions: Float32Array; indices: Uint32Array };
  sizeMm?: Vec3;
  upAxis?: 'z';
  style?: StyleProp<ViewStyle>;
  accessibilityLabel?: string;
}

export function PartPreview({ mesh, sizeMm, style }: PartPreviewProps) {
  const size = sizeMm ?? sizeOf(boundsOf(mesh.positions));
  return (
    <View style={[styles.frame, style]} testID="part-preview">
      <Text style={styles.note}>The 3D preview opens in the web app. Measured bounding box:</Text>
      {(['x', 'y', 'z'] as const).map((axis, i) => (
        <View key={axis} style={styles.row}>
          <Text style={styles.axis}>{axis}</Text>
          <Text style={styles.figure}>{formatMm(size[i])}</Text>
        </View>
      ))}
      <Text style={styles.note}>Build direction: +z (the file&apos;s z axis points up in the chamber).</Text>
      <Text style={styles.note}>{(mesh.indices.length / 3).toLocaleString()} triangles</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  frame: { padding: spacing.lg, gap: spacing.sm, borderRadius: radius.md, backgroundColor: colors.powderDeep },
  row: { flexDirection: 'row', gap: spacing.md, alignItems: 'baseline' },
  axis: { ...type.label, color: colors.inkMuted, width: 16 },
  figure: { ...type.figure, fontFamily: fonts.mono, color: colors.ink },
  note: { ...type.caption, color: colors.inkMuted },
});
