import { useEffect, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { QUANTITY_MAX, requestCreateSchema, PRIORITIES } from '../../shared/schemas/requests';
import { isApiError } from '../api/client';
import { useLab } from '../lab/useCurrentLab';
import { formatSize } from '../parts/format';
import { Choice } from '../ui/Choice';
import { useMaterialsQuery } from '../queries/materials';
import { usePartsQuery } from '../queries/parts';
import type { RequestInput } from '../queries/requests';
import { colors, radius, spacing } from '../theme';
import { Button, Card, Field, LoadingState, Notice, Text, TextInput } from '../ui';
import { DateField } from './DateField';
import { scrollToFirstError } from './scrollToFirstError';
import { PRIORITY_LABELS, addDaysIso, todayIso } from './labels';

export type RequestFormLine = { partId: string; partName: string; quantity: string };
export type RequestFormValues = {
  title: string;
  materialId: string;
  dueDate: string;
  priority: RequestInput['priority'];
  notes: string;
  lines: RequestFormLine[];
};

export function emptyRequestValues(): RequestFormValues {
  return { title: '', materialId: '', dueDate: addDaysIso(todayIso(), 14), priority: 'normal', notes: '', lines: [] };
}

type Errors = { fields: Record<string, string>; lines: Record<number, string>; form?: string };

function sentence(m: string): string {
  return m ? m[0].toUpperCase() + m.slice(1) : m;
}

/** Hides the messages of fields the user has changed since the attempt that produced them. */
function withoutEdited(errs: Errors, edited: ReadonlySet<string>): Errors {
  if (edited.size === 0) return errs;
  const fields = Object.fromEntries(Object.entries(errs.fields).filter(([k]) => !edited.has(k)));
  const lines = Object.fromEntries(Object.entries(errs.lines).filter(([k]) => !edited.has(`lines.${k}`)));
  if (edited.has('lines')) delete fields.lines;
  return { fields, lines, form: errs.form };
}

/** The server names the field it refuses ("lines[2].quantity", "dueDate"): each message goes under its input. */
function serverErrors(error: unknown): Errors {
  if (!error) return { fields: {}, lines: {} };
  if (!isApiError(error)) return { fields: {}, lines: {}, form: error instanceof Error ? error.message : String(error) };
  const f = error.field ?? '';
  const line = /^lines\[(\d+)\]/.exec(f);
  if (line) return { fields: {}, lines: { [Number(line[1])]: sentence(error.message) } };
  const root = /^[a-zA-Z]+/.exec(f)?.[0];
  if (root && ['title', 'materialId', 'dueDate', 'priority', 'notes', 'lines'].includes(root)) return { fields: { [root]: sentence(error.message) }, lines: {} };
  return { fields: {}, lines: {}, form: error.message };
}

export function RequestForm({
  initial,
  submitLabel,
  submitting,
  error,
  onSubmit,
  onCancel,
}: {
  initial: RequestFormValues;
  submitLabel: string;
  submitting: boolean;
  error: unknown;
  onSubmit: (input: RequestInput) => void;
  onCancel?: () => void;
}) {
  const lab = useLab();
  const materials = useMaterialsQuery(lab.id);
  const [v, setV] = useState<RequestFormValues>(initial);
  const [local, setLocal] = useState<Errors | null>(null);
  // Fields edited since the last attempt: their old message goes away as soon as the user changes them.
  const [edited, setEdited] = useState<ReadonlySet<string>>(new Set());
  const [attempt, setAttempt] = useState(0);
  // A failed local check shows its own problems; otherwise the server's answer to the last attempt (react-query clears it on the next).
  const errs: Errors = withoutEdited(local ?? serverErrors(error), edited);
  const touch = (key: string) => setEdited((old) => (old.has(key) ? old : new Set(old).add(key)));
  const set = <K extends keyof RequestFormValues>(k: K, value: RequestFormValues[K]) => {
    touch(k);
    setV((old) => ({ ...old, [k]: value }));
  };
  const hasErrors = Object.keys(errs.fields).length > 0 || Object.keys(errs.lines).length > 0 || !!errs.form;
  // After each attempt that left problems, bring the first one into view.
  useEffect(() => {
    if (attempt > 0 && hasErrors) scrollToFirstError('request-form');
  }, [attempt, hasErrors, error]);

  const submit = () => {
    setEdited(new Set());
    setAttempt((n) => n + 1);
    const out: Errors = { fields: {}, lines: {} };
    const lines = v.lines.map((l, i) => {
      const q = l.quantity.trim() === '' ? NaN : Number(l.quantity);
      if (!Number.isInteger(q) || q < 1 || q > QUANTITY_MAX) out.lines[i] = `Enter a whole number from 1 to ${QUANTITY_MAX.toLocaleString('en-US')}.`;
      return { partId: l.partId, quantity: q };
    });
    const input = { title: v.title, materialId: v.materialId, dueDate: v.dueDate.trim(), priority: v.priority, notes: v.notes, lines };
    const parsed = requestCreateSchema.safeParse(input);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const [root, index] = issue.path;
        if (root === 'lines' && typeof index === 'number') {
          if (!(index in out.lines)) out.lines[index] = sentence(issue.message);
        } else if (root === 'materialId') out.fields.materialId ??= 'Pick the material.';
        else if (typeof root === 'string' && !(root in out.fields)) out.fields[root] = sentence(issue.message);
      }
    }
    // The server has the final word on dates (its "today" is the westernmost zone's), this catches the obvious case early.
    if (!out.fields.dueDate && /^\d{4}-\d{2}-\d{2}$/.test(input.dueDate) && input.dueDate < addDaysIso(todayIso(), -1)) out.fields.dueDate = 'The due date is in the past.';
    if (Object.keys(out.fields).length > 0 || Object.keys(out.lines).length > 0 || !parsed.success) {
      setLocal(out);
      return;
    }
    setLocal(null);
    onSubmit(parsed.data);
  };

  return (
    <View style={styles.form} testID="request-form">
      <Field label="Title" testID="request-title" value={v.title} onChangeText={(t) => set('title', t)} error={errs.fields.title} placeholder="Gripper prototype, second round" />
      <View style={styles.field}>
        {materials.isPending ? (
          <LoadingState label="Loading materials…" />
        ) : (materials.data ?? []).length === 0 ? (
          <Notice tone="caution" title="The lab has no materials yet">
            A lead adds the lab’s powders in Settings → Materials; a request needs one.
          </Notice>
        ) : (
          <Choice
            label="Material"
            testID="request-material"
            value={v.materialId}
            onChange={(m) => set('materialId', m)}
            options={(materials.data ?? []).map((m) => ({ value: m.id, label: m.name, testID: `request-material-${m.id}` }))}
          />
        )}
        {errs.fields.materialId ? (
          <Text variant="caption" color="danger" testID="request-material-error">
            {errs.fields.materialId}
          </Text>
        ) : null}
      </View>
      <View style={styles.pair}>
        <View style={styles.pairItem}>
          <DateField label="Due date" testID="request-due" value={v.dueDate} onChange={(t) => set('dueDate', t)} error={errs.fields.dueDate} min={todayIso()} />
        </View>
        <View style={styles.pairItem}>
          <Choice
            label="Priority"
            testID="request-priority"
            value={v.priority}
            onChange={(p) => set('priority', p)}
            options={PRIORITIES.map((p) => ({ value: p, label: PRIORITY_LABELS[p] }))}
            hint={errs.fields.priority}
          />
        </View>
      </View>
      <Field
        label="Notes"
        testID="request-notes"
        value={v.notes}
        onChangeText={(t) => set('notes', t)}
        error={errs.fields.notes}
        multiline
        numberOfLines={3}
        style={styles.notes}
        placeholder="Finish, colour, who collects the parts…"
      />

      <Card title="Parts" subtitle="Each line is one part of the library and how many of it." testID="request-lines">
        {v.lines.length === 0 ? (
          <Text variant="body" color={errs.fields.lines ? 'danger' : 'inkMuted'} testID="request-lines-empty">
            {errs.fields.lines ?? 'No parts yet: find them below and add them.'}
          </Text>
        ) : (
          v.lines.map((line, i) => (
            <View key={line.partId} style={styles.line} testID={`request-line-${i}`}>
              <Text variant="bodyStrong" style={styles.lineName} numberOfLines={2}>
                {line.partName}
              </Text>
              <View style={styles.qty}>
                <Text variant="caption" color="inkMuted" nativeID={`request-line-${i}-quantity-label`}>
                  Quantity
                </Text>
                <TextInput
                  testID={`request-line-${i}-quantity`}
                  accessibilityLabel={`Quantity of ${line.partName}`}
                  aria-labelledby={`request-line-${i}-quantity-label`}
                  value={line.quantity}
                  keyboardType="number-pad"
                  mono
                  invalid={!!errs.lines[i]}
                  onChangeText={(t) => {
                    touch(`lines.${i}`);
                    setV((old) => ({ ...old, lines: old.lines.map((l, j) => (j === i ? { ...l, quantity: t } : l)) }));
                  }}
                />
              </View>
              <Button label="Remove" variant="ghost" size="sm" testID={`request-line-${i}-remove`} onPress={() => set('lines', v.lines.filter((_, j) => j !== i))} />
              {errs.lines[i] ? (
                <Text variant="caption" color="danger" style={styles.lineError} testID={`request-line-${i}-error`}>
                  {errs.lines[i]}
                </Text>
              ) : null}
            </View>
          ))
        )}
        <PartPicker
          chosen={v.lines.map((l) => l.partId)}
          onPick={(p) =>
            setV((old) => ({
              ...old,
              // The first part's default material is the likely choice when none is picked yet.
              materialId: old.materialId || p.materialId || '',
              lines: [...old.lines, { partId: p.id, partName: p.name, quantity: '1' }],
            }))
          }
        />
      </Card>

      {errs.form ? (
        <Notice tone="danger" title="Not saved" testID="request-form-error">
          {errs.form}
        </Notice>
      ) : null}
      <View style={styles.buttons}>
        <Button label={submitLabel} testID="request-submit" loading={submitting} onPress={submit} />
        {onCancel ? <Button label="Cancel" variant="ghost" onPress={onCancel} testID="request-cancel-edit" /> : null}
      </View>
    </View>
  );
}

