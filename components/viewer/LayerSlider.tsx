/**
 * Picks the layer to cut the build at: from the floor (0) to the used
 * height, in whole layers. Drag with a pointer or a finger, or focus it and
 * use the arrow keys (one layer; with Shift ten), Page Up / Page Down (a
 * tenth of the build), Home and End. Shows the layer number and its height
 * in mm.
 *
 * Vertical by default, with the floor at the bottom as in the chamber.
 */
import { useCallback, useRef, useState } from 'react';
import { StyleSheet, Text, View, type GestureResponderEvent, type LayoutChangeEvent, type StyleProp, type ViewStyle } from 'react-native';
import { colors, fonts, radius, spacing, touchTarget, type } from '../theme';
import { layerAtHeight } from './math';

export interface LayerSliderProps {
  /** Top of the range: the build's used height, mm. */
  maxHeightMm: number;
  layerHeightMm: number;
  /** Current cut height, mm. */
  valueMm: number;
  /** Called with a height on a whole layer while dragging and on each key press. */
  onChange: (heightMm: number) => void;
  /** Called when a drag ends (for saving the value, or a heavier update). */
  onChangeEnd?: (heightMm: number) => void;
  orientation?: 'vertical' | 'horizontal';
  style?: StyleProp<ViewStyle>;
  testID?: string;
}

const THUMB = 22;

