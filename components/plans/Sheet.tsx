import { Modal, Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Text } from '../ui';

/** A modal card over the editor; a press outside or Escape (through the editor's shortcuts) closes it. */
export function Sheet({ title, open, onClose, children, testID, dismissable = true }: { title: string; open: boolean; onClose: () => void; children: React.ReactNode; testID?: string; dismissable?: boolean }) {
  if (!open) return null;
  return (
    <Modal transparent visible animationType="fade" onRequestClose={onClose}>
      <Pressable style={styles.backdrop} onPress={dismissable ? onClose : undefined} accessibilityLabel="Close" accessibilityRole="button">
        <Pressable style={styles.card} onPress={() => undefined} testID={testID} accessibilityRole="alert" accessibilityLabel={title}>
          <Text variant="heading" accessibilityRole="header">{title}</Text>
          <ScrollView style={styles.body} contentContainerStyle={{ gap: spacing.md }}>{children}</ScrollView>
        </Pressable>
      </Pressable>
    </Modal>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, backgroundColor: 'rgba(36,33,30,0.45)', alignItems: 'center', justifyContent: 'center', padding: spacing.lg },
  card: { backgroundColor: colors.surface, borderRadius: radius.lg, padding: spacing.xl, gap: spacing.md, width: '100%', maxWidth: 560, maxHeight: '90%' },
  body: { flexGrow: 0 },
});

export function SheetActions({ children }: { children: React.ReactNode }) {
  return <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, justifyContent: 'flex-end' }}>{children}</View>;
}
