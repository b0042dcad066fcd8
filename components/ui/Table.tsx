import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radius, spacing, touchTarget, useContentWidth } from '../theme';
import { Text } from './Text';

export type Column<Row> = {
  key: string;
  title: string;
  /** Relative width on wide screens. */
  flex?: number;
  /** A fixed width in px instead of a flex share. */
  width?: number;
  align?: 'left' | 'right';
  /** Set the value in the monospaced face (numbers, sizes). */
  mono?: boolean;
  /** Plain text of the cell; ignored when render is given. */
  value?: (row: Row) => string;
  render?: (row: Row) => React.ReactNode;
};

export type TableProps<Row> = {
  columns: Column<Row>[];
  rows: Row[];
  rowKey: (row: Row) => string;
  onRowPress?: (row: Row) => void;
  /** testID of each row, e.g. (r) => `machine-row-${r.id}`. */
  rowTestID?: (row: Row) => string;
  testID?: string;
  /**
   * Below this width of the page's content (useContentWidth) rows become stacked cards (label above value); also
   * below the width the columns need (tableWidthNeeded).
   */
  stackBelow?: number;
  empty?: React.ReactNode;
};

/** Room a flex column needs per unit of its flex share, so that a name or a date still reads in it. */
const PX_PER_FLEX = 70;

/**
 * The width a table's columns need: the fixed ones' widths, PX_PER_FLEX per unit of the others' flex shares, and the
 * rows' padding and border. Under it the fixed columns would squeeze the flexible ones to nothing (a requests table
 * of 826 px of fixed columns on a 788 px tablet page showed its request and material columns a letter wide).
 */
export function tableWidthNeeded(columns: ReadonlyArray<Pick<Column<unknown>, 'width' | 'flex'>>): number {
  return 2 * spacing.sm + 2 + columns.reduce((sum, c) => sum + (c.width ?? (c.flex ?? 1) * PX_PER_FLEX), 0);
}

/**
 * Dense rows on a wide screen; on a phone, or wherever the columns do not fit, each row becomes a card with its
 * labels, so nothing scrolls sideways or is squeezed.
 */
export function Table<Row>({ columns, rows, rowKey, onRowPress, rowTestID, testID, stackBelow = 760, empty }: TableProps<Row>) {
  const stacked = useContentWidth() < Math.max(stackBelow, tableWidthNeeded(columns));
  if (rows.length === 0 && empty) return <View testID={testID}>{empty}</View>;

  const cell = (col: Column<Row>, row: Row) =>
    col.render ? (
      col.render(row)
    ) : (
      <Text variant={col.mono ? 'figure' : 'body'} align={stacked ? 'left' : col.align} numberOfLines={stacked ? undefined : 2}>
        {col.value?.(row) ?? ''}
      </Text>
    );

  if (stacked) {
    return (
      <View testID={testID} style={styles.cards} accessibilityRole="list">
        {rows.map((row) => {
          const [first, ...restCols] = columns;
          const content = (
            <>
              <View style={styles.cardTitle}>{cell(first, row)}</View>
              <View style={styles.cardGrid}>
                {restCols.map((col) => (
                  <View key={col.key} style={styles.cardItem}>
                    <Text variant="overline" color="inkFaint">
                      {col.title}
                    </Text>
                    {cell(col, row)}
                  </View>
                ))}
              </View>
            </>
          );
          return onRowPress ? (
            <Pressable
              key={rowKey(row)}
              testID={rowTestID?.(row)}
              accessibilityRole="button"
              onPress={() => onRowPress(row)}
              style={({ pressed }) => [styles.card, pressed && styles.pressed]}
            >
              {content}
            </Pressable>
          ) : (
            <View key={rowKey(row)} testID={rowTestID?.(row)} style={styles.card}>
              {content}
            </View>
          );
        })}
      </View>
    );
  }

  const colStyle = (col: Column<Row>) => [
    col.width ? { width: col.width } : { flex: col.flex ?? 1 },
    col.align === 'right' ? styles.right : null,
  ];

  return (
    <View testID={testID} style={styles.table} accessibilityRole="list">
      <View style={[styles.row, styles.headRow]} testID={testID ? `${testID}-head` : undefined}>
        {columns.map((col) => (
          <View key={col.key} style={[styles.cell, colStyle(col)]}>
            <Text variant="overline" color="inkMuted" align={col.align}>
              {col.title}
            </Text>
          </View>
        ))}
      </View>
      {rows.map((row, i) => {
        const cells = columns.map((col) => (
          <View key={col.key} style={[styles.cell, colStyle(col)]}>
            {cell(col, row)}
          </View>
        ));
        const rowStyle = [styles.row, i % 2 === 1 && styles.zebra, i === rows.length - 1 && styles.lastRow];
        return onRowPress ? (
          <Pressable
            key={rowKey(row)}
            testID={rowTestID?.(row)}
            accessibilityRole="button"
            onPress={() => onRowPress(row)}
            style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [rowStyle, (pressed || hovered) && styles.hover]}
          >
            {cells}
          </Pressable>
        ) : (
          <View key={rowKey(row)} testID={rowTestID?.(row)} style={rowStyle}>
            {cells}
          </View>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.lg, backgroundColor: colors.surface, overflow: 'hidden' },
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    minHeight: 44,
    paddingHorizontal: spacing.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.line,
  },
  headRow: { minHeight: 36, backgroundColor: colors.powderDeep },
  zebra: { backgroundColor: '#FBF7F1' },
  lastRow: { borderBottomWidth: 0 },
  hover: { backgroundColor: colors.emberSoft },
  cell: { paddingHorizontal: spacing.sm, paddingVertical: spacing.sm, justifyContent: 'center' },
  right: { alignItems: 'flex-end' },
  cards: { gap: spacing.sm },
  card: {
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.lg,
    padding: spacing.lg,
    gap: spacing.md,
    minHeight: touchTarget,
  },
  pressed: { backgroundColor: colors.emberSoft },
  cardTitle: {},
  cardGrid: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.xl },
  cardItem: { gap: spacing.xxs, minWidth: 120, maxWidth: '100%', flexShrink: 1 },
});
