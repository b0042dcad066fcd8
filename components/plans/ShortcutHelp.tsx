import { StyleSheet, View } from 'react-native';
import { colors, fonts, radius, spacing } from '../theme';
import { Button, Text } from '../ui';
import { SHORTCUTS } from './shortcuts';
import { Sheet, SheetActions } from './Sheet';

/** The editor's keyboard shortcuts; opened with ? or the Shortcuts button. */
export function ShortcutHelp({ open, onClose }: { open: boolean; onClose: () => void }) {
  return (
    <Sheet title="Keyboard shortcuts" open={open} onClose={onClose} testID="shortcut-help">
      <Text variant="caption" color="inkMuted">They work anywhere in the editor except while typing in a field (Ctrl S and Esc work there too).</Text>
      <View style={styles.table}>
        {SHORTCUTS.map((s) => (
          <View key={s.action} style={styles.row}>
            <View style={styles.keys}>
              {s.keys.map((k) => (
                <Text key={k} style={styles.key}>{k}</Text>
              ))}
            </View>
            <Text variant="body" style={styles.label}>{s.label}</Text>
          </View>
        ))}
      </View>
      <SheetActions>
        <Button label="Close" variant="secondary" onPress={onClose} testID="shortcut-help-close" />
      </SheetActions>
    </Sheet>
  );
}

const styles = StyleSheet.create({
  table: { gap: spacing.xs },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.md },
  keys: { flexDirection: 'row', gap: spacing.xs, width: 120 },
  key: {
    fontFamily: fonts.monoMedium,
    fontSize: 13,
    paddingHorizontal: spacing.sm,
    paddingVertical: 2,
    borderRadius: radius.sm,
    borderWidth: 1,
    borderColor: colors.lineStrong,
    backgroundColor: colors.powder,
    color: colors.ink,
  },
  label: { flex: 1 },
});
