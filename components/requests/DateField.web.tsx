import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, fonts, radius, spacing, touchTarget } from '../theme';
import { Button, Text } from '../ui';
import type { DateFieldProps } from './DateField';
import { addDaysIso, daysUntil, todayIso } from './labels';

export type { DateFieldProps } from './DateField';

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;
const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const DAYS = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];

/** "Wednesday 16 December 2026 · in 14 days": the month spelled out, so no reader mixes up day and month. */
export function spelledDate(iso: string): string | null {
  if (!ISO_DATE.test(iso)) return null;
  const [y, m, d] = iso.split('-').map(Number);
  const date = new Date(y, m - 1, d);
  if (date.getFullYear() !== y || date.getMonth() !== m - 1 || date.getDate() !== d) return null;
  const n = daysUntil(iso);
  const when = n === 0 ? 'today' : n === 1 ? 'tomorrow' : n > 0 ? `in ${n} days` : `${-n} days ago`;
  return `${DAYS[date.getDay()]} ${d} ${MONTHS[m - 1]} ${y} · ${when}`;
}

/**
 * A date typed as YYYY-MM-DD, the format every other screen shows, with the
 * date spelled out under it and a calendar button. The browser's own date
 * input would show its locale's order (12/16/2026 in one, 16.12.2026 in
 * another), so it is only used, hidden, for its calendar.
 */
export function DateField({ label, value, onChange, error, testID, min }: DateFieldProps) {
  const [focused, setFocused] = useState(false);
  const picker = useRef<HTMLInputElement>(null);
  const spelled = spelledDate(value);
  const openCalendar = () => {
    const el = picker.current;
    if (!el) return;
    try {
      el.showPicker();
    } catch {
      el.focus();
    }
  };
  return (
    <View style={styles.field}>
      <Text variant="label" color="inkMuted">
        {`${label} (YYYY-MM-DD)`}
      </Text>
      <View style={styles.row}>
        <input
          type="text"
          inputMode="numeric"
          placeholder="YYYY-MM-DD"
          maxLength={10}
          data-testid={testID}
          aria-label={`${label}, year-month-day`}
          aria-invalid={!!error}
          value={value}
          onChange={(e) => onChange(e.currentTarget.value)}
          onFocus={() => setFocused(true)}
          onBlur={() => setFocused(false)}
          style={{
            minHeight: touchTarget,
            boxSizing: 'border-box',
            flex: 1,
            minWidth: 0,
            borderStyle: 'solid',
            borderWidth: focused ? 2 : 1,
            borderColor: error ? colors.danger : focused ? colors.ember : colors.lineStrong,
            borderRadius: radius.md,
            backgroundColor: error ? colors.dangerSoft : colors.surface,
            paddingLeft: focused ? spacing.md - 1 : spacing.md,
            paddingRight: spacing.md,
            fontFamily: fonts.mono,
            fontSize: 15,
            color: colors.ink,
            outline: 'none',
          }}
        />
        <Button label="Calendar" variant="secondary" size="sm" onPress={openCalendar} testID={testID ? `${testID}-calendar` : undefined} />
        <input
          ref={picker}
          type="date"
          tabIndex={-1}
          aria-hidden
          value={ISO_DATE.test(value) ? value : ''}
          min={min}
          onChange={(e) => e.currentTarget.value && onChange(e.currentTarget.value)}
          style={{ position: 'absolute', right: 0, bottom: 0, width: 1, height: 1, opacity: 0, border: 0, padding: 0 }}
        />
      </View>
      <Text variant="caption" color="inkMuted" testID={testID ? `${testID}-spelled` : undefined}>
        {spelled ?? (value ? 'Not a date yet: year, month, day, as 2027-03-01.' : `For example ${addDaysIso(todayIso(), 14)}.`)}
      </Text>
      {error ? (
        <Text variant="caption" color="danger" testID={testID ? `${testID}-error` : undefined} accessibilityRole="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  field: { gap: spacing.xs },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, position: 'relative' },
});
