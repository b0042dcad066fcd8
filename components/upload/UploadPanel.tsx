import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useRef, useState } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { Choice } from '../ui/Choice';
import { formatBytes, formatSize, formatVolume } from '../parts/format';
import { invalidatePartLists, type Part, type RejectedFile } from '../queries/parts';
import { colors, radius, spacing } from '../theme';
import { Button, Card, LinkPressable, Text } from '../ui';
import { FileDrop } from './FileDrop';
import type { PickedFile } from './types';
import { uploadPartFile, type JobProgress, type UploadFields } from './uploadFile';

const ACCEPT = ['.stl', '.obj', '.3mf'];
/** Files in flight at once: enough to keep the server's measuring workers busy without starving the bars. */
const PARALLEL = 3;

type Item = {
  key: string;
  name: string;
  sizeBytes: number | null;
  file: PickedFile;
  fields: UploadFields;
  status: 'queued' | 'sending' | 'measuring' | 'done' | 'failed';
  progress: number;
  parts: Part[];
  rejected: RejectedFile[];
  message?: string;
  /** Set when the server queued the file for measuring and the screen follows its job. */
  job?: JobProgress;
};

let nextKey = 1;

export function UploadPanel({ labId }: { labId: string }) {
  const qc = useQueryClient();
  const [unit, setUnit] = useState<UploadFields['unit']>('mm');
  const [split, setSplit] = useState<'split' | 'merge'>('split');
  const [items, setItems] = useState<Item[]>([]);
  const running = useRef(new Map<string, () => void>());
  const { width } = useWindowDimensions();
  const narrow = width < 760;
  // On a phone the two choices fold into one line, so the library stays in view.
  const [showOptions, setShowOptions] = useState(false);

  const patch = useCallback((key: string, change: Partial<Item>) => {
    setItems((list) => list.map((it) => (it.key === key ? { ...it, ...change } : it)));
  }, []);

  // Start queued files while fewer than PARALLEL are in flight.
  useEffect(() => {
    const inFlight = items.filter((i) => i.status === 'sending' || i.status === 'measuring').length;
    const ready = items.filter((i) => i.status === 'queued').slice(0, Math.max(0, PARALLEL - inFlight));
    for (const item of ready) {
      patch(item.key, { status: 'sending', progress: 0 });
      const { promise, abort } = uploadPartFile(labId, item.file, item.fields, (f) =>
        // Once every byte is sent the server is measuring: say so instead of a full, idle bar.
        patch(item.key, f >= 1 ? { progress: 1, status: 'measuring' } : { progress: f }),
        (job) => patch(item.key, { status: 'measuring', progress: 1, job }),
      );
      running.current.set(item.key, abort);
      promise.then((outcome) => {
        running.current.delete(item.key);
        if (outcome.ok) {
          patch(item.key, { status: outcome.parts.length > 0 ? 'done' : 'failed', progress: 1, parts: outcome.parts, rejected: outcome.rejected });
          if (outcome.parts.length > 0) invalidatePartLists(qc, labId);
        } else {
          patch(item.key, { status: 'failed', message: outcome.message, rejected: outcome.rejected });
        }
      });
    }
  }, [items, labId, patch, qc]);

  useEffect(() => {
    const map = running.current;
    return () => map.forEach((abort) => abort());
  }, []);

  const add = (files: PickedFile[]) => {
    const fields: UploadFields = { unit, split: split === 'split' };
    setItems((list) => [
      ...files.map((file) => ({
        key: `u${nextKey++}`,
        name: file.name,
        sizeBytes: file.sizeBytes,
        file,
        fields,
        status: 'queued' as const,
        progress: 0,
        parts: [],
        rejected: [],
      })),
      ...list,
    ]);
  };

  const finished = items.filter((i) => i.status === 'done' || i.status === 'failed');

  return (
    <Card title="Upload parts" subtitle="Each file is measured by the server: size, volume, surface area, shells and whether it is closed." testID="parts-upload">
      <View style={[styles.body, !narrow && styles.bodyWide]}>
        <View style={[styles.drop, !narrow && styles.dropWide]}>
          <FileDrop onFiles={add} accept={ACCEPT} testID="parts-drop" hint="Several at once is fine; each file is sent and measured on its own." />
        </View>
        {narrow && !showOptions ? (
          <View style={styles.summary}>
            <Text variant="label" color="inkMuted" style={styles.summaryText}>
              Unit {unit} (a 3MF’s own unit wins) · 3MF: {split === 'split' ? 'one part per object' : 'one merged part'}
            </Text>
            <Button label="Change" variant="ghost" size="sm" testID="upload-options" onPress={() => setShowOptions(true)} />
          </View>
        ) : (
          <View style={[styles.options, !narrow && styles.optionsWide]}>
            <Choice
              label="Unit of STL and OBJ files"
              testID="upload-unit"
              value={unit}
              onChange={setUnit}
              options={[
                { value: 'mm', label: 'mm' },
                { value: 'cm', label: 'cm' },
                { value: 'inch', label: 'inch' },
              ]}
              hint="STL and OBJ files carry no unit. A 3MF names its own unit, which wins."
            />
            <Choice
              label="A 3MF with several objects"
              testID="upload-split"
              value={split}
              onChange={setSplit}
              options={[
                { value: 'split', label: 'One part per object' },
                { value: 'merge', label: 'One merged part' },
              ]}
            />
          </View>
        )}
      </View>
      {items.length > 0 ? (
        <View style={styles.list} testID="upload-list">
          {items.map((item) => (
            <UploadRow key={item.key} item={item} onCancel={() => running.current.get(item.key)?.()} />
          ))}
          {finished.length > 0 ? (
            <Button
              label="Clear finished"
              variant="ghost"
              size="sm"
              testID="upload-clear"
              onPress={() => setItems((list) => list.filter((i) => i.status !== 'done' && i.status !== 'failed'))}
            />
          ) : null}
        </View>
      ) : null}
    </Card>
  );
}

