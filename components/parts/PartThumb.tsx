import { Image, StyleSheet, View } from 'react-native';
import { baseUrl } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import type { Part } from '../queries/parts';
import { colors, radius } from '../theme';

/**
 * The part's picture, drawn by the server from its mesh as stored. The turn
 * is in the address, so a turned part's new picture is asked for at once.
 */
export function PartThumb({ part, size = 48 }: { part: Pick<Part, 'id' | 'name' | 'rotationDeg'>; size?: number }) {
  const lab = useLab();
  const uri = `${baseUrl}/api/labs/${lab.id}/parts/${part.id}/thumbnail.png?turn=${part.rotationDeg.join(',')}`;
  return (
    <View style={[styles.tile, { width: size, height: size }]}>
      <Image
        source={{ uri, width: size, height: size }}
        style={{ width: size, height: size }}
        accessibilityLabel={`Picture of ${part.name}`}
        testID={`part-thumb-${part.id}`}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  tile: { borderRadius: radius.md, backgroundColor: colors.powderDeep, overflow: 'hidden' },
});
