import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { PlanOrientationRule } from '../../shared/schemas/plans';
import type { PackerStatus } from '../packing/usePacker';
import type { DraftOptions } from '../stores/planEditor';
import { colors, radius, spacing } from '../theme';
import { Badge, Button, Choice, Text, TextInput } from '../ui';
import { priorityLabel, priorityTone } from '../requests/labels';
import { openMeshNote, shapeTimeNote } from './editorModel';
import { RULE_LABELS, RULE_ORIENTATIONS } from './instance';

export interface EditorLine {
  requestLineId: string;
  partName: string;
  requestTitle: string;
  dueDate: string;
  priority: string;
  sizeMm: [number, number, number];
  quantity: number;
  /** The most this plan may hold: what the request line still needs besides other plans. */
  maxQuantity: number;
  rule: PlanOrientationRule;
  ruleOverride: PlanOrientationRule | null;
  partRule: PlanOrientationRule;
  /** Placed in the layout shown, when one is. */
  placed: number | null;
  colour: string;
  /** New in this draft (from filling the rest), not saved yet. */
  added: boolean;
}

const RULES: PlanOrientationRule[] = ['any', 'keep_up', 'fixed'];

function NumberInput({ value, onCommit, label, testID, width = 80, min = 0, max, editable = true }: { value: number; onCommit: (n: number) => void; label: string; testID?: string; width?: number; min?: number; max?: number; editable?: boolean }) {
  const [text, setText] = useState(String(value));
  useEffect(() => setText(String(value)), [value]);
  const n = Number(text);
  const invalid = text === '' || !Number.isFinite(n) || n < min || (max !== undefined && n > max);
  return (
    <TextInput
      value={text}
      onChangeText={(t) => {
        setText(t);
        const v = Number(t);
        if (t !== '' && Number.isFinite(v) && v >= min && (max === undefined || v <= max)) onCommit(v);
      }}
      onBlur={() => setText(String(value))}
      inputMode="decimal"
      accessibilityLabel={label}
      invalid={invalid}
      editable={editable}
      mono
      testID={testID}
      style={{ width }}
    />
  );
}

export interface LinesPaneProps {
  lines: EditorLine[];
  /** Triangles of the distinct parts' meshes the lines hold (a packing by shape needs time to prepare heavy ones). */
  meshTriangles: number;
  /** Triangles of all the copies the lines hold (a packing by shape checks every layout against them). */
  placedTriangles: number;
  /** Names of the distinct parts the lines hold whose mesh is not closed (a packing by shape packs them by their boxes). */
  openMeshParts: string[];
  editable: boolean;
  onQuantity: (id: string, quantity: number) => void;
  onRule: (id: string, rule: PlanOrientationRule | null) => void;
  onRemoveLine: (id: string) => void;
  onRuleAll: (rule: PlanOrientationRule | null) => void;
  options: DraftOptions;
  onOptions: (patch: Partial<DraftOptions>) => void;
  materialSpacingMm: number;
  layerHeightsMm: number[];
  packer: { status: PackerStatus; progress: number; phase: string | null; error: string | null };
  packingWhat: string | null;
  onPack: () => void;
  onCancel: () => void;
  onRetry: (() => void) | null;
  fill: { available: number; reason: string | null; onFill: () => void };
  repack: { available: boolean; reason: string | null; onRepack: () => void };
}

