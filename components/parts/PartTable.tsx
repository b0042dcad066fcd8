import { Pressable, StyleSheet, View } from 'react-native';
import type { Part } from '../queries/parts';
import { colors, radius, spacing, touchTarget } from '../theme';
import { Badge, LinkPressable, Text } from '../ui';
import { formatDate } from '../ui/format';
import { formatCount, formatVolume } from './format';
import { warningLabel } from './warnings';
import { PartThumb } from './PartThumb';
import { formatNumber } from '../ui/format';

/**
 * Below this width of the page's content the rows become cards: the table's fixed columns take 500 px, and under
 * 880 the name (with its picture and tags) is left too little to read.
 */
export const PART_CARDS_BELOW = 880;

type SortKey = 'name' | 'sizeX' | 'sizeY' | 'sizeZ' | 'volume' | 'material' | 'timesUsed' | 'uploadedBy' | 'createdAt';

/** "-createdAt" -> { key: "createdAt", desc: true }. */
export function parseSort(sort: string): { key: string; desc: boolean } {
  return sort.startsWith('-') ? { key: sort.slice(1), desc: true } : { key: sort, desc: false };
}

/** A click on the sorted column reverses it; on another column sorts by it (names A-Z, numbers and dates largest first). */
export function nextSort(current: string, key: SortKey): string {
  const { key: k, desc } = parseSort(current);
  if (k === key) return desc ? key : `-${key}`;
  return key === 'name' || key === 'material' || key === 'uploadedBy' ? key : `-${key}`;
}

/** The library's rows; `cards`: the page is narrower than PART_CARDS_BELOW (the library chooses, with its sort control). */
export function PartTable({ parts, cards, sort, onSort }: { parts: Part[]; cards: boolean; sort: string; onSort: (sort: string) => void }) {
  if (cards) {
    return (
      <View style={styles.cards} accessibilityRole="list" testID="parts-table">
        {parts.map((p) => (
          <LinkPressable key={p.id} href={`/parts/${p.id}`} testID={`part-row-${p.id}`} style={({ pressed }) => [styles.card, pressed && styles.pressed]}>
            <NameCell part={p} thumb={64} />
            <View style={styles.cardGrid}>
              <CardItem label="Size mm">
                <Text variant="figure">{p.sizeMm.map((v) => formatNumber(v, 1)).join(' × ')}</Text>
              </CardItem>
              <CardItem label="Volume">
                <Text variant="figure">{formatVolume(p.volumeMm3)}</Text>
              </CardItem>
              <CardItem label="Material">
                <Text variant="body">{p.materialName ?? '–'}</Text>
              </CardItem>
              <CardItem label="Used">
                <Text variant="figure">{formatCount(p.timesUsed)}</Text>
              </CardItem>
              <CardItem label="Uploaded">
                <Text variant="body">
                  {p.uploadedBy?.name ?? '–'}, {formatDate(p.createdAt)}
                </Text>
              </CardItem>
            </View>
          </LinkPressable>
        ))}
      </View>
    );
  }

  const s = parseSort(sort);
  const head = (key: SortKey, title: string, align?: 'right') => {
    const on = s.key === key;
    return (
      <Pressable
        key={key}
        testID={`parts-sort-${key}`}
        accessibilityRole="button"
        accessibilityLabel={`Sort by ${title}${on ? (s.desc ? ', now descending' : ', now ascending') : ''}`}
        onPress={() => onSort(nextSort(sort, key))}
        style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [styles.headButton, align === 'right' && styles.right, (pressed || hovered) && styles.headHover]}
      >
        <Text variant="overline" color={on ? 'ember' : 'inkMuted'} align={align}>
          {title}
          {on ? (s.desc ? ' ↓' : ' ↑') : ''}
        </Text>
      </Pressable>
    );
  };

  return (
    <View style={styles.table} accessibilityRole="list" testID="parts-table">
      <View style={[styles.row, styles.headRow]} testID="parts-table-head">
        <View style={[styles.cell, { flex: 2.4 }]}>{head('name', 'Name')}</View>
        <View style={[styles.cell, styles.sizeHead, { width: 210 }]}>
          <Text variant="overline" color="inkFaint">
            Size mm
          </Text>
          {head('sizeX', 'x')}
          {head('sizeY', 'y')}
          {head('sizeZ', 'z')}
        </View>
        <View style={[styles.cell, { width: 110 }]}>{head('volume', 'Volume', 'right')}</View>
        <View style={[styles.cell, { flex: 1.1 }]}>{head('material', 'Material')}</View>
        <View style={[styles.cell, { width: 70 }]}>{head('timesUsed', 'Used', 'right')}</View>
        <View style={[styles.cell, { flex: 1.1 }]}>{head('uploadedBy', 'By')}</View>
        <View style={[styles.cell, { width: 110 }]}>{head('createdAt', 'When')}</View>
      </View>
      {parts.map((p, i) => (
        <LinkPressable
          key={p.id}
          href={`/parts/${p.id}`}
          testID={`part-row-${p.id}`}
          style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
            styles.row,
            i % 2 === 1 && styles.zebra,
            i === parts.length - 1 && styles.lastRow,
            (pressed || hovered) && styles.hover,
          ]}
        >
          <View style={[styles.cell, { flex: 2.4 }]}>
            <NameCell part={p} />
          </View>
          <View style={[styles.cell, { width: 210 }]}>
            <Text variant="figure" testID={`part-size-${p.id}`}>
              {p.sizeMm.map((v) => formatNumber(v, 1)).join(' × ')}
            </Text>
          </View>
          <View style={[styles.cell, styles.right, { width: 110 }]}>
            <Text variant="figure" align="right">
              {formatVolume(p.volumeMm3)}
            </Text>
          </View>
          <View style={[styles.cell, { flex: 1.1 }]}>
            <Text variant="body" color={p.materialName ? 'ink' : 'inkFaint'} numberOfLines={2}>
              {p.materialName ?? '–'}
            </Text>
          </View>
          <View style={[styles.cell, styles.right, { width: 70 }]}>
            <Text variant="figure" align="right">
              {formatCount(p.timesUsed)}
            </Text>
          </View>
          <View style={[styles.cell, { flex: 1.1 }]}>
            <Text variant="body" numberOfLines={2}>
              {p.uploadedBy?.name ?? '–'}
            </Text>
          </View>
          <View style={[styles.cell, { width: 110 }]}>
            <Text variant="figure" color="inkMuted">
              {formatDate(p.createdAt)}
            </Text>
          </View>
        </LinkPressable>
      ))}
    </View>
  );
}

