import { useState } from 'react';
import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { colors, radius, spacing, type ColorName } from '../theme';
import { Text } from './Text';
import { Button } from './Button';

type Tone = 'danger' | 'info' | 'caution' | 'success';
const tones: Record<Tone, { bg: ColorName; bar: ColorName; fg: ColorName }> = {
  danger: { bg: 'dangerSoft', bar: 'danger', fg: 'danger' },
  info: { bg: 'powderDeep', bar: 'inkFaint', fg: 'ink' },
  caution: { bg: 'amberSoft', bar: 'amber', fg: 'ink' },
  success: { bg: 'tealSoft', bar: 'teal', fg: 'ink' },
};

/**
 * A message block with a coloured edge: errors, cautions, confirmations.
 * `folded` (a notice with a title, where room is short: the phone's plan
 * editor) shows the title and a button that opens the rest.
 */
export function Notice({ tone = 'info', title, children, testID, folded = false }: { tone?: Tone; title?: string; children?: React.ReactNode; testID?: string; folded?: boolean }) {
  const t = tones[tone];
  const [open, setOpen] = useState(false);
  const foldable = folded && !!title;
  const titleText = title ? (
    <Text variant="bodyStrong" color={t.fg} style={foldable ? styles.foldTitle : undefined}>
      {title}
    </Text>
  ) : null;
  return (
    <View
      testID={testID}
      accessibilityRole={tone === 'danger' ? 'alert' : undefined}
      style={[styles.notice, { backgroundColor: colors[t.bg], borderLeftColor: colors[t.bar] }]}
    >
      {foldable ? (
        <View style={styles.foldHead}>
          {titleText}
          <Button
            label={open ? 'Hide' : 'Details'}
            variant="ghost"
            size="sm"
            onPress={() => setOpen(!open)}
            aria-expanded={open}
            testID={testID ? `${testID}-toggle` : undefined}
          />
        </View>
      ) : (
        titleText
      )}
      {foldable && !open ? null : typeof children === 'string' ? <Text variant="body">{children}</Text> : children}
    </View>
  );
}

export function LoadingState({ label = 'Loading…' }: { label?: string }) {
  return (
    <View style={styles.loading} accessibilityRole="progressbar" accessibilityLabel={label}>
      <ActivityIndicator color={colors.ember} />
      <Text variant="label" color="inkMuted">
        {label}
      </Text>
    </View>
  );
}

export function ErrorState({ error, onRetry }: { error: { message: string }; onRetry?: () => void }) {
  return (
    <Notice tone="danger" title="This could not be loaded">
      <Text variant="body">{error.message}</Text>
      {onRetry ? <Button label="Try again" variant="secondary" size="sm" onPress={onRetry} /> : null}
    </Notice>
  );
}

const styles = StyleSheet.create({
  notice: { borderLeftWidth: 4, borderRadius: radius.md, padding: spacing.md, gap: spacing.sm },
  foldHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  foldTitle: { flex: 1 },
  loading: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, padding: spacing.lg },
});