/** Left pane: the plan's lines with their quantities and orientation rules, and packing. */
export function LinesPane(p: LinesPaneProps) {
  const running = p.packer.status === 'running';
  const total = p.lines.reduce((s, l) => s + l.quantity, 0);
  const timeNote = p.options.fit === 'shape' ? shapeTimeNote(total, p.options.timeLimitMs, p.meshTriangles, p.placedTriangles) : null;
  const openNote = p.options.fit === 'shape' ? openMeshNote(p.openMeshParts) : null;
  return (
    <View style={styles.pane} testID="plan-lines">
      <View style={styles.section}>
        <Text variant="heading">Lines</Text>
        <Text variant="caption" color="inkMuted">
          {p.lines.length} lines · {total} parts
        </Text>
        {p.lines.map((l) => (
          <View key={l.requestLineId} style={styles.line} testID={`plan-line-${l.requestLineId}`}>
            <View style={styles.lineHead}>
              <View style={[styles.swatch, { backgroundColor: l.colour }]} />
              <View style={{ flex: 1 }}>
                <Text variant="bodyStrong" numberOfLines={1}>{l.partName}</Text>
                <Text variant="caption" color="inkMuted" numberOfLines={1}>
                  {l.requestTitle} · due {l.dueDate}
                </Text>
              </View>
              {l.added ? <Badge label="Added" tone="amber" /> : null}
              {l.priority === 'urgent' || l.priority === 'high' ? <Badge label={priorityLabel(l.priority)} tone={priorityTone(l.priority)} /> : null}
            </View>
            <View style={styles.lineRow}>
              <Text variant="caption" color="inkMuted">Qty</Text>
              <NumberInput
                value={l.quantity}
                min={1}
                max={l.maxQuantity}
                onCommit={(n) => p.onQuantity(l.requestLineId, Math.round(n))}
                label={`Quantity of ${l.partName}`}
                testID={`plan-qty-${l.requestLineId}`}
                width={64}
                editable={p.editable}
              />
              <Text variant="caption" color="inkFaint">of {l.maxQuantity}</Text>
              {l.placed !== null ? (
                <Text variant="caption" color={l.placed < l.quantity ? 'danger' : 'teal'} style={{ marginLeft: 'auto' }}>
                  {l.placed} placed
                </Text>
              ) : null}
            </View>
            <View style={styles.lineRow}>
              <Choice
                compact
                value={l.rule}
                onChange={p.editable ? (r) => p.onRule(l.requestLineId, r === l.partRule ? null : r) : undefined}
                options={RULES.map((r) => ({
                  value: r,
                  label: RULE_LABELS[r],
                  testID: `plan-rule-${l.requestLineId}-${r}`,
                  accessibilityLabel: `${l.partName}: ${RULE_LABELS[r]} (${RULE_ORIENTATIONS[r].length} orientations)`,
                }))}
              />
              {p.editable && p.lines.length > 1 ? (
                <Button label="Remove" size="sm" variant="ghost" onPress={() => p.onRemoveLine(l.requestLineId)} testID={`plan-line-remove-${l.requestLineId}`} />
              ) : null}
            </View>
          </View>
        ))}
      </View>

      {p.editable ? (
        <View style={styles.section} testID="pack-panel">
          <Text variant="heading">Packing</Text>
          <View style={styles.optionGrid}>
            <View style={styles.option}>
              <Text variant="caption" color="inkMuted">Seed</Text>
              <NumberInput value={p.options.seed} min={0} max={2 ** 31} onCommit={(n) => p.onOptions({ seed: Math.round(n) })} label="Seed" testID="pack-seed" />
            </View>
            <View style={styles.option}>
              <Text variant="caption" color="inkMuted">Spacing mm (≥ {p.materialSpacingMm})</Text>
              <NumberInput value={p.options.spacingMm} min={p.materialSpacingMm} max={50} onCommit={(n) => p.onOptions({ spacingMm: n })} label="Spacing in mm" testID="pack-spacing" />
            </View>
            <View style={styles.option}>
              <Text variant="caption" color="inkMuted">Time limit s</Text>
              <NumberInput value={p.options.timeLimitMs / 1000} min={0.5} max={600} onCommit={(n) => p.onOptions({ timeLimitMs: Math.round(n * 1000) })} label="Time limit in seconds" testID="pack-time" />
            </View>
          </View>
          <Text variant="caption" color="inkMuted">Fit parts by</Text>
          <Choice
            compact
            value={p.options.fit ?? 'box'}
            onChange={(fit) => p.onOptions({ fit: fit as 'box' | 'shape' })}
            options={[
              { value: 'box', label: 'Boxes', testID: 'pack-fit-box', accessibilityLabel: 'Fit parts by their bounding boxes' },
              { value: 'shape', label: 'Shapes', testID: 'pack-fit-shape', accessibilityLabel: "Fit parts by their meshes, into each other's hollows" },
            ]}
          />
          {p.options.fit === 'shape' ? (
            <Text variant="caption" color="inkFaint" testID="pack-fit-note">
              Parts nest into each other's hollows, and every part can still be lifted straight out. The parts' files are downloaded first; a part without a closed mesh is packed by its box. The server checks the meshes again when you keep the layout.
            </Text>
          ) : null}
          {openNote ? (
            <Text variant="caption" color="ember" testID="pack-open-note">
              {openNote}
            </Text>
          ) : null}
          {timeNote ? (
            <Text variant="caption" color="ember" testID="pack-time-note">
              {timeNote}
            </Text>
          ) : null}
          <Text variant="caption" color="inkMuted">Layer height</Text>
          <Choice
            compact
            value={String(p.options.layerHeightMm)}
            onChange={(h) => p.onOptions({ layerHeightMm: Number(h) })}
            options={p.layerHeightsMm.map((h) => ({ value: String(h), label: `${h} mm`, testID: `pack-layer-${h}` }))}
          />
          <Text variant="caption" color="inkMuted">Orientation rule of every line</Text>
          <View style={styles.chips}>
            <Button label="Each part's own" size="sm" variant="ghost" onPress={() => p.onRuleAll(null)} testID="pack-rule-own" />
            {RULES.map((r) => (
              <Button key={r} label={RULE_LABELS[r]} size="sm" variant="ghost" onPress={() => p.onRuleAll(r)} testID={`pack-rule-${r}`} />
            ))}
          </View>
          {running ? (
            <View style={styles.progressBox} testID="pack-progress">
              <View style={styles.progressTrack} accessibilityRole="progressbar" aria-valuenow={Math.round(p.packer.progress * 100)} aria-valuemin={0} aria-valuemax={100}>
                <View style={[styles.progressFill, { width: `${Math.max(2, Math.round(p.packer.progress * 100))}%` }]} />
              </View>
              <Text variant="caption" color="inkMuted" testID="pack-progress-text">
                {p.packingWhat ?? 'Packing'} · {p.packer.phase === 'search' ? 'improving' : 'first layout'} · {Math.round(p.packer.progress * 100)} %
              </Text>
              <Button label="Cancel (Esc)" variant="secondary" onPress={p.onCancel} testID="pack-cancel" />
            </View>
          ) : (
            <View style={{ gap: spacing.sm }}>
              <Button label="Pack (P)" onPress={p.onPack} testID="pack-start" />
              <Button
                label="Re-pack what is new"
                variant="secondary"
                onPress={p.repack.onRepack}
                disabled={!p.repack.available}
                testID="pack-repack-new"
                accessibilityHint={p.repack.reason ?? undefined}
              />
              {p.repack.reason ? <Text variant="caption" color="inkFaint">{p.repack.reason}</Text> : null}
              <Button
                label={p.fill.available > 0 ? `Fill the rest (${p.fill.available} open parts)` : 'Fill the rest'}
                variant="secondary"
                onPress={p.fill.onFill}
                disabled={p.fill.available === 0 || !!p.fill.reason}
                testID="pack-fill"
              />
              {p.fill.reason ? <Text variant="caption" color="inkFaint">{p.fill.reason}</Text> : null}
            </View>
          )}
          {p.packer.status === 'cancelled' ? <Text variant="caption" color="inkMuted" testID="pack-cancelled">Stopped: the best layout found so far is shown.</Text> : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  pane: { gap: spacing.lg },
  section: { gap: spacing.sm, padding: spacing.md, backgroundColor: colors.surface, borderRadius: radius.lg, borderWidth: 1, borderColor: colors.line },
  line: { gap: spacing.xs, paddingVertical: spacing.sm, borderTopWidth: 1, borderTopColor: colors.line },
  lineHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  swatch: { width: 12, height: 12, borderRadius: 3 },
  lineRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, flexWrap: 'wrap' },
  optionGrid: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  option: { gap: 2 },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  progressBox: { gap: spacing.sm },
  progressTrack: { height: 10, borderRadius: 5, backgroundColor: colors.powderDeep, overflow: 'hidden' },
  progressFill: { height: 10, backgroundColor: colors.ember },
});