export function LayerSlider({ maxHeightMm, layerHeightMm, valueMm, onChange, onChangeEnd, orientation = 'vertical', style, testID = 'layer-slider' }: LayerSliderProps) {
  const vertical = orientation === 'vertical';
  const layers = Math.max(0, layerAtHeight(maxHeightMm, layerHeightMm));
  const layer = Math.min(layers, layerAtHeight(valueMm, layerHeightMm));
  const [lengthPx, setLengthPx] = useState(0);
  const last = useRef(layer);
  last.current = layer;

  const toHeight = useCallback((k: number) => Math.min(maxHeightMm, Math.max(0, k * layerHeightMm)), [maxHeightMm, layerHeightMm]);

  const setLayer = useCallback(
    (k: number, end = false) => {
      const clamped = Math.max(0, Math.min(layers, Math.round(k)));
      if (clamped !== last.current) {
        last.current = clamped;
        onChange(toHeight(clamped));
      }
      if (end) onChangeEnd?.(toHeight(clamped));
    },
    [layers, onChange, onChangeEnd, toHeight],
  );

  const fromEvent = (e: GestureResponderEvent) => {
    const usable = Math.max(1, lengthPx - THUMB);
    const along = vertical ? lengthPx - THUMB / 2 - e.nativeEvent.locationY : e.nativeEvent.locationX - THUMB / 2;
    return (Math.max(0, Math.min(usable, along)) / usable) * layers;
  };

  const onKeyDown = (e: { nativeEvent: { key: string; shiftKey?: boolean }; preventDefault?: () => void }) => {
    const { key, shiftKey } = e.nativeEvent;
    const step = shiftKey ? 10 : 1;
    const page = Math.max(1, Math.round(layers / 10));
    const moves: Record<string, number> = {
      ArrowUp: layer + step,
      ArrowRight: layer + step,
      ArrowDown: layer - step,
      ArrowLeft: layer - step,
      PageUp: layer + page,
      PageDown: layer - page,
      Home: 0,
      End: layers,
    };
    if (key in moves) {
      e.preventDefault?.();
      setLayer(moves[key], true);
    }
  };

  const fraction = layers > 0 ? layer / layers : 0;
  const offsetPx = fraction * Math.max(0, lengthPx - THUMB);
  const heightText = `${toHeight(layer).toFixed(2)} mm`;

  // react-native-web forwards onKeyDown and focusable on View; native uses the accessibility actions instead.
  const webKeyProps = { focusable: true, onKeyDown } as unknown as Record<string, unknown>;

  return (
    <View style={[vertical ? styles.columnWrap : styles.rowWrap, style]}>
      <View style={styles.readout} accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
        <Text style={styles.caption}>Layer</Text>
        <Text style={styles.figure} testID={`${testID}-layer`}>
          {layer} / {layers}
        </Text>
        <Text style={styles.figureMuted} testID={`${testID}-height`}>
          {heightText}
        </Text>
      </View>
      <View
        testID={testID}
        accessible
        accessibilityRole="adjustable"
        accessibilityLabel="Cut height"
        accessibilityValue={{ min: 0, max: layers, now: layer, text: `layer ${layer} of ${layers}, ${heightText}` }}
        aria-valuemin={0}
        aria-valuemax={layers}
        aria-valuenow={layer}
        aria-valuetext={`layer ${layer} of ${layers}, ${heightText}`}
        accessibilityActions={[{ name: 'increment' }, { name: 'decrement' }]}
        onAccessibilityAction={(e) => setLayer(layer + (e.nativeEvent.actionName === 'increment' ? 1 : -1), true)}
        {...webKeyProps}
        onLayout={(e: LayoutChangeEvent) => setLengthPx(vertical ? e.nativeEvent.layout.height : e.nativeEvent.layout.width)}
        onStartShouldSetResponder={() => true}
        onMoveShouldSetResponder={() => true}
        onResponderTerminationRequest={() => false}
        onResponderGrant={(e) => setLayer(fromEvent(e))}
        onResponderMove={(e) => setLayer(fromEvent(e))}
        onResponderRelease={(e) => setLayer(fromEvent(e), true)}
        style={[vertical ? styles.hitVertical : styles.hitHorizontal]}
      >
        {/* Children ignore the pointer so every touch lands on the hit area and its location is measured from it. */}
        <View pointerEvents="none" style={vertical ? styles.trackVertical : styles.trackHorizontal} />
        <View
          pointerEvents="none"
          style={[
            vertical ? styles.fillVertical : styles.fillHorizontal,
            vertical ? { height: offsetPx + THUMB / 2 } : { width: offsetPx + THUMB / 2 },
          ]}
        />
        <View pointerEvents="none" style={[styles.thumb, vertical ? { bottom: offsetPx, left: (touchTarget - THUMB) / 2 } : { left: offsetPx, top: (touchTarget - THUMB) / 2 }]} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  columnWrap: { alignItems: 'center', gap: spacing.sm, flex: 1, minHeight: 220 },
  rowWrap: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, width: '100%' },
  readout: { alignItems: 'center', minWidth: 88 },
  caption: { ...type.caption, color: colors.inkMuted },
  figure: { ...type.figure, fontFamily: fonts.mono, color: colors.ink },
  figureMuted: { ...type.caption, fontFamily: fonts.mono, color: colors.inkMuted },
  hitVertical: { width: touchTarget, flex: 1, minHeight: 160, alignItems: 'center', justifyContent: 'flex-end', cursor: 'pointer' } as ViewStyle,
  hitHorizontal: { height: touchTarget, flex: 1, justifyContent: 'center', cursor: 'pointer' } as ViewStyle,
  trackVertical: { position: 'absolute', top: THUMB / 2, bottom: THUMB / 2, left: touchTarget / 2 - 2, width: 4, borderRadius: 2, backgroundColor: colors.line },
  trackHorizontal: { position: 'absolute', left: THUMB / 2, right: THUMB / 2, top: touchTarget / 2 - 2, height: 4, borderRadius: 2, backgroundColor: colors.line },
  fillVertical: { position: 'absolute', bottom: 0, left: touchTarget / 2 - 2, width: 4, borderRadius: 2, backgroundColor: colors.ember },
  fillHorizontal: { position: 'absolute', left: 0, top: touchTarget / 2 - 2, height: 4, borderRadius: 2, backgroundColor: colors.ember },
  thumb: {
    position: 'absolute',
    width: THUMB,
    height: THUMB,
    borderRadius: radius.pill,
    backgroundColor: colors.surface,
    borderWidth: 3,
    borderColor: colors.ember,
  },
});
