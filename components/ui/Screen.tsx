import { ScrollView, StyleSheet, View } from 'react-native';
import { colors, pageMaxWidth, spacing, useIsWide } from '../theme';
import { Text } from './Text';

export type ScreenProps = {
  title: string;
  subtitle?: string;
  /** Buttons at the right of the title. */
  actions?: React.ReactNode;
  /** Optional row above the title (back link, breadcrumbs). */
  above?: React.ReactNode;
  children?: React.ReactNode;
  testID?: string;
  /** Content width cap on wide screens (px). */
  maxWidth?: number;
};

/** A scrolling screen with its title block; wide screens get more air and a width cap. */
export function Screen({ title, subtitle, actions, above, children, testID, maxWidth = pageMaxWidth }: ScreenProps) {
  const wide = useIsWide();
  return (
    <ScrollView
      testID={testID}
      style={styles.scroll}
      contentContainerStyle={[styles.content, wide ? styles.contentWide : styles.contentNarrow]}
      keyboardShouldPersistTaps="handled"
    >
      <View style={[styles.column, { maxWidth }]}>
        {above}
        <View style={styles.header}>
          <View style={styles.titles}>
            <Text variant={wide ? 'display' : 'title'} accessibilityRole="header">
              {title}
            </Text>
            {subtitle ? (
              <Text variant="body" color="inkMuted">
                {subtitle}
              </Text>
            ) : null}
          </View>
          {actions ? <View style={styles.actions}>{actions}</View> : null}
        </View>
        {children}
      </View>
    </ScrollView>
  );
}

/** Vertical rhythm between blocks of a screen. */
export function Stack({ gap = spacing.lg, children, style }: { gap?: number; children: React.ReactNode; style?: object }) {
  return <View style={[{ gap }, style]}>{children}</View>;
}

/** Items side by side that wrap on a narrow screen. */
export function Row({ gap = spacing.md, children, style }: { gap?: number; children: React.ReactNode; style?: object }) {
  return <View style={[{ flexDirection: 'row', flexWrap: 'wrap', gap, alignItems: 'flex-start' }, style]}>{children}</View>;
}

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: colors.powder },
  content: { flexGrow: 1, alignItems: 'stretch' },
  contentNarrow: { padding: spacing.lg, paddingBottom: spacing.xxxl },
  contentWide: { paddingHorizontal: spacing.xxxl, paddingVertical: spacing.xxl },
  column: { width: '100%', alignSelf: 'center', gap: spacing.xl },
  header: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-end', justifyContent: 'space-between', gap: spacing.md },
  titles: { flexShrink: 1, flexGrow: 1, flexBasis: 280, gap: spacing.xs },
  actions: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' },
});