function UploadRow({ item, onCancel }: { item: Item; onCancel: () => void }) {
  const statusText: Record<Item['status'], string> = {
    queued: 'Waiting',
    sending: `Sending ${Math.round(item.progress * 100)} %`,
    measuring: item.job?.state === 'queued' ? 'Queued for measuring…' : 'Measuring…',
    done: 'Measured',
    failed: 'Refused',
  };
  const tone = item.status === 'done' ? 'teal' : item.status === 'failed' ? 'danger' : 'inkMuted';
  const refusals = item.rejected.length > 0 ? item.rejected.map((r) => r.message) : item.message ? [item.message] : [];
  return (
    <View style={styles.row} testID={`upload-item-${item.name}`} accessibilityLabel={`${item.name}: ${statusText[item.status]}`}>
      <View style={styles.rowHead}>
        <Text variant="bodyStrong" style={styles.name} numberOfLines={1}>
          {item.name}
        </Text>
        <Text variant="figure" color="inkFaint">
          {formatBytes(item.sizeBytes)}
        </Text>
        <Text variant="label" color={tone} testID={`upload-status-${item.name}`}>
          {item.status === 'done' ? '✓ ' : ''}
          {statusText[item.status]}
        </Text>
        {item.status === 'sending' ? <Button label="Cancel" variant="ghost" size="sm" onPress={onCancel} /> : null}
      </View>
      {item.status === 'measuring' && item.job ? (
        <Text variant="caption" color="inkMuted" testID={`upload-job-${item.name}`}>
          {item.job.state === 'queued'
            ? 'The server has queued this file behind other uploads; it is measured in turn, and you may leave this screen: its parts will appear in the library.'
            : 'The server is measuring this file; large files take a while. You may leave this screen: its parts will appear in the library.'}
        </Text>
      ) : null}
      {item.status === 'sending' || item.status === 'measuring' || item.status === 'queued' ? (
        <View style={styles.track} accessibilityRole="progressbar" accessibilityValue={{ min: 0, max: 100, now: Math.round(item.progress * 100) }}>
          <View style={[styles.bar, { width: `${Math.round(item.progress * 100)}%` }, item.status === 'measuring' && styles.barMeasuring]} />
        </View>
      ) : null}
      {item.parts.map((p) => (
        <LinkPressable key={p.id} href={`/parts/${p.id}`} style={styles.result} testID={`upload-part-${p.id}`}>
          <Text variant="label" color="teal">
            ✓ {p.name}
          </Text>
          <Text variant="figure" color="ink">
            {formatSize(p.sizeMm)} mm · {formatVolume(p.volumeMm3)}
          </Text>
          {p.warnings.length > 0 ? (
            <Text variant="caption" color="amber">
              {p.warnings.length === 1 ? '1 warning' : `${p.warnings.length} warnings`}: {p.warnings.map((w) => w.message).join(' ')}
            </Text>
          ) : null}
        </LinkPressable>
      ))}
      {refusals.map((m, i) => (
        <Text key={i} variant="caption" color="danger" testID={`upload-error-${item.name}`} accessibilityRole="alert">
          {m}
        </Text>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: spacing.md },
  bodyWide: { flexDirection: 'row', alignItems: 'stretch', gap: spacing.xl },
  drop: {},
  dropWide: { flex: 1.3 },
  options: { gap: spacing.md },
  optionsWide: { flex: 1 },
  summary: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  summaryText: { flexShrink: 1 },
  list: { gap: spacing.sm },
  row: { borderTopWidth: 1, borderTopColor: colors.line, paddingTop: spacing.sm, gap: spacing.xs },
  rowHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  name: { flexShrink: 1, minWidth: 120 },
  track: { height: 6, borderRadius: radius.pill, backgroundColor: colors.powderDeep, overflow: 'hidden' },
  bar: { height: 6, borderRadius: radius.pill, backgroundColor: colors.ember },
  barMeasuring: { backgroundColor: colors.teal },
  result: { gap: 2, paddingVertical: spacing.xxs },
});