/** Finds parts of the library by name or tag to add as lines. */
function PartPicker({ chosen, onPick }: { chosen: string[]; onPick: (p: { id: string; name: string; materialId: string | null }) => void }) {
  const lab = useLab();
  const [search, setSearch] = useState('');
  const parts = usePartsQuery(lab.id, { search: search.trim() || undefined, sort: 'name', pageSize: 8 });
  const items = (parts.data?.items ?? []).filter((p) => !chosen.includes(p.id));
  return (
    <View style={styles.picker}>
      <Field label="Find a part" testID="request-part-search" value={search} onChangeText={setSearch} placeholder="Name or tag" autoCapitalize="none" autoCorrect={false} />
      {parts.isPending ? (
        <LoadingState label="Searching the library…" />
      ) : parts.isError ? (
        <Text variant="caption" color="danger">
          {parts.error.message}
        </Text>
      ) : items.length === 0 ? (
        <Text variant="caption" color="inkMuted">
          {parts.data.total === 0 ? 'No part of the library matches; upload it under Parts first.' : 'Every match is already a line.'}
        </Text>
      ) : (
        <View style={styles.matches}>
          {items.map((p) => (
            <Pressable
              key={p.id}
              testID={`request-add-part-${p.id}`}
              accessibilityRole="button"
              accessibilityLabel={`Add ${p.name}`}
              onPress={() => onPick(p)}
              style={({ pressed }) => [styles.match, pressed && styles.matchPressed]}
            >
              <Text variant="body" style={styles.lineName} numberOfLines={1}>
                + {p.name}
              </Text>
              <Text variant="figure" color="inkMuted" numberOfLines={1} style={styles.matchSize}>
                {formatSize(p.sizeMm.map((x) => Math.round(x)))} mm
              </Text>
            </Pressable>
          ))}
        </View>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.lg, maxWidth: 820 },
  field: { gap: spacing.xs },
  pair: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.lg },
  pairItem: { flexGrow: 1, flexBasis: 260 },
  notes: { minHeight: 88, paddingTop: spacing.sm, textAlignVertical: 'top' },
  line: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.md, borderBottomWidth: 1, borderBottomColor: colors.line, paddingBottom: spacing.sm },
  lineName: { flexGrow: 1, flexShrink: 1, flexBasis: 120, minWidth: 0 },
  qty: { width: 96, gap: 2 },
  matchSize: { fontSize: 13 },
  lineError: { flexBasis: '100%' },
  picker: { gap: spacing.sm, paddingTop: spacing.sm },
  matches: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, overflow: 'hidden' },
  match: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, minHeight: 44, paddingHorizontal: spacing.md, borderBottomWidth: 1, borderBottomColor: colors.line },
  matchPressed: { backgroundColor: colors.emberSoft },
  buttons: { flexDirection: 'row', gap: spacing.sm },
});