function NameCell({ part, thumb = 48 }: { part: Part; thumb?: number }) {
  return (
    <View style={styles.nameRow}>
      <PartThumb part={part} size={thumb} />
      <NameAndBadges part={part} />
    </View>
  );
}

function NameAndBadges({ part }: { part: Part }) {
  return (
    <View style={styles.nameCell}>
      <Text variant="bodyStrong" numberOfLines={2}>
        {part.name}
      </Text>
      {part.tags.length > 0 || part.warnings.length > 0 ? (
        <View style={styles.badges}>
          {part.warnings.map((w) => (
            <Badge key={w.code} label={warningLabel(w.code)} tone={w.code === 'empty-facets' ? 'neutral' : w.code === 'thin' || w.code === 'maybe-wrong-unit-small' ? 'amber' : 'danger'} />
          ))}
          {part.tags.map((t) => (
            <Badge key={t} label={t} />
          ))}
        </View>
      ) : null}
    </View>
  );
}

function CardItem({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <View style={styles.cardItem}>
      <Text variant="overline" color="inkFaint">
        {label}
      </Text>
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.lg, backgroundColor: colors.surface, overflow: 'hidden' },
  row: { flexDirection: 'row', alignItems: 'center', minHeight: 48, paddingHorizontal: spacing.sm, borderBottomWidth: 1, borderBottomColor: colors.line },
  headRow: { minHeight: 40, backgroundColor: colors.powderDeep },
  zebra: { backgroundColor: '#FBF7F1' },
  lastRow: { borderBottomWidth: 0 },
  hover: { backgroundColor: colors.emberSoft },
  cell: { paddingHorizontal: spacing.sm, paddingVertical: spacing.sm, justifyContent: 'center' },
  right: { alignItems: 'flex-end' },
  sizeHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, justifyContent: 'flex-start' },
  headButton: { paddingVertical: spacing.xs, paddingHorizontal: spacing.xxs, borderRadius: radius.sm },
  headHover: { backgroundColor: colors.line },
  nameRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.md },
  nameCell: { gap: spacing.xs, flex: 1, minWidth: 0 },
  badges: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
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
  cardGrid: { flexDirection: 'row', flexWrap: 'wrap', rowGap: spacing.md, columnGap: spacing.xl },
  cardItem: { gap: spacing.xxs, minWidth: 120, maxWidth: '100%', flexShrink: 1 },
});
