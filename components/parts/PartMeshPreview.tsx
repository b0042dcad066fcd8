import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Part } from '../queries/parts';
import { partFileUrl } from '../queries/parts';
import { colors, radius, spacing } from '../theme';
import { Button, LoadingState, Notice, Text } from '../ui';
import { PartPreview, useMeshFile } from '../viewer';
import { rotatePositions, type Rotation } from './rotation';

/**
 * The stored file drawn in 3D, turned by the rotation being edited. A 3MF
 * split into several parts is read whole first, then the part at this row's
 * index is asked for by its name in the file.
 */
export function PartMeshPreview({ labId, part, rotationDeg, sizeMm }: { labId: string; part: Part; rotationDeg: Rotation; sizeMm: [number, number, number] }) {
  const url = partFileUrl(labId, part.id);
  const options = { unit: part.file.unit, filename: part.file.name };
  const whole = useMeshFile(url, options);
  const names = whole.mesh?.partNames ?? [];
  const pickOne = part.file.format === '3mf' && part.file.split && names.length > 1;
  const one = useMeshFile(pickOne ? url : null, { ...options, partName: names[part.file.partIndex] });
  const state = pickOne ? one : whole;

  const mesh = useMemo(
    () => (state.mesh ? { positions: rotatePositions(state.mesh.positions, rotationDeg), indices: state.mesh.indices } : null),
    [state.mesh, rotationDeg],
  );

  if (whole.status === 'error' || state.status === 'error') {
    const failed = whole.status === 'error' ? whole : state;
    return (
      <View style={styles.frame} testID="part-preview-error">
        <Notice tone="danger" title="The 3D preview could not be shown">
          <Text variant="body">{failed.error?.message}</Text>
          <Text variant="caption" color="inkMuted">
            The measurements below come from the server and stay valid.
          </Text>
          <Button label="Try again" variant="secondary" size="sm" onPress={failed.retry} />
        </Notice>
      </View>
    );
  }
  if (!mesh) {
    return (
      <View style={[styles.frame, styles.loading]} testID="part-preview-loading">
        <LoadingState label={`Reading ${part.file.name}…`} />
      </View>
    );
  }
  return (
    <PartPreview
      mesh={mesh}
      sizeMm={sizeMm}
      accessibilityLabel={`3D preview of ${part.name}`}
      style={styles.preview}
    />
  );
}

const styles = StyleSheet.create({
  frame: { width: '100%', minHeight: 280, borderRadius: radius.md, backgroundColor: colors.powderDeep, padding: spacing.md, justifyContent: 'center' },
  loading: { alignItems: 'center' },
  preview: { maxHeight: 520 },
});
